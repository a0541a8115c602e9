import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CalibrationFlag, FlagUpdate } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

/** Sets a flag's status (and note); refreshes the views that show flags. */
export function useUpdateFlag(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, update }: { id: number; update: FlagUpdate }) =>
      api<CalibrationFlag>(`/federations/${encodeURIComponent(federation)}/analytics/flags/${id}`, { method: 'PATCH', body: update }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['federations', federation, 'analytics'] }),
  });
}

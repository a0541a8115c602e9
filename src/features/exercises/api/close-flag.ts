import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CalibrationFlag } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

/** Closes a calibration flag with a note and a link to this exercise (leads). */
export function useCloseFlagWithExercise(federation: string, exerciseId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ flagId, note }: { flagId: number; note: string }) =>
      api<CalibrationFlag>(`/federations/${encodeURIComponent(federation)}/exercises/${exerciseId}/flags/${flagId}/close`, {
        method: 'POST',
        body: { note },
      }),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: ['federations', federation, 'exercises'] });
      await queryClient.invalidateQueries({ queryKey: ['federations', federation, 'analytics'] });
    },
  });
}

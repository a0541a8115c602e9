import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { EvaluateResponse } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

/** Re-evaluates the federation's calibration flags now; refreshes every analytics view. */
export function useEvaluateFlags(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api<EvaluateResponse>(`/federations/${encodeURIComponent(federation)}/analytics/flags/evaluate`, { method: 'POST' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['federations', federation, 'analytics'] }),
  });
}

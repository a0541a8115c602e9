import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { FlagThresholds } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

/** Saves the flag thresholds (the server re-evaluates the flags at once). */
export function useSaveFlagSettings(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (thresholds: FlagThresholds) =>
      api<FlagThresholds>(`/federations/${encodeURIComponent(federation)}/analytics/flag-settings`, { method: 'PUT', body: thresholds }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['federations', federation, 'analytics'] }),
  });
}

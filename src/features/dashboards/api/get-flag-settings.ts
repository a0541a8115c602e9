import { queryOptions, useQuery } from '@tanstack/react-query';
import type { FlagThresholds } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function flagSettingsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'flag-settings'],
    queryFn: () => api<FlagThresholds>(`/federations/${encodeURIComponent(federation)}/analytics/flag-settings`),
  });
}

export function useFlagSettings(federation: string) {
  return useQuery(flagSettingsQueryOptions(federation));
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import type { FlagsResponse } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function flagsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'flags'],
    queryFn: () => api<FlagsResponse>(`/federations/${encodeURIComponent(federation)}/analytics/flags`),
  });
}

export function useFlags(federation: string) {
  return useQuery(flagsQueryOptions(federation));
}

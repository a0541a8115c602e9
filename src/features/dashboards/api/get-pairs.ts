import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type PairsResponse } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function pairsQueryOptions(federation: string, filters: AnalyticsFilters) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'pairs', filters],
    queryFn: () => api<PairsResponse>(`/federations/${encodeURIComponent(federation)}/analytics/pairs${filtersToSearch(filters)}`),
  });
}

export function usePairs(federation: string, filters: AnalyticsFilters) {
  return useQuery(pairsQueryOptions(federation, filters));
}

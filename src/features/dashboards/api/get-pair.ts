import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type PairDetail } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function pairQueryOptions(federation: string, filters: AnalyticsFilters, a: string, b: string) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'pair', a, b, filters],
    queryFn: () =>
      api<PairDetail>(
        `/federations/${encodeURIComponent(federation)}/analytics/pairs/${encodeURIComponent(a)}/${encodeURIComponent(b)}${filtersToSearch(filters)}`,
      ),
  });
}

export function usePair(federation: string, filters: AnalyticsFilters, a: string, b: string) {
  return useQuery(pairQueryOptions(federation, filters, a, b));
}

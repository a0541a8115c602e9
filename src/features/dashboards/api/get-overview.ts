import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type Overview } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function overviewQueryOptions(federation: string, filters: AnalyticsFilters) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'overview', filters],
    queryFn: () => api<Overview>(`/federations/${encodeURIComponent(federation)}/analytics/overview${filtersToSearch(filters)}`),
  });
}

export function useOverview(federation: string, filters: AnalyticsFilters) {
  return useQuery(overviewQueryOptions(federation, filters));
}

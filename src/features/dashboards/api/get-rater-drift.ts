import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type RaterDrift } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function raterDriftQueryOptions(federation: string, filters: AnalyticsFilters) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'rater-drift', filters],
    queryFn: () => api<RaterDrift>(`/federations/${encodeURIComponent(federation)}/analytics/drift/raters${filtersToSearch(filters)}`),
  });
}

export function useRaterDrift(federation: string, filters: AnalyticsFilters) {
  return useQuery(raterDriftQueryOptions(federation, filters));
}

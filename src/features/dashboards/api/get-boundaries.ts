import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type BoundariesResponse } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function boundariesQueryOptions(federation: string, filters: AnalyticsFilters) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'boundaries', filters],
    queryFn: () =>
      api<BoundariesResponse>(`/federations/${encodeURIComponent(federation)}/analytics/boundaries${filtersToSearch(filters)}`),
  });
}

export function useBoundaries(federation: string, filters: AnalyticsFilters) {
  return useQuery(boundariesQueryOptions(federation, filters));
}

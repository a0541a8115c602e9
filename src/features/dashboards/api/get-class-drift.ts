import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type ClassDrift } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function classDriftQueryOptions(federation: string, filters: AnalyticsFilters) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'class-drift', filters],
    queryFn: () => api<ClassDrift>(`/federations/${encodeURIComponent(federation)}/analytics/drift/classes${filtersToSearch(filters)}`),
  });
}

export function useClassDrift(federation: string, filters: AnalyticsFilters) {
  return useQuery(classDriftQueryOptions(federation, filters));
}

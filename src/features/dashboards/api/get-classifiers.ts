import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type ClassifiersResponse } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function classifiersQueryOptions(federation: string, filters: AnalyticsFilters) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'classifiers', filters],
    queryFn: () =>
      api<ClassifiersResponse>(`/federations/${encodeURIComponent(federation)}/analytics/classifiers${filtersToSearch(filters)}`),
  });
}

export function useClassifiers(federation: string, filters: AnalyticsFilters) {
  return useQuery(classifiersQueryOptions(federation, filters));
}

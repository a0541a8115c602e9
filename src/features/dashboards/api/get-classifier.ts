import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type ClassifierDetail } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function classifierQueryOptions(federation: string, filters: AnalyticsFilters, code: string) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'classifier', code, filters],
    queryFn: () =>
      api<ClassifierDetail>(
        `/federations/${encodeURIComponent(federation)}/analytics/classifiers/${encodeURIComponent(code)}${filtersToSearch(filters)}`,
      ),
  });
}

export function useClassifier(federation: string, filters: AnalyticsFilters, code: string) {
  return useQuery(classifierQueryOptions(federation, filters, code));
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import type { FilterOptions } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function filterOptionsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'filter-options'],
    queryFn: () => api<FilterOptions>(`/federations/${encodeURIComponent(federation)}/analytics/filters`),
    staleTime: 5 * 60_000,
  });
}

export function useFilterOptions(federation: string) {
  return useQuery(filterOptionsQueryOptions(federation));
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import { filtersToSearch, type AnalyticsFilters, type MyAgreement } from '../../../../shared/schemas/analytics';
import { api } from '../../../lib/api-client';

export function myAgreementQueryOptions(federation: string, filters: AnalyticsFilters) {
  return queryOptions({
    queryKey: ['federations', federation, 'analytics', 'me', filters],
    queryFn: () => api<MyAgreement>(`/federations/${encodeURIComponent(federation)}/analytics/me${filtersToSearch(filters)}`),
  });
}

export function useMyAgreement(federation: string, filters: AnalyticsFilters) {
  return useQuery(myAgreementQueryOptions(federation, filters));
}

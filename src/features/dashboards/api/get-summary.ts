import { queryOptions, useQuery } from '@tanstack/react-query';
import type { FederationSummary } from '../../../../shared/schemas/federation';
import { api } from '../../../lib/api-client';

export function summaryQueryOptions(federation: string) {
  return queryOptions({
    queryKey: ['federations', federation, 'summary'],
    queryFn: () => api<FederationSummary>(`/federations/${encodeURIComponent(federation)}/summary`),
  });
}

export function useSummary(federation: string) {
  return useQuery(summaryQueryOptions(federation));
}

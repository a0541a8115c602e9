import { queryOptions, useQuery } from '@tanstack/react-query';
import type { OwnerFederation } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';

export const ownerKey = ['owner'] as const;

export function ownerFederationsQueryOptions() {
  return queryOptions({
    queryKey: [...ownerKey, 'federations'],
    queryFn: () => api<{ federations: OwnerFederation[] }>('/owner/federations').then((r) => r.federations),
  });
}

export function useOwnerFederations() {
  return useQuery(ownerFederationsQueryOptions());
}

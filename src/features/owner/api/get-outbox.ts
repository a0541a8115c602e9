import { queryOptions, useQuery } from '@tanstack/react-query';
import type { OutboxMessage } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { ownerKey } from './get-federations';

/** Every e-mail kept by the local mail server (outside production only). */
export function ownerOutboxQueryOptions() {
  return queryOptions({
    queryKey: [...ownerKey, 'outbox'],
    queryFn: () => api<{ messages: OutboxMessage[] }>('/owner/outbox').then((r) => r.messages),
    staleTime: 0,
  });
}

export function useOwnerOutbox(enabled = true) {
  return useQuery({ ...ownerOutboxQueryOptions(), enabled });
}

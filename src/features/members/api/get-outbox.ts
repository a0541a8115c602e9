import { queryOptions, useQuery } from '@tanstack/react-query';
import type { OutboxMessage } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { membersKey } from './get-members';

/** The e-mails about the federation kept by the local mail server (outside production only). */
export function outboxQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...membersKey(federation), 'outbox'],
    queryFn: () => api<{ messages: OutboxMessage[] }>(`/federations/${encodeURIComponent(federation)}/outbox`).then((r) => r.messages),
    staleTime: 0,
  });
}

export function useOutbox(federation: string) {
  return useQuery(outboxQueryOptions(federation));
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import type { MembersView } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';

/** Every query of a federation's people and systems shares this key prefix. */
export const membersKey = (federation: string) => ['federations', federation, 'members'] as const;

export function membersQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...membersKey(federation), 'list'],
    queryFn: () => api<MembersView>(`/federations/${encodeURIComponent(federation)}/members`),
  });
}

export function useMembers(federation: string) {
  return useQuery(membersQueryOptions(federation));
}

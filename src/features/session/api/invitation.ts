import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AcceptNewUser, AcceptResult, InvitationPreview } from '../../../../shared/schemas/access';
import type { SessionView } from '../../../../shared/schemas/session';
import { api } from '../../../lib/api-client';
import { sessionQueryOptions } from '../../../lib/session';

/** What an invitation link offers (410 when it expired or was used). */
export function invitationQueryOptions(token: string) {
  return queryOptions({
    queryKey: ['invitations', token],
    queryFn: () => api<InvitationPreview>(`/invitations/${encodeURIComponent(token)}`),
    staleTime: Infinity,
  });
}

export function useInvitation(token: string) {
  return useQuery(invitationQueryOptions(token));
}

/** Accepts the invitation; a new account is signed in, and the session is reloaded. */
export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: AcceptNewUser | Record<string, never>) =>
      api<AcceptResult>(`/invitations/${encodeURIComponent(token)}/accept`, { method: 'POST', body }),
    onSuccess: async (result) => {
      // The accepted link now answers 410: keep its cached preview while the page is still shown,
      // so nothing asks for it again; every other query starts afresh for the new session.
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== 'invitations' });
      if (!result.signedIn) return;
      const session = await api<SessionView>('/session');
      queryClient.setQueryData(sessionQueryOptions().queryKey, session);
    },
  });
}

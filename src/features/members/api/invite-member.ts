import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { InvitationView, Invite } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { membersKey } from './get-members';

export function useInviteMember(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: Invite) =>
      api<{ invitation: InvitationView; mailSent: boolean }>(`/federations/${encodeURIComponent(federation)}/invitations`, {
        method: 'POST',
        body,
      }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: membersKey(federation) }),
  });
}

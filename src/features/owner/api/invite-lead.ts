import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { InvitationView, LeadInvite } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { ownerKey } from './get-federations';

/** The site owner invites a lead to an existing federation (POST /owner/federations/:slug/leads). */
export function useInviteLead() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ slug, body }: { slug: string; body: LeadInvite }) =>
      api<{ invitation: InvitationView; mailSent: boolean }>(`/owner/federations/${encodeURIComponent(slug)}/leads`, {
        method: 'POST',
        body,
      }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ownerKey }),
  });
}

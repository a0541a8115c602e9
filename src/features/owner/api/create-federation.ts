import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { FederationCreate, InvitationView } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { ownerKey } from './get-federations';

export function useCreateFederation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: FederationCreate) =>
      api<{ federation: { id: number; slug: string; name: string }; invitation: InvitationView; mailSent: boolean }>('/owner/federations', {
        method: 'POST',
        body,
      }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ownerKey }),
  });
}

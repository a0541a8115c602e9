import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreatedToken, TokenCreate } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { membersKey } from './get-members';

export function useCreateApiToken(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: TokenCreate) =>
      api<CreatedToken>(`/federations/${encodeURIComponent(federation)}/api-tokens`, { method: 'POST', body }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: membersKey(federation) }),
  });
}

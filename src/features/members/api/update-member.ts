import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { MemberUpdate, MemberView } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { membersKey } from './get-members';

export function useUpdateMember(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, update }: { userId: number; update: MemberUpdate }) =>
      api<MemberView>(`/federations/${encodeURIComponent(federation)}/members/${userId}`, { method: 'PATCH', body: update }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: membersKey(federation) }),
  });
}

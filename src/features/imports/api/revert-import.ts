import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ImportView } from '../../../../shared/schemas/imports';
import { api } from '../../../lib/api-client';
import { federationPath } from './keys';

/** Reverts a committed import; every figure of the federation is fetched again afterwards. */
export function useRevertImport(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (importId: number) => api<ImportView>(`${federationPath(federation)}/imports/${importId}/revert`, { method: 'POST' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['federations', federation] }),
  });
}

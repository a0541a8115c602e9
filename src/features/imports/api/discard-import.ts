import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { federationPath } from './keys';
import { importsQueryOptions } from './list-imports';

export function useDiscardImport(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (importId: number) => api<void>(`${federationPath(federation)}/imports/${importId}`, { method: 'DELETE' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: importsQueryOptions(federation).queryKey }),
  });
}

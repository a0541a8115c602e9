import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SaveMapping, SavedMapping } from '../../../../shared/schemas/imports';
import { api } from '../../../lib/api-client';
import { federationPath } from './keys';
import { mappingsQueryOptions } from './list-mappings';

export function useSaveMapping(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SaveMapping) => api<SavedMapping>(`${federationPath(federation)}/import-mappings`, { method: 'POST', body }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: mappingsQueryOptions(federation).queryKey }),
  });
}

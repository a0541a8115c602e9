import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SavedMappingList } from '../../../../shared/schemas/imports';
import { api } from '../../../lib/api-client';
import { federationPath, importsKey } from './keys';

export function mappingsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...importsKey(federation), 'mappings'],
    queryFn: () => api<SavedMappingList>(`${federationPath(federation)}/import-mappings`),
  });
}

export function useMappings(federation: string) {
  return useQuery(mappingsQueryOptions(federation));
}

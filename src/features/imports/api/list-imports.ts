import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ImportList } from '../../../../shared/schemas/imports';
import { api } from '../../../lib/api-client';
import { federationPath, importsKey } from './keys';

export function importsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...importsKey(federation), 'history'],
    queryFn: () => api<ImportList>(`${federationPath(federation)}/imports`),
  });
}

export function useImports(federation: string) {
  return useQuery(importsQueryOptions(federation));
}

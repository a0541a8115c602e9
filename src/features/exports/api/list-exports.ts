import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ExportView } from '../../../../shared/schemas/exports';
import { api } from '../../../lib/api-client';
import { exportsKey } from './get-export-options';

/** The caller's own exports, newest first. */
export function myExportsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...exportsKey(federation), 'mine'],
    queryFn: () => api<ExportView[]>(`/federations/${encodeURIComponent(federation)}/exports`),
  });
}

export function useMyExports(federation: string) {
  return useQuery(myExportsQueryOptions(federation));
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ExportOptions } from '../../../../shared/schemas/exports';
import { api } from '../../../lib/api-client';

export const exportsKey = (federation: string) => ['federations', federation, 'exports'] as const;

export function exportOptionsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...exportsKey(federation), 'options'],
    queryFn: () => api<ExportOptions>(`/federations/${encodeURIComponent(federation)}/exports/options`),
  });
}

export function useExportOptions(federation: string) {
  return useQuery(exportOptionsQueryOptions(federation));
}

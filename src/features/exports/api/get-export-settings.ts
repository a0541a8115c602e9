import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ExportSettingsView } from '../../../../shared/schemas/exports';
import { api } from '../../../lib/api-client';
import { exportsKey } from './get-export-options';

/** k and every study (leads only). */
export function exportSettingsQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...exportsKey(federation), 'settings'],
    queryFn: () => api<ExportSettingsView>(`/federations/${encodeURIComponent(federation)}/exports/settings`),
  });
}

export function useExportSettings(federation: string, enabled = true) {
  return useQuery({ ...exportSettingsQueryOptions(federation), enabled });
}

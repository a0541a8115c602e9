import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ExportSettings, ExportSettingsView } from '../../../../shared/schemas/exports';
import { api } from '../../../lib/api-client';
import { exportsKey } from './get-export-options';

export function useSaveExportSettings(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ExportSettings) =>
      api<ExportSettingsView>(`/federations/${encodeURIComponent(federation)}/exports/settings`, { method: 'PUT', body }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: exportsKey(federation) }),
  });
}

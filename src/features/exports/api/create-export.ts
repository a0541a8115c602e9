import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ExportRequest, ExportView } from '../../../../shared/schemas/exports';
import { api } from '../../../lib/api-client';
import { myExportsQueryOptions } from './list-exports';

export function useCreateExport(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: ExportRequest) =>
      api<ExportView>(`/federations/${encodeURIComponent(federation)}/exports`, { method: 'POST', body }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: myExportsQueryOptions(federation).queryKey }),
  });
}

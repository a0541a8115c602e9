import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreateStudy, StudyView } from '../../../../shared/schemas/exports';
import { api } from '../../../lib/api-client';
import { exportsKey } from './get-export-options';

export function useCreateStudy(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateStudy) =>
      api<StudyView>(`/federations/${encodeURIComponent(federation)}/exports/studies`, { method: 'POST', body }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: exportsKey(federation) }),
  });
}

import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { StudyView } from '../../../../shared/schemas/exports';
import { api } from '../../../lib/api-client';
import { exportsKey } from './get-export-options';

export function useCloseStudy(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (studyId: number) =>
      api<StudyView>(`/federations/${encodeURIComponent(federation)}/exports/studies/${studyId}/close`, { method: 'POST' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: exportsKey(federation) }),
  });
}

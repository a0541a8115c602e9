import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AnswerInput, AnswerView } from '../../../../shared/schemas/exercises';
import { api } from '../../../lib/api-client';

export interface AnswerSaved {
  answer: AnswerView;
  answered: number;
  finished: boolean;
}

/** Saves the caller's answer to one case (classifiers, while the exercise is open). */
export function useSaveAnswer(federation: string, exerciseId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ caseId, answer }: { caseId: number; answer: AnswerInput }) =>
      api<AnswerSaved>(`/federations/${encodeURIComponent(federation)}/exercises/${exerciseId}/answers/${caseId}`, {
        method: 'PUT',
        body: answer,
      }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['federations', federation, 'exercises'] }),
  });
}

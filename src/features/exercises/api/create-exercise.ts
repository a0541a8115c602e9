import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ExerciseDetail, ExerciseInput } from '../../../../shared/schemas/exercises';
import { api } from '../../../lib/api-client';

/** Creates a draft exercise (leads). */
export function useCreateExercise(federation: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ExerciseInput) =>
      api<ExerciseDetail>(`/federations/${encodeURIComponent(federation)}/exercises`, { method: 'POST', body: input }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['federations', federation, 'exercises'] }),
  });
}

import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ExerciseDetail } from '../../../../shared/schemas/exercises';
import { api } from '../../../lib/api-client';

/** Opens a draft (invitations go out) or closes an open exercise (scores, results notice). Leads. */
export function useChangeExerciseStatus(federation: string, id: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (action: 'open' | 'close') =>
      api<ExerciseDetail>(`/federations/${encodeURIComponent(federation)}/exercises/${id}/${action}`, { method: 'POST' }),
    onSuccess: (detail) => {
      queryClient.setQueryData(['federations', federation, 'exercises', 'detail', id], detail);
      return queryClient.invalidateQueries({ queryKey: ['federations', federation, 'exercises', 'list'] });
    },
  });
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ExerciseDetail } from '../../../../shared/schemas/exercises';
import { api } from '../../../lib/api-client';

export function exerciseQueryOptions(federation: string, id: number) {
  return queryOptions({
    queryKey: ['federations', federation, 'exercises', 'detail', id],
    queryFn: () => api<ExerciseDetail>(`/federations/${encodeURIComponent(federation)}/exercises/${id}`),
  });
}

export function useExercise(federation: string, id: number) {
  return useQuery(exerciseQueryOptions(federation, id));
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ExerciseList } from '../../../../shared/schemas/exercises';
import { api } from '../../../lib/api-client';

export function exercisesQueryOptions(federation: string) {
  return queryOptions({
    queryKey: ['federations', federation, 'exercises', 'list'],
    queryFn: () => api<ExerciseList>(`/federations/${encodeURIComponent(federation)}/exercises`),
  });
}

export function useExercises(federation: string) {
  return useQuery(exercisesQueryOptions(federation));
}

import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ExerciseProposal } from '../../../../shared/schemas/exercises';
import { api } from '../../../lib/api-client';

export type ProposalSource = { flag: number } | { boundary: number };

export function proposalQueryOptions(federation: string, source: ProposalSource | null) {
  const query = source === null ? '' : 'flag' in source ? `flag=${source.flag}` : `boundary=${source.boundary}`;
  return queryOptions({
    queryKey: ['federations', federation, 'exercises', 'proposal', query],
    queryFn: () => api<ExerciseProposal>(`/federations/${encodeURIComponent(federation)}/exercises/proposal?${query}`),
    enabled: source !== null,
    staleTime: Infinity,
  });
}

/** A draft to start from a flag or a boundary (leads). */
export function useProposal(federation: string, source: ProposalSource | null) {
  return useQuery(proposalQueryOptions(federation, source));
}

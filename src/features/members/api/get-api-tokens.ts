import { queryOptions, useQuery } from '@tanstack/react-query';
import type { TokenView } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';
import { membersKey } from './get-members';

export function apiTokensQueryOptions(federation: string) {
  return queryOptions({
    queryKey: [...membersKey(federation), 'api-tokens'],
    queryFn: () => api<{ tokens: TokenView[] }>(`/federations/${encodeURIComponent(federation)}/api-tokens`).then((r) => r.tokens),
  });
}

export function useApiTokens(federation: string) {
  return useQuery(apiTokensQueryOptions(federation));
}

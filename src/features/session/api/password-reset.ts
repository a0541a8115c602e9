import { queryOptions, useMutation, useQuery } from '@tanstack/react-query';
import type { ResetPassword, ResetRequest } from '../../../../shared/schemas/access';
import { api } from '../../../lib/api-client';

export function useRequestPasswordReset() {
  return useMutation({
    mutationFn: (body: ResetRequest) => api<{ message: string }>('/password-resets', { method: 'POST', body }),
  });
}

/** The address a reset link is for (410 when it expired or was used). */
export function passwordResetQueryOptions(token: string) {
  return queryOptions({
    queryKey: ['password-resets', token],
    queryFn: () => api<{ email: string; expiresAt: string }>(`/password-resets/${encodeURIComponent(token)}`),
    staleTime: Infinity,
  });
}

export function usePasswordReset(token: string) {
  return useQuery(passwordResetQueryOptions(token));
}

export function useResetPassword(token: string) {
  return useMutation({
    mutationFn: (body: ResetPassword) => api<void>(`/password-resets/${encodeURIComponent(token)}`, { method: 'POST', body }),
  });
}

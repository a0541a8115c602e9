import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SessionView, SignedOutView, SignIn } from '../../shared/schemas/session';
import { api, ApiError } from './api-client';

/** The signed-in user and their memberships; null when nobody is signed in. */
export function sessionQueryOptions() {
  return queryOptions({
    queryKey: ['session'],
    queryFn: async (): Promise<SessionView | null> => {
      try {
        // Without a session the server answers 200 {user: null}: the probe is not an error.
        const session = await api<SessionView | SignedOutView>('/session');
        return session.user === null ? null : session;
      } catch (error) {
        if (error instanceof ApiError && error.status === 401) return null;
        throw error;
      }
    },
    staleTime: 60_000,
  });
}

export function useSession() {
  return useQuery(sessionQueryOptions());
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: SignIn) => api<SessionView>('/session', { method: 'POST', body }),
    onSuccess: (session) => {
      queryClient.clear();
      queryClient.setQueryData(sessionQueryOptions().queryKey, session);
    },
  });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api<void>('/session', { method: 'DELETE' }),
    onSuccess: () => {
      queryClient.clear();
      queryClient.setQueryData(sessionQueryOptions().queryKey, null);
    },
  });
}

import { QueryClient } from '@tanstack/react-query';
import { ApiError } from './api-client';

/** A network error or a server error is worth two more tries; a 4xx answer is final. */
export function shouldRetry(failures: number, error: unknown): boolean {
  if (error instanceof ApiError && error.status >= 400 && error.status < 500) return false;
  return failures < 2;
}

export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        retry: shouldRetry,
        retryDelay: (attempt) => Math.min(500 * 2 ** attempt, 3000),
        // Fetch whatever the browser thinks of the connection: offline, a query fails and shows its
        // error with a retry instead of pausing on "Loading…" for good.
        networkMode: 'always',
        refetchOnWindowFocus: false,
      },
      mutations: { networkMode: 'always' },
    },
  });
}

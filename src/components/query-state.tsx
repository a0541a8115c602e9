import type { UseQueryResult } from '@tanstack/react-query';
import { ErrorState, Loading } from './status';

type QueryLike<T> = Pick<UseQueryResult<T>, 'isPending' | 'isError' | 'error' | 'data' | 'refetch' | 'isFetching'>;

/**
 * The three states of every query on a page: loading, an error with a "Try again" button, or
 * the content. Queries retry twice on a network or server error and then fail (see
 * src/lib/query-client.ts), so a dropped connection ends here rather than loading for good.
 */
export function QueryState<T>({
  query,
  children,
  loadingLabel,
  what,
}: {
  query: QueryLike<T>;
  children: (data: T) => React.ReactNode;
  loadingLabel?: string;
  /** What the query loads, for the error ("The members could not be loaded."). */
  what?: string;
}) {
  if (query.isPending && !query.isError) return <Loading label={loadingLabel} />;
  if (query.isError || query.data === undefined)
    return <ErrorState error={query.error} what={what} retrying={query.isFetching} onRetry={() => void query.refetch()} />;
  return <>{children(query.data)}</>;
}

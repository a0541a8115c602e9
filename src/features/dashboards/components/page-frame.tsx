import { Caution } from '../../../components/caution';
import { ErrorNotice, Loading } from '../../../components/status';
import { FilterBar } from './filter-bar';
import type { AnalyticsFiltersState } from './use-analytics-filters';

/** The frame of every dashboard page: heading, filters, the figures, and the caution. */
export function PageFrame({
  title,
  intro,
  federation,
  filters,
  showMinShared,
  children,
}: {
  title: string;
  intro: React.ReactNode;
  federation: string;
  filters: AnalyticsFiltersState | null;
  showMinShared?: boolean;
  children: React.ReactNode;
}) {
  return (
    <div className="space-y-6">
      <div className="space-y-1">
        <h1>{title}</h1>
        <p className="max-w-3xl text-muted">{intro}</p>
      </div>
      {filters ? <FilterBar federation={federation} state={filters} showMinShared={showMinShared} /> : null}
      <Caution />
      {children}
    </div>
  );
}

/** Loading and error states of a query, or its content. */
export function QueryState<T>({ query, children }: { query: { isPending: boolean; isError: boolean; error: unknown; data: T | undefined }; children: (data: T) => React.ReactNode }) {
  if (query.isPending) return <Loading label="Computing…" />;
  if (query.isError || query.data === undefined) return <ErrorNotice error={query.error} />;
  return <>{children(query.data)}</>;
}

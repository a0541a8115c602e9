import { usePageTitle } from '../../../lib/page-title';
import { Caution } from '../../../components/caution';
import { QueryState as SharedQueryState } from '../../../components/query-state';
import { FilterBar } from './filter-bar';
import type { AnalyticsFiltersState } from './use-analytics-filters';

/** The frame of every dashboard page: heading (and the document title), filters, the figures, and the caution. */
export function PageFrame({
  title,
  documentTitle,
  intro,
  federation,
  filters,
  showMinShared,
  children,
}: {
  title: string;
  /** The page's name in the browser tab when it differs from the heading (default: the heading). */
  documentTitle?: string;
  intro: React.ReactNode;
  federation: string;
  filters: AnalyticsFiltersState | null;
  showMinShared?: boolean;
  children: React.ReactNode;
}) {
  usePageTitle(documentTitle ?? title);
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

/** The shared loading, error-with-retry and content states (src/components/query-state.tsx), with "Computing…" while figures load. */
export function QueryState<T>(props: Parameters<typeof SharedQueryState<T>>[0]) {
  return <SharedQueryState loadingLabel="Computing…" {...props} />;
}

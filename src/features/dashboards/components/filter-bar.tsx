import { useId } from 'react';
import { ASSESSMENT_KIND_LABELS } from '../../../../shared/schemas/common';
import { DEFAULT_MIN_SHARED } from '../../../../shared/schemas/analytics';
import { useFederation } from '../../../lib/use-federation';
import { useFilterOptions } from '../api/get-filter-options';
import type { AnalyticsFiltersState } from './use-analytics-filters';

/** The calendar quarters of a season starting in July of `year`: Q3 and Q4 of the year, Q1 and Q2 of the next. */
function quartersOfSeason(year: number): string[] {
  return [`${year}-Q3`, `${year}-Q4`, `${year + 1}-Q1`, `${year + 1}-Q2`];
}

/**
 * The filters of every dashboard view: season, quarter or (not for researchers) date range,
 * event (leads and classifiers), competition category, assessment kind and, where pairs are
 * shown, the minimum shared assessments. Researchers filter by whole seasons and quarters only:
 * the server refuses dates and events from them (docs/decisions/0007-research-export.md).
 * Changes go to the URL at once.
 */
export function FilterBar({
  federation,
  state,
  showMinShared = false,
}: {
  federation: string;
  state: AnalyticsFiltersState;
  showMinShared?: boolean;
}) {
  const options = useFilterOptions(federation);
  const research = useFederation()?.role === 'researcher';
  const id = useId();
  const { filters, set, clear, problems } = state;
  const quarters = (options.data?.seasons ?? [])
    .filter((s) => !filters.season || String(s.year) === filters.season)
    .flatMap((s) => quartersOfSeason(s.year));
  const events = (options.data?.events ?? []).filter((e) => {
    if (!filters.season) return true;
    const season = options.data?.seasons.find((s) => String(s.year) === filters.season);
    return !season || e.season === season.label;
  });
  const active = Object.values(filters).some((v) => v !== undefined);

  return (
    <section aria-label="Filters" className="card py-4">
      <form className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-8" onSubmit={(e) => e.preventDefault()}>
        <div className="field">
          <label htmlFor={`${id}-season`}>Season</label>
          <select
            id={`${id}-season`}
            className="input"
            value={filters.season ?? ''}
            onChange={(e) => set({ season: e.target.value, event: undefined, quarter: undefined })}
          >
            <option value="">All seasons</option>
            {options.data?.seasons.map((s) => (
              <option key={s.year} value={String(s.year)}>
                {s.label}
              </option>
            ))}
          </select>
        </div>
        <div className="field">
          <label htmlFor={`${id}-quarter`}>Quarter</label>
          <select id={`${id}-quarter`} className="input" value={filters.quarter ?? ''} onChange={(e) => set({ quarter: e.target.value })}>
            <option value="">All quarters</option>
            {quarters.map((q) => (
              <option key={q} value={q}>
                {q}
              </option>
            ))}
          </select>
        </div>
        {research ? null : (
          <>
            <div className="field">
              <label htmlFor={`${id}-from`}>From</label>
              <input
                id={`${id}-from`}
                className="input"
                type="date"
                value={filters.from ?? ''}
                onChange={(e) => set({ from: e.target.value })}
              />
            </div>
            <div className="field">
              <label htmlFor={`${id}-to`}>To</label>
              <input id={`${id}-to`} className="input" type="date" value={filters.to ?? ''} onChange={(e) => set({ to: e.target.value })} />
            </div>
          </>
        )}
        {options.data && options.data.events.length > 0 ? (
          <div className="field">
            <label htmlFor={`${id}-event`}>Event</label>
            <select id={`${id}-event`} className="input" value={filters.event ?? ''} onChange={(e) => set({ event: e.target.value })}>
              <option value="">All events</option>
              {events.map((e) => (
                <option key={e.code} value={e.code}>
                  {e.name}
                </option>
              ))}
            </select>
          </div>
        ) : null}
        <div className="field">
          <label htmlFor={`${id}-category`}>Category</label>
          <select
            id={`${id}-category`}
            className="input"
            value={filters.category ?? ''}
            onChange={(e) => set({ category: e.target.value })}
          >
            <option value="">All categories</option>
            {options.data?.categories.map((c) => (
              <option key={c} value={c}>
                {c}
              </option>
            ))}
          </select>
        </div>
        <div className="field">
          <label htmlFor={`${id}-kind`}>Assessment kind</label>
          <select id={`${id}-kind`} className="input" value={filters.kind ?? ''} onChange={(e) => set({ kind: e.target.value })}>
            <option value="">All kinds</option>
            {Object.entries(ASSESSMENT_KIND_LABELS).map(([k, label]) => (
              <option key={k} value={k}>
                {label}
              </option>
            ))}
          </select>
        </div>
        {showMinShared ? (
          <div className="field">
            <label htmlFor={`${id}-min`}>Min. shared assessments</label>
            <input
              id={`${id}-min`}
              className="input"
              type="number"
              min={1}
              max={1000}
              inputMode="numeric"
              value={filters.minShared ?? DEFAULT_MIN_SHARED}
              onChange={(e) => set({ minShared: e.target.value === String(DEFAULT_MIN_SHARED) ? undefined : e.target.value })}
            />
          </div>
        ) : null}
      </form>
      <div className="mt-3 flex flex-wrap items-center gap-3 text-sm">
        {problems.map((p) => (
          <p key={p.field + p.message} role="alert" className="field-error">
            Filter “{p.field}” ignored: {p.message}
          </p>
        ))}
        {active ? (
          <button type="button" className="btn btn-quiet min-h-9 py-1 text-sm" onClick={clear}>
            Clear filters
          </button>
        ) : (
          <span className="text-muted">
            {research
              ? 'Showing the federation’s assessments without the groups (quarter, kind and category) of too few athletes to be shown.'
              : 'Showing all of the federation’s assessments.'}
          </span>
        )}
      </div>
    </section>
  );
}

import { useMemo } from 'react';
import { useSearchParams } from 'react-router';
import { ANALYTICS_FILTER_KEYS, analyticsFiltersSchema, type AnalyticsFilters } from '../../../../shared/schemas/analytics';

export interface AnalyticsFiltersState {
  filters: AnalyticsFilters;
  /** Problems with the filters in the address (those filters are ignored). */
  problems: { field: string; message: string }[];
  set: (changes: Partial<Record<(typeof ANALYTICS_FILTER_KEYS)[number], string | undefined>>) => void;
  clear: () => void;
}

/**
 * The dashboards' filters, kept in the URL's search params (so a view can be shared as a link)
 * and validated with the same zod schema as the API. Invalid filters are dropped and reported.
 */
export function useAnalyticsFilters(): AnalyticsFiltersState {
  const [params, setParams] = useSearchParams();
  const raw = useMemo(() => {
    const out: Record<string, string> = {};
    for (const key of ANALYTICS_FILTER_KEYS) {
      const v = params.get(key);
      if (v !== null && v !== '') out[key] = v;
    }
    return out;
  }, [params]);
  const key = JSON.stringify(raw);
  const parsed = useMemo(() => {
    const result = analyticsFiltersSchema.safeParse(raw);
    if (result.success) return { filters: result.data, problems: [] };
    const bad = new Set(result.error.issues.map((i) => String(i.path[0] ?? '')));
    const kept = Object.fromEntries(Object.entries(raw).filter(([k]) => !bad.has(k)));
    const retry = analyticsFiltersSchema.safeParse(kept);
    return {
      filters: retry.success ? retry.data : {},
      problems: result.error.issues.map((i) => ({ field: String(i.path[0] ?? ''), message: i.message })),
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key]);
  return {
    ...parsed,
    set: (changes) =>
      setParams(
        (prev) => {
          const next = new URLSearchParams(prev);
          for (const [k, v] of Object.entries(changes)) {
            if (v === undefined || v === '') next.delete(k);
            else next.set(k, v);
          }
          return next;
        },
        { replace: true },
      ),
    clear: () =>
      setParams(
        (prev) => {
          const next = new URLSearchParams(prev);
          for (const k of ANALYTICS_FILTER_KEYS) next.delete(k);
          return next;
        },
        { replace: true },
      ),
  };
}

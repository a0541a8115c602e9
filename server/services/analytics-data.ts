/**
 * The data behind the agreement dashboards: a federation's ratings as the engine's RatingSet,
 * filtered by the dashboards' filters, and a small cache of computed results.
 *
 * Everything cached is keyed on the federation's data version (server/services/data-version.ts),
 * so an import invalidates it without anyone having to know which results exist. Caches live
 * per AppContext (a process may hold several apps, e.g. in tests).
 */
import {
  ASSESSMENT_KINDS,
  buildRatingSet,
  dayToQuarter,
  filterRatingSet,
  seasonLabel,
  seasonRange,
  subsetRatingSet,
  isoDateToSeasonYear,
  type AssessmentFilter,
  type RatingRow,
  type RatingSet,
} from '../analysis';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import { dataVersion } from './data-version';
import { DEFAULT_MIN_SHARED, type AnalyticsFilters, type FilterOptions } from '../../shared/schemas/analytics';
import { ASSESSMENT_KIND_LABELS, type AssessmentKind } from '../../shared/schemas/common';
import { cellKey, smallCells } from './research-cells';

/** Event code used for assessments recorded without an event. */
export const NO_EVENT = '(no event)';

export interface FederationData {
  version: number;
  set: RatingSet;
  /** Per athlete index of the set: the athlete's competition category. */
  athleteCategory: string[];
  /** Classifier code → roster id and display name. */
  classifiers: Map<string, { id: number; name: string }>;
  events: { code: string; name: string; startsOn: string | null }[];
  categories: string[];
}

interface CacheEntry {
  version: number;
  value: unknown;
}

const MAX_ENTRIES = 400;
const caches = new WeakMap<AppContext, Map<string, CacheEntry>>();

function cacheOf(ctx: AppContext): Map<string, CacheEntry> {
  let cache = caches.get(ctx);
  if (!cache) caches.set(ctx, (cache = new Map<string, CacheEntry>()));
  return cache;
}

/**
 * The cached result for (federation, key) at the federation's current data version, computing
 * it when missing. Entries of older versions are dropped as new ones arrive.
 */
export function cached<T>(ctx: AppContext, federationId: number, key: string, compute: () => T): T {
  const version = dataVersion(ctx, federationId);
  const cache = cacheOf(ctx);
  const fullKey = `${federationId}|${key}`;
  const hit = cache.get(fullKey);
  if (hit && hit.version === version) {
    // Refresh recency (Map keeps insertion order).
    cache.delete(fullKey);
    cache.set(fullKey, hit);
    return hit.value as T;
  }
  const value = compute();
  cache.set(fullKey, { version, value });
  // Least recently used first (Map keeps insertion order; hits are moved to the end).
  for (const k of cache.keys()) {
    if (cache.size <= MAX_ENTRIES) break;
    cache.delete(k);
  }
  return value;
}

interface JoinedRow {
  external_id: string;
  athlete_code: string;
  category: string;
  event_code: string | null;
  assessed_on: string;
  classifier_code: string;
  sport_class: number;
  panel_class: number | null;
  kind: AssessmentKind;
}

/** Reads the federation's ratings, rosters and events into a RatingSet (cached per data version). */
export function federationData(ctx: AppContext, federation: { id: number; scaleMin: number; scaleMax: number }): FederationData {
  return cached(ctx, federation.id, 'data', () => {
    const version = dataVersion(ctx, federation.id);
    const rows = ctx.sqlite
      .prepare(
        `select a.external_id, ath.code as athlete_code, ath.category, e.code as event_code, a.assessed_on,
                c.code as classifier_code, r.sport_class, a.panel_class, a.kind
           from ratings r
           join assessments a on a.id = r.assessment_id
           join athletes ath on ath.id = a.athlete_id
           join classifiers c on c.id = r.classifier_id
           left join events e on e.id = a.event_id
          where a.federation_id = ?
          order by a.assessed_on, a.id, r.id`,
      )
      .all(federation.id) as JoinedRow[];
    const ratingRows: RatingRow[] = rows.map((r) => ({
      assessmentId: r.external_id,
      athleteCode: r.athlete_code,
      eventCode: r.event_code ?? NO_EVENT,
      assessedOn: r.assessed_on,
      classifierCode: r.classifier_code,
      sportClass: r.sport_class,
      panelClass: r.panel_class,
      kind: r.kind,
    }));
    const set = buildRatingSet(ratingRows, { min: federation.scaleMin, max: federation.scaleMax });
    const categoryOf = new Map(rows.map((r) => [r.athlete_code, r.category]));
    const athleteCategory = set.athleteCodes.map((code) => categoryOf.get(code) ?? 'open');
    const roster = ctx.sqlite
      .prepare('select id, code, display_name from classifiers where federation_id = ? order by code')
      .all(federation.id) as {
      id: number;
      code: string;
      display_name: string;
    }[];
    const events = (
      ctx.sqlite
        .prepare('select code, name, starts_on from events where federation_id = ? order by starts_on, code')
        .all(federation.id) as {
        code: string;
        name: string;
        starts_on: string | null;
      }[]
    ).map((e) => ({ code: e.code, name: e.name, startsOn: e.starts_on }));
    const categories = (
      ctx.sqlite.prepare('select distinct category from athletes where federation_id = ? order by category').all(federation.id) as {
        category: string;
      }[]
    ).map((r) => r.category);
    return {
      version,
      set,
      athleteCategory,
      classifiers: new Map(roster.map((c) => [c.code, { id: c.id, name: c.display_name }])),
      events,
      categories,
    };
  });
}

/**
 * Filters as the server applies them: the request's filters and, for researchers and read
 * tokens, the k below which whole cells (quarter × kind × category) are removed before anything
 * else (server/services/research-cells.ts). The extra field travels inside the filters object
 * through the services to `filteredSet` and `filterKey`, so every cached figure is keyed on it.
 */
export type ViewFilters = AnalyticsFilters & { minCellAthletes?: number };

/** The filters in a canonical text form (for cache keys). */
export function filterKey(filters: ViewFilters): string {
  return JSON.stringify([
    filters.season ?? '',
    filters.quarter ?? '',
    filters.from ?? '',
    filters.to ?? '',
    filters.event ?? '',
    filters.category ?? '',
    filters.kind ?? '',
    filters.minCellAthletes ?? 0,
  ]);
}

/** First and last day (ISO) of a calendar quarter written 2024-Q3. */
export function quarterRange(quarter: string): { from: string; to: string } {
  const year = Number(quarter.slice(0, 4));
  const q = Number(quarter.slice(-1));
  const from = `${year}-${String(q * 3 - 2).padStart(2, '0')}-01`;
  const to = new Date(Date.UTC(year, q * 3, 0)).toISOString().slice(0, 10);
  return { from, to };
}

/**
 * The federation's set without the assessments of cells held by fewer than k athletes: what a
 * researcher's every figure starts from (cached per data version and k).
 */
export function researchBaseSet(ctx: AppContext, data: FederationData, federationId: number, k: number): RatingSet {
  return cached(ctx, federationId, `research-base|${k}`, () => {
    const set = data.set;
    const cellOf = (a: number) => cellKey(dayToQuarter(set.day[a]), ASSESSMENT_KINDS[set.kind[a]], data.athleteCategory[set.athlete[a]]);
    const small = smallCells(
      Array.from({ length: set.assessmentCount }, (_, a) => ({ cell: cellOf(a), athlete: set.athlete[a] })),
      k,
    );
    return small.size === 0 ? set : subsetRatingSet(set, (a) => !small.has(cellOf(a)));
  });
}

/** The minimum shared assessments of a pair to be shown with a value. */
export function minSharedOf(filters: AnalyticsFilters): number {
  return filters.minShared ?? DEFAULT_MIN_SHARED;
}

/** The federation's ratings narrowed by the filters (cached per data version and filter set). */
export function filteredSet(ctx: AppContext, data: FederationData, federationId: number, filters: ViewFilters): RatingSet {
  return cached(ctx, federationId, `set|${filterKey(filters)}`, () => {
    const f: AssessmentFilter = {};
    let from = filters.from;
    let to = filters.to;
    for (const range of [
      filters.season ? seasonRange(Number(filters.season)) : null,
      filters.quarter ? quarterRange(filters.quarter) : null,
    ]) {
      if (!range) continue;
      from = from && from > range.from ? from : range.from;
      to = to && to < range.to ? to : range.to;
    }
    if (from) f.from = from;
    if (to) f.to = to;
    if (filters.event) f.eventCodes = [filters.event];
    if (filters.kind) f.kinds = [filters.kind];
    const base = filters.minCellAthletes ? researchBaseSet(ctx, data, federationId, filters.minCellAthletes) : data.set;
    let set = filterRatingSet(base, f);
    if (filters.category) {
      const wanted = filters.category;
      set = subsetRatingSet(set, (a, s) => data.athleteCategory[s.athlete[a]] === wanted);
    }
    return set;
  });
}

/** What the filter bar offers: seasons with data, events, categories and kinds. */
export function filterOptions(data: FederationData, set: RatingSet = data.set): FilterOptions {
  const years = new Set<number>();
  for (let a = 0; a < set.assessmentCount; a++) {
    const y = isoDateToSeasonYear(new Date(set.day[a] * 86_400_000).toISOString().slice(0, 10));
    if (y !== null) years.add(y);
  }
  return {
    seasons: [...years].sort((a, b) => a - b).map((year) => ({ year, label: seasonLabel(year), ...seasonRange(year) })),
    events: data.events.map((e) => {
      const y = e.startsOn ? isoDateToSeasonYear(e.startsOn) : null;
      return { code: e.code, name: e.name, season: y === null ? null : seasonLabel(y) };
    }),
    categories: data.categories,
    kinds: Object.keys(ASSESSMENT_KIND_LABELS) as AssessmentKind[],
    defaultMinShared: DEFAULT_MIN_SHARED,
  };
}

/** Checks a classifier code exists in the federation's roster (404 otherwise). */
export function requireClassifier(data: FederationData, code: string): { id: number; name: string } {
  const c = data.classifiers.get(code);
  if (!c) throw new HttpError(404, 'not_found', `The classifier ${code} was not found`);
  return c;
}

/**
 * Fewest athletes a filtered view must hold before a non-lead sees its aggregates: smaller groups
 * could let a reader work out individual ratings (docs/decisions/0006-dashboards-who-sees-what.md).
 */
export const MIN_ATHLETES_FOR_AGGREGATES = 10;

/** Athletes in the filtered set (cached with it). */
export function athletesInFilter(ctx: AppContext, data: FederationData, federationId: number, filters: ViewFilters): number {
  return cached(ctx, federationId, `athletes|${filterKey(filters)}`, () => {
    const set = filteredSet(ctx, data, federationId, filters);
    return new Set(set.athlete).size;
  });
}

/** The roster code of a classifier (by id), or null when there is none. */
export async function classifierCodeOf(ctx: AppContext, classifierId: number): Promise<string | null> {
  const row = await ctx.db.selectFrom('classifiers').select('code').where('id', '=', classifierId).executeTakeFirst();
  return row?.code ?? null;
}

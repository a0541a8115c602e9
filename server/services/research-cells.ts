/**
 * The unit of privacy for researchers: the cell.
 *
 * A cell is (calendar quarter × assessment kind × competition category), counted over the whole
 * federation. A cell held by fewer than k athletes (the federation's k of the research-export
 * settings) is removed from every researcher's data — dashboards and exports alike — before any
 * filter, statistic or file is computed. Researchers can then only select unions of whole
 * cells (seasons are four quarters; kind and category pick cells), so whatever they subtract
 * from whatever, the difference is again a union of whole cells, each of at least k athletes
 * (docs/decisions/0007-research-export.md, "Differencing").
 *
 * Quarters, not seasons: quarters are a researcher's filter and label every series, so a
 * season-sized cell could still be split by quarter (a season minus three of its quarters).
 * Every season cell is a union of quarter cells, so the guarantee holds for seasons as well.
 */
import type { AssessmentKind } from '../../shared/schemas/common';
import type { FederationAccess } from '../auth/access';
import type { Db } from '../db/connection';

/** Researchers and read API tokens (role null) see whole cells only. */
export function isResearchView(access: Pick<FederationAccess, 'role'>): boolean {
  return access.role === 'researcher' || access.role === null;
}

/** Default k: the fewest athletes a cell may hold to be seen by researchers. */
export const DEFAULT_MIN_ATHLETES = 5;

/** Calendar quarter of an ISO date (YYYY-MM-DD or YYYY-MM), written "2024-Q3". */
export function quarterOfIsoDate(iso: string): string {
  const month = Number(iso.slice(5, 7));
  return `${iso.slice(0, 4)}-Q${Math.floor((month - 1) / 3) + 1}`;
}

/** The text key of a cell. */
export function cellKey(quarter: string, kind: AssessmentKind, category: string): string {
  return `${quarter}|${kind}|${category}`;
}

/** One assessment as the cell count needs it. */
export interface CellMember {
  cell: string;
  /** Any stable key of the athlete. */
  athlete: string | number;
}

/** The cells held by fewer than k distinct athletes. */
export function smallCells(members: Iterable<CellMember>, k: number): Set<string> {
  const athletes = new Map<string, Set<string | number>>();
  for (const m of members) {
    let set = athletes.get(m.cell);
    if (!set) athletes.set(m.cell, (set = new Set()));
    set.add(m.athlete);
  }
  const small = new Set<string>();
  for (const [cell, set] of athletes) if (set.size < k) small.add(cell);
  return small;
}

interface SqliteLike {
  prepare(sql: string): { get(...params: unknown[]): unknown; all(...params: unknown[]): unknown[] };
}

/** The federation's k (research_export_settings.min_athletes, or the default before first use). */
export function federationK(sqlite: SqliteLike, federationId: number): number {
  const row = sqlite.prepare('select min_athletes from research_export_settings where federation_id = ?').get(federationId) as
    { min_athletes: number } | undefined;
  return row?.min_athletes ?? DEFAULT_MIN_ATHLETES;
}

/**
 * The small cells of a federation read straight from its tables (assessments with at least one
 * rating; the category is the athlete's).
 */
export async function federationSmallCells(db: Db, federationId: number, k: number): Promise<Set<string>> {
  const rows = await db
    .selectFrom('assessments')
    .innerJoin('athletes', 'athletes.id', 'assessments.athlete_id')
    .select(['assessments.athlete_id', 'assessments.assessed_on', 'assessments.kind', 'athletes.category'])
    .where('assessments.federation_id', '=', federationId)
    .where((eb) => eb.exists(eb.selectFrom('ratings').select('ratings.id').whereRef('ratings.assessment_id', '=', 'assessments.id')))
    .execute();
  return smallCells(
    rows.map((r) => ({ cell: cellKey(quarterOfIsoDate(r.assessed_on), r.kind, r.category), athlete: r.athlete_id })),
    k,
  );
}

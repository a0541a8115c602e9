/**
 * The compact dataset every statistic reads: a RatingSet.
 *
 * Ratings are stored grouped by assessment (compressed-row layout): the ratings of assessment
 * `a` are positions `ratingStart[a]` … `ratingStart[a + 1] − 1` of the per-rating typed arrays.
 * Classes are class indices 0 … q − 1 on the federation's scale (`shared/scale`), never floats.
 * Codes (classifiers, athletes, events) are dictionary-encoded; the dictionaries are shared by
 * every subset, so a classifier keeps the same index in every filtered view.
 */
import { classCount, classIndex, formatClass, isOnScale, type ClassScale, type HalfPoints } from '../../shared/scale';
import { ASSESSMENT_KINDS, ASSESSMENT_KINDS_LIST, type AssessmentKind } from '../../shared/schemas/common';

export { ASSESSMENT_KINDS, type AssessmentKind };

/** One classifier's rating of one assessment, as read from a tidy file or the database. */
export interface RatingRow {
  assessmentId: string;
  athleteCode: string;
  eventCode: string;
  /** ISO date YYYY-MM-DD. */
  assessedOn: string;
  classifierCode: string;
  /** Sport class in half points (2 = 1.0 … 9 = 4.5). */
  sportClass: HalfPoints;
  /** The panel's final class for the assessment in half points, when recorded. */
  panelClass?: HalfPoints | null;
  kind?: AssessmentKind | null;
}

export interface RatingSet {
  readonly scale: ClassScale;
  /** Number of classes on the scale (8 for 1.0 … 4.5). */
  readonly q: number;
  readonly assessmentCount: number;
  readonly ratingCount: number;
  /** Dictionaries (shared between a set and its subsets). */
  readonly classifierCodes: readonly string[];
  readonly athleteCodes: readonly string[];
  readonly eventCodes: readonly string[];
  /** Per assessment: its identifier. */
  readonly assessmentIds: readonly string[];
  /** Per assessment: first rating position; length assessmentCount + 1. */
  readonly ratingStart: Int32Array;
  /** Per rating: assessment index. */
  readonly ratingAssessment: Int32Array;
  /** Per rating: classifier index into classifierCodes. */
  readonly ratingClassifier: Int32Array;
  /** Per rating: class index 0 … q − 1. */
  readonly ratingClass: Int32Array;
  /** Per assessment: panel final class index, −1 when not recorded. */
  readonly panelClass: Int32Array;
  /** Per assessment: date as whole days since 1970-01-01 (UTC). */
  readonly day: Int32Array;
  /** Per assessment: 0 = first, 1 = review, 2 = protest (index into ASSESSMENT_KINDS). */
  readonly kind: Uint8Array;
  /** Per assessment: athlete index into athleteCodes. */
  readonly athlete: Int32Array;
  /** Per assessment: event index into eventCodes. */
  readonly event: Int32Array;
}

/** A problem in the input rows, naming the row (0-based index into the rows), field and value. */
export class RatingInputError extends Error {
  readonly rowIndex: number;
  readonly field: keyof RatingRow;
  readonly fieldValue: string;
  constructor(rowIndex: number, field: keyof RatingRow, fieldValue: unknown, problem: string) {
    const shown = fieldValue === undefined || fieldValue === null ? '' : String(fieldValue);
    super(`row ${rowIndex + 1}: ${field} "${shown}" ${problem}`);
    this.name = 'RatingInputError';
    this.rowIndex = rowIndex;
    this.field = field;
    this.fieldValue = shown;
  }
}

const DAY_MS = 86_400_000;
const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Days since 1970-01-01 of an ISO date, or null if it is not a real calendar date. */
export function isoDateToDay(text: string): number | null {
  const m = ISO_DATE.exec(text);
  if (!m) return null;
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const t = Date.UTC(y, mo - 1, d);
  const back = new Date(t);
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d) return null;
  return Math.round(t / DAY_MS);
}

export function dayToIsoDate(day: number): string {
  return new Date(day * DAY_MS).toISOString().slice(0, 10);
}

/** Calendar quarter label of a day number, e.g. "2024-Q3". */
export function dayToQuarter(day: number): string {
  const d = new Date(day * DAY_MS);
  return `${d.getUTCFullYear()}-Q${Math.floor(d.getUTCMonth() / 3) + 1}`;
}

function intern(map: Map<string, number>, list: string[], key: string): number {
  let i = map.get(key);
  if (i === undefined) {
    i = list.length;
    map.set(key, i);
    list.push(key);
  }
  return i;
}

/**
 * Builds a RatingSet from plain rows. Assessments keep the order of their first row; ratings
 * keep row order within an assessment. Throws RatingInputError on a class off the scale, a bad
 * date or kind, a classifier rating the same assessment twice, or an assessment whose rows
 * disagree on athlete, event, date, panel class or kind.
 */
export function buildRatingSet(rows: readonly RatingRow[], scale: ClassScale): RatingSet {
  const q = classCount(scale);
  const assessmentMap = new Map<string, number>();
  const assessmentIds: string[] = [];
  const classifierMap = new Map<string, number>();
  const classifierCodes: string[] = [];
  const athleteMap = new Map<string, number>();
  const athleteCodes: string[] = [];
  const eventMap = new Map<string, number>();
  const eventCodes: string[] = [];

  const n = rows.length;
  const rowAssessment = new Int32Array(n);
  const rowClassifier = new Int32Array(n);
  const rowClass = new Int32Array(n);
  // Per-assessment attributes grow as assessments appear.
  let cap = 1024;
  let panel = new Int32Array(cap);
  let day = new Int32Array(cap);
  let kind = new Uint8Array(cap);
  let athlete = new Int32Array(cap);
  let event = new Int32Array(cap);
  let count = new Int32Array(cap);
  let firstRow = new Int32Array(cap);

  for (let r = 0; r < n; r++) {
    const row = rows[r];
    const id = row.assessmentId;
    if (typeof id !== 'string' || id.trim() === '') throw new RatingInputError(r, 'assessmentId', id, 'is blank');
    const cc = row.classifierCode;
    if (typeof cc !== 'string' || cc.trim() === '') throw new RatingInputError(r, 'classifierCode', cc, 'is blank');
    if (!isOnScale(row.sportClass, scale)) {
      throw new RatingInputError(
        r,
        'sportClass',
        row.sportClass,
        `is not a class of the scale ${formatClass(scale.min)}–${formatClass(scale.max)} (in half points)`,
      );
    }
    const pc = row.panelClass ?? null;
    if (pc !== null && !isOnScale(pc, scale)) {
      throw new RatingInputError(
        r,
        'panelClass',
        pc,
        `is not a class of the scale ${formatClass(scale.min)}–${formatClass(scale.max)} (in half points)`,
      );
    }
    const k = row.kind ?? 'first';
    const kindIndex = (ASSESSMENT_KINDS as readonly string[]).indexOf(k);
    if (kindIndex < 0) throw new RatingInputError(r, 'kind', row.kind, `is not one of ${ASSESSMENT_KINDS_LIST}`);

    const before = assessmentIds.length;
    const a = intern(assessmentMap, assessmentIds, id);
    const dayNumber = isoDateToDay(row.assessedOn);
    if (dayNumber === null) throw new RatingInputError(r, 'assessedOn', row.assessedOn, 'is not a date YYYY-MM-DD');
    if (row.athleteCode === undefined || row.athleteCode === null || String(row.athleteCode).trim() === '') {
      throw new RatingInputError(r, 'athleteCode', row.athleteCode, 'is blank');
    }
    if (row.eventCode === undefined || row.eventCode === null || String(row.eventCode).trim() === '') {
      throw new RatingInputError(r, 'eventCode', row.eventCode, 'is blank');
    }
    const ath = intern(athleteMap, athleteCodes, row.athleteCode);
    const ev = intern(eventMap, eventCodes, row.eventCode);
    const pcIndex = pc === null ? -1 : classIndex(pc, scale);
    if (a === before) {
      if (a >= cap) {
        cap *= 2;
        panel = grow(panel, cap);
        day = grow(day, cap);
        kind = grow(kind, cap);
        athlete = grow(athlete, cap);
        event = grow(event, cap);
        count = grow(count, cap);
        firstRow = grow(firstRow, cap);
      }
      panel[a] = pcIndex;
      day[a] = dayNumber;
      kind[a] = kindIndex;
      athlete[a] = ath;
      event[a] = ev;
      firstRow[a] = r;
    } else {
      const first = firstRow[a];
      if (athlete[a] !== ath)
        throw new RatingInputError(r, 'athleteCode', row.athleteCode, `differs from row ${first + 1} of assessment ${id}`);
      if (event[a] !== ev) throw new RatingInputError(r, 'eventCode', row.eventCode, `differs from row ${first + 1} of assessment ${id}`);
      if (day[a] !== dayNumber)
        throw new RatingInputError(r, 'assessedOn', row.assessedOn, `differs from row ${first + 1} of assessment ${id}`);
      if (kind[a] !== kindIndex) throw new RatingInputError(r, 'kind', k, `differs from row ${first + 1} of assessment ${id}`);
      if (pcIndex !== panel[a]) {
        // A panel class written on only some rows of the assessment is accepted; two different ones are not.
        if (pcIndex >= 0 && panel[a] >= 0)
          throw new RatingInputError(r, 'panelClass', pc, `differs from an earlier row of assessment ${id}`);
        if (pcIndex >= 0) panel[a] = pcIndex;
      }
    }
    rowAssessment[r] = a;
    rowClassifier[r] = intern(classifierMap, classifierCodes, cc);
    rowClass[r] = classIndex(row.sportClass, scale);
    count[a]++;
  }

  const A = assessmentIds.length;
  const ratingStart = new Int32Array(A + 1);
  for (let a = 0; a < A; a++) ratingStart[a + 1] = ratingStart[a] + count[a];
  const fill = ratingStart.slice(0, A);
  const ratingAssessment = new Int32Array(n);
  const ratingClassifier = new Int32Array(n);
  const ratingClass = new Int32Array(n);
  for (let r = 0; r < n; r++) {
    const a = rowAssessment[r];
    const pos = fill[a]++;
    ratingAssessment[pos] = a;
    ratingClassifier[pos] = rowClassifier[r]!;
    ratingClass[pos] = rowClass[r]!;
  }
  // The same classifier twice on one assessment is an input error.
  const seen = new Int32Array(classifierCodes.length).fill(-1);
  for (let a = 0; a < A; a++) {
    for (let p = ratingStart[a]; p < ratingStart[a + 1]; p++) {
      const c = ratingClassifier[p];
      if (seen[c] === a) {
        const row = findRow(rowAssessment, rowClassifier, a, c, 2);
        throw new RatingInputError(row, 'classifierCode', classifierCodes[c], `rates assessment ${assessmentIds[a]} twice`);
      }
      seen[c] = a;
    }
  }

  return {
    scale,
    q,
    assessmentCount: A,
    ratingCount: n,
    classifierCodes,
    athleteCodes,
    eventCodes,
    assessmentIds,
    ratingStart,
    ratingAssessment,
    ratingClassifier,
    ratingClass,
    panelClass: panel.slice(0, A),
    day: day.slice(0, A),
    kind: kind.slice(0, A),
    athlete: athlete.slice(0, A),
    event: event.slice(0, A),
  };
}

function findRow(rowAssessment: Int32Array, rowClassifier: Int32Array, a: number, c: number, occurrence: number): number {
  let seen = 0;
  for (let r = 0; r < rowAssessment.length; r++) {
    if (rowAssessment[r] === a && rowClassifier[r] === c && ++seen === occurrence) return r;
  }
  return 0;
}

function grow<T extends Int32Array | Uint8Array>(arr: T, cap: number): T {
  const out = new (arr.constructor as { new (n: number): T })(cap);
  out.set(arr);
  return out;
}

/**
 * The assessments for which `keep(a)` is true, with their ratings, as a new RatingSet sharing
 * the dictionaries of `set`. Linear in the number of ratings.
 */
export function subsetRatingSet(set: RatingSet, keep: (assessment: number, set: RatingSet) => boolean): RatingSet {
  const A = set.assessmentCount;
  const chosen = new Int32Array(A);
  let m = 0;
  let ratings = 0;
  for (let a = 0; a < A; a++) {
    if (keep(a, set)) {
      chosen[m++] = a;
      ratings += set.ratingStart[a + 1] - set.ratingStart[a];
    }
  }
  const ratingStart = new Int32Array(m + 1);
  const ratingAssessment = new Int32Array(ratings);
  const ratingClassifier = new Int32Array(ratings);
  const ratingClass = new Int32Array(ratings);
  const panelClass = new Int32Array(m);
  const day = new Int32Array(m);
  const kind = new Uint8Array(m);
  const athlete = new Int32Array(m);
  const event = new Int32Array(m);
  const assessmentIds: string[] = new Array<string>(m);
  let pos = 0;
  for (let i = 0; i < m; i++) {
    const a = chosen[i];
    ratingStart[i] = pos;
    for (let p = set.ratingStart[a]; p < set.ratingStart[a + 1]; p++) {
      ratingAssessment[pos] = i;
      ratingClassifier[pos] = set.ratingClassifier[p]!;
      ratingClass[pos] = set.ratingClass[p]!;
      pos++;
    }
    panelClass[i] = set.panelClass[a]!;
    day[i] = set.day[a]!;
    kind[i] = set.kind[a]!;
    athlete[i] = set.athlete[a]!;
    event[i] = set.event[a]!;
    assessmentIds[i] = set.assessmentIds[a]!;
  }
  ratingStart[m] = pos;
  return {
    scale: set.scale,
    q: set.q,
    assessmentCount: m,
    ratingCount: ratings,
    classifierCodes: set.classifierCodes,
    athleteCodes: set.athleteCodes,
    eventCodes: set.eventCodes,
    assessmentIds,
    ratingStart,
    ratingAssessment,
    ratingClassifier,
    ratingClass,
    panelClass,
    day,
    kind,
    athlete,
    event,
  };
}

export interface AssessmentFilter {
  /** First day included, ISO date. */
  from?: string;
  /** Last day included, ISO date. */
  to?: string;
  eventCodes?: readonly string[];
  athleteCodes?: readonly string[];
  kinds?: readonly AssessmentKind[];
  /** Keep only assessments on which at least one of these classifiers sat. */
  classifierCodes?: readonly string[];
}

/** Subset by the filters dashboards offer (date range, events, athletes, kinds, classifiers). */
export function filterRatingSet(set: RatingSet, filter: AssessmentFilter): RatingSet {
  const from = filter.from === undefined ? -Infinity : isoDateToDay(filter.from);
  const to = filter.to === undefined ? Infinity : isoDateToDay(filter.to);
  if (from === null) throw new Error(`filter from "${filter.from}" is not a date YYYY-MM-DD`);
  if (to === null) throw new Error(`filter to "${filter.to}" is not a date YYYY-MM-DD`);
  const eventSet = filter.eventCodes ? codeMask(set.eventCodes, filter.eventCodes) : null;
  const athleteSet = filter.athleteCodes ? codeMask(set.athleteCodes, filter.athleteCodes) : null;
  const kindMask = filter.kinds ? ASSESSMENT_KINDS.map((k) => filter.kinds!.includes(k)) : null;
  const classifierSet = filter.classifierCodes ? codeMask(set.classifierCodes, filter.classifierCodes) : null;
  return subsetRatingSet(set, (a) => {
    const d = set.day[a];
    if (d < from || d > to) return false;
    if (eventSet && !eventSet[set.event[a]]) return false;
    if (athleteSet && !athleteSet[set.athlete[a]]) return false;
    if (kindMask && !kindMask[set.kind[a]]) return false;
    if (classifierSet) {
      for (let p = set.ratingStart[a]; p < set.ratingStart[a + 1]; p++) if (classifierSet[set.ratingClassifier[p]]) return true;
      return false;
    }
    return true;
  });
}

function codeMask(dictionary: readonly string[], wanted: readonly string[]): Uint8Array {
  const want = new Set(wanted);
  const mask = new Uint8Array(dictionary.length);
  for (let i = 0; i < dictionary.length; i++) if (want.has(dictionary[i])) mask[i] = 1;
  return mask;
}

/** Class index → sport class in points (1.0 … 4.5 on the default scale). */
export function classPoints(set: Pick<RatingSet, 'scale'>, index: number): number {
  return (set.scale.min + index) / 2;
}

/** Class index → label as written ("1.0", "1.5", …). */
export function classLabel(set: Pick<RatingSet, 'scale'>, index: number): string {
  return formatClass(set.scale.min + index);
}

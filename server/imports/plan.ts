/**
 * Compares a validated batch with the federation's data by natural key: assessments by
 * (federation, external id), ratings by (assessment, classifier), athletes, events and
 * classifiers by (federation, code). Says what is new, changed and unchanged, and refuses
 * classifier codes the roster does not have unless the lead chose to add them. Reads only.
 */
import type BetterSqlite3 from 'better-sqlite3';
import type { AthleteChange, ImportCounts } from '../../shared/schemas/imports';
import { KIND_CODES, type ValidatedBatch } from './batch';
import { ISSUE_DETAIL_LIMIT, rowIssue, type IssueList } from './issues';

export const NEW = 0;
export const CHANGED = 1;
export const UNCHANGED = 2;

export interface ExistingAssessment {
  id: number;
  athlete_id: number;
  event_id: number | null;
  assessed_on: string;
  kind: string;
  panel_class: number | null;
  note: string | null;
}

export interface ImportPlan {
  counts: ImportCounts;
  /** Code → id of the roster, athletes and events already there; codes to add are absent. */
  classifierIds: Map<string, number>;
  athleteIds: Map<string, number>;
  eventIds: Map<string, number>;
  newClassifiers: string[];
  newAthletes: string[];
  newEvents: string[];
  /** Per batch assessment: NEW, CHANGED or UNCHANGED, and the existing row when there is one. */
  assessmentAction: Uint8Array;
  /** Per batch assessment: 1 when its own columns change (not only its ratings). */
  assessmentFieldsChanged: Uint8Array;
  existingAssessment: (ExistingAssessment | null)[];
  /** Per batch rating: NEW, CHANGED or UNCHANGED, with the existing rating's id and class. */
  ratingAction: Uint8Array;
  existingRatingId: Int32Array;
  existingRatingClass: Int8Array;
  /** Stored assessments the batch gives to another athlete (the first 200), and how many in all. */
  athleteChanges: AthleteChange[];
  athleteChangeCount: number;
}

export interface PlanOptions {
  addClassifiers: boolean;
}

function codes(sqlite: BetterSqlite3.Database, table: 'classifiers' | 'athletes' | 'events', federationId: number): Map<string, number> {
  const rows = sqlite.prepare(`select id, code from ${table} where federation_id = ?`).raw(true).all(federationId) as [number, string][];
  return new Map(rows.map(([id, code]) => [code, id]));
}

const zero = () => ({ new: 0, changed: 0, unchanged: 0 });

export function planImport(
  sqlite: BetterSqlite3.Database,
  federationId: number,
  batch: ValidatedBatch,
  options: PlanOptions,
  issues: IssueList,
): ImportPlan {
  const a = batch.assessments;
  const r = batch.ratings;
  const counts: ImportCounts = {
    assessments: zero(),
    ratings: zero(),
    classifiers: zero(),
    athletes: zero(),
    events: zero(),
    notAnalysable: batch.notAnalysable,
    rows: batch.rows,
  };

  const classifierIds = codes(sqlite, 'classifiers', federationId);
  const athleteIds = codes(sqlite, 'athletes', federationId);
  const eventIds = codes(sqlite, 'events', federationId);

  const newOnes = (used: Iterable<string>, known: Map<string, number>, c: { new: number; unchanged: number }) => {
    const seen = new Set<string>();
    const fresh: string[] = [];
    for (const code of used) {
      if (seen.has(code)) continue;
      seen.add(code);
      if (known.has(code)) c.unchanged++;
      else {
        c.new++;
        fresh.push(code);
      }
    }
    return fresh;
  };
  const newAthletes = newOnes(a.athleteCode, athleteIds, counts.athletes);
  const newEvents = newOnes(a.eventCode, eventIds, counts.events);
  const newClassifiers = newOnes(r.classifierCode, classifierIds, counts.classifiers);
  if (newClassifiers.length > 0 && !options.addClassifiers) {
    const unknown = new Set(newClassifiers);
    for (let k = 0; k < r.classifierCode.length; k++) {
      const code = r.classifierCode[k];
      if (!unknown.has(code)) continue;
      issues.error(
        rowIssue(
          r.row[k],
          r.line[k] ?? null,
          batch.columns[r.column[k]] ?? 'classifier_code',
          code,
          "is not a classifier of the federation's roster (choose to add unknown classifiers to the roster, or correct the code)",
        ),
      );
    }
  }

  // Assessments of the batch that already exist.
  const n = a.externalId.length;
  const byExternal = new Map<string, number>();
  for (let i = 0; i < n; i++) byExternal.set(a.externalId[i], i);
  const existingAssessment = new Array<ExistingAssessment | null>(n).fill(null);
  const batchOfDbId = new Map<number, number>();
  const iter = sqlite
    .prepare('select id, external_id, athlete_id, event_id, assessed_on, kind, panel_class, note from assessments where federation_id = ?')
    .iterate(federationId) as IterableIterator<ExistingAssessment & { external_id: string }>;
  for (const row of iter) {
    const i = byExternal.get(row.external_id);
    if (i === undefined) continue;
    existingAssessment[i] = row;
    batchOfDbId.set(row.id, i);
  }

  // A stored assessment given to another athlete is not a silent change: it is listed for the lead to confirm.
  const athleteChanges: AthleteChange[] = [];
  let athleteChangeCount = 0;
  let athleteCodeOf: Map<number, string> | null = null;
  for (let i = 0; i < n; i++) {
    const before = existingAssessment[i];
    if (!before || athleteIds.get(a.athleteCode[i]) === before.athlete_id) continue;
    athleteChangeCount++;
    if (athleteChanges.length >= ISSUE_DETAIL_LIMIT) continue;
    athleteCodeOf ??= new Map([...athleteIds].map(([code, id]) => [id, code]));
    athleteChanges.push({
      assessmentId: a.externalId[i],
      row: a.row[i],
      line: a.line[i] ?? null,
      column: 'athlete_code',
      storedAthlete: athleteCodeOf.get(before.athlete_id) ?? `#${before.athlete_id}`,
      fileAthlete: a.athleteCode[i],
    });
  }

  const assessmentAction = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const before = existingAssessment[i];
    if (!before) {
      assessmentAction[i] = NEW;
      counts.assessments.new++;
      continue;
    }
    const kind = a.kind[i];
    const same =
      athleteIds.get(a.athleteCode[i]) === before.athlete_id &&
      eventIds.get(a.eventCode[i]) === (before.event_id ?? undefined) &&
      a.assessedOn[i] === before.assessed_on &&
      (kind === -1 || KIND_CODES[kind] === before.kind) &&
      (a.panelClass[i] === null || a.panelClass[i] === before.panel_class) &&
      (a.note[i] === null || a.note[i] === before.note);
    assessmentAction[i] = same ? UNCHANGED : CHANGED;
    if (same) counts.assessments.unchanged++;
    else counts.assessments.changed++;
  }

  const assessmentFieldsChanged = assessmentAction.map((x) => (x === CHANGED ? 1 : 0));

  // Ratings of those assessments: per batch assessment, [classifier id, rating id, class] triples.
  const existingRatings = new Map<number, number[]>();
  if (batchOfDbId.size > 0) {
    const rows = sqlite
      .prepare(
        'select ratings.assessment_id, ratings.classifier_id, ratings.id, ratings.sport_class from ratings join assessments on assessments.id = ratings.assessment_id where assessments.federation_id = ?',
      )
      .raw(true)
      .iterate(federationId) as IterableIterator<[number, number, number, number]>;
    for (const [assessmentId, classifierId, ratingId, cls] of rows) {
      const i = batchOfDbId.get(assessmentId);
      if (i === undefined) continue;
      let list = existingRatings.get(i);
      if (!list) existingRatings.set(i, (list = []));
      list.push(classifierId, ratingId, cls);
    }
  }
  const m = r.assessment.length;
  const ratingAction = new Uint8Array(m);
  const existingRatingId = new Int32Array(m);
  const existingRatingClass = new Int8Array(m);
  for (let k = 0; k < m; k++) {
    const list = existingRatings.get(r.assessment[k]);
    const classifierId = classifierIds.get(r.classifierCode[k]);
    let found = -1;
    if (list && classifierId !== undefined) {
      for (let j = 0; j < list.length; j += 3) if (list[j] === classifierId) found = j;
    }
    if (found < 0) {
      ratingAction[k] = NEW;
      counts.ratings.new++;
    } else {
      existingRatingId[k] = list![found + 1]!;
      existingRatingClass[k] = list![found + 2]!;
      if (list![found + 2] === r.sportClass[k]) {
        ratingAction[k] = UNCHANGED;
        counts.ratings.unchanged++;
      } else {
        ratingAction[k] = CHANGED;
        counts.ratings.changed++;
      }
    }
  }
  // An unchanged assessment with a new or changed rating is still an assessment that changes.
  for (let k = 0; k < m; k++) {
    const i = r.assessment[k];
    if (ratingAction[k] !== UNCHANGED && assessmentAction[i] === UNCHANGED) {
      assessmentAction[i] = CHANGED;
      counts.assessments.unchanged--;
      counts.assessments.changed++;
    }
  }

  return {
    counts,
    classifierIds,
    athleteIds,
    eventIds,
    newClassifiers: options.addClassifiers ? newClassifiers : [],
    newAthletes,
    newEvents,
    assessmentAction,
    assessmentFieldsChanged,
    existingAssessment,
    ratingAction,
    existingRatingId,
    existingRatingClass,
    athleteChanges,
    athleteChangeCount,
  };
}

/** Whether applying the plan would change anything. */
export function planChangesSomething(counts: ImportCounts): boolean {
  return (
    counts.assessments.new +
      counts.assessments.changed +
      counts.ratings.new +
      counts.ratings.changed +
      counts.classifiers.new +
      counts.athletes.new +
      counts.events.new >
    0
  );
}

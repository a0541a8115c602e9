/**
 * Writes a planned import, and reverts one. The caller holds one transaction around it (see
 * service.ts): everything here uses the raw connection's prepared statements, batched into
 * multi-row inserts. It is synchronous on purpose: nothing else runs on the connection while the
 * transaction is open, so no reader ever sees half an import. Rows the import adds carry its id
 * (import_id); rows it changes get a before-image in import_changes, which a revert restores.
 */
import type BetterSqlite3 from 'better-sqlite3';
import { KIND_CODES, type ValidatedBatch } from './batch';
import { CHANGED, NEW, type ImportPlan } from './plan';

const ASSESSMENT_ROWS = 64;
const RATING_ROWS = 128;

/** The next id an AUTOINCREMENT table will give, read inside the write transaction. */
function nextId(sqlite: BetterSqlite3.Database, table: string): number {
  const seq = sqlite.prepare('select seq from sqlite_sequence where name = ?').pluck().get(table) as number | undefined;
  const max = sqlite.prepare(`select max(id) from ${table}`).pluck().get() as number | null;
  return Math.max(seq ?? 0, max ?? 0) + 1;
}

function multiInsert(sqlite: BetterSqlite3.Database, head: string, columns: number, rows: number) {
  const tuple = `(${new Array(columns).fill('?').join(', ')})`;
  return sqlite.prepare(`${head} values ${new Array(rows).fill(tuple).join(', ')}`);
}

/** Writes the plan's additions and changes for import `importId`. Returns nothing; throws on failure. */
export function applyPlan(
  sqlite: BetterSqlite3.Database,
  federationId: number,
  importId: number,
  batch: ValidatedBatch,
  plan: ImportPlan,
): void {
  const a = batch.assessments;
  const r = batch.ratings;

  // Roster, athletes and events the import adds.
  const insertClassifier = sqlite.prepare(
    "insert into classifiers (federation_id, code, display_name, certification_level, import_id) values (?, ?, ?, 'national', ?)",
  );
  for (const code of plan.newClassifiers)
    plan.classifierIds.set(code, Number(insertClassifier.run(federationId, code, code, importId).lastInsertRowid));
  const insertAthlete = sqlite.prepare('insert into athletes (federation_id, code, import_id) values (?, ?, ?)');
  for (const code of plan.newAthletes) plan.athleteIds.set(code, Number(insertAthlete.run(federationId, code, importId).lastInsertRowid));
  const insertEvent = sqlite.prepare('insert into events (federation_id, code, name, import_id) values (?, ?, ?, ?)');
  for (const code of plan.newEvents) plan.eventIds.set(code, Number(insertEvent.run(federationId, code, code, importId).lastInsertRowid));

  const insertChange = sqlite.prepare('insert into import_changes (import_id, table_name, row_id, before) values (?, ?, ?, ?)');

  // Assessments: changed ones get a before-image and an update; new ones get ids from here on.
  const updateAssessment = sqlite.prepare(
    'update assessments set athlete_id = ?, event_id = ?, assessed_on = ?, kind = ?, panel_class = ?, note = ? where id = ?',
  );
  const n = a.externalId.length;
  const dbId = new Int32Array(n);
  let next = nextId(sqlite, 'assessments');
  const fresh: number[] = [];
  for (let i = 0; i < n; i++) {
    const before = plan.existingAssessment[i];
    if (!before) {
      dbId[i] = next++;
      fresh.push(i);
      continue;
    }
    dbId[i] = before.id;
    if (plan.assessmentFieldsChanged[i]) {
      const kind = a.kind[i];
      insertChange.run(
        importId,
        'assessments',
        before.id,
        JSON.stringify({
          athlete_id: before.athlete_id,
          event_id: before.event_id,
          assessed_on: before.assessed_on,
          kind: before.kind,
          panel_class: before.panel_class,
          note: before.note,
        }),
      );
      updateAssessment.run(
        plan.athleteIds.get(a.athleteCode[i])!,
        plan.eventIds.get(a.eventCode[i])!,
        a.assessedOn[i],
        kind === -1 ? before.kind : KIND_CODES[kind],
        a.panelClass[i] ?? before.panel_class,
        a.note[i] ?? before.note,
        before.id,
      );
    }
  }
  const assessmentHead =
    'insert into assessments (id, federation_id, external_id, athlete_id, event_id, assessed_on, kind, panel_class, note, import_id)';
  const manyAssessments = multiInsert(sqlite, assessmentHead, 10, ASSESSMENT_ROWS);
  const oneAssessment = multiInsert(sqlite, assessmentHead, 10, 1);
  const params: unknown[] = [];
  const pushAssessment = (i: number) => {
    const kind = a.kind[i];
    params.push(
      dbId[i],
      federationId,
      a.externalId[i],
      plan.athleteIds.get(a.athleteCode[i]),
      plan.eventIds.get(a.eventCode[i]),
      a.assessedOn[i],
      kind === -1 ? 'first' : KIND_CODES[kind],
      a.panelClass[i],
      a.note[i],
      importId,
    );
  };
  let k = 0;
  for (; k + ASSESSMENT_ROWS <= fresh.length; k += ASSESSMENT_ROWS) {
    params.length = 0;
    for (let j = k; j < k + ASSESSMENT_ROWS; j++) pushAssessment(fresh[j]);
    manyAssessments.run(params);
  }
  for (; k < fresh.length; k++) {
    params.length = 0;
    pushAssessment(fresh[k]);
    oneAssessment.run(params);
  }

  // Ratings.
  const updateRating = sqlite.prepare('update ratings set sport_class = ? where id = ?');
  const ratingHead = 'insert into ratings (assessment_id, classifier_id, sport_class, import_id)';
  const manyRatings = multiInsert(sqlite, ratingHead, 4, RATING_ROWS);
  const oneRating = multiInsert(sqlite, ratingHead, 4, 1);
  const m = r.assessment.length;
  const pending: number[] = [];
  const flush = (all: boolean) => {
    let at = 0;
    for (; at + RATING_ROWS <= pending.length; at += RATING_ROWS) {
      params.length = 0;
      for (let j = at; j < at + RATING_ROWS; j++) {
        const q = pending[j];
        params.push(dbId[r.assessment[q]], plan.classifierIds.get(r.classifierCode[q]), r.sportClass[q], importId);
      }
      manyRatings.run(params);
    }
    if (all) {
      for (; at < pending.length; at++) {
        const q = pending[at];
        oneRating.run(dbId[r.assessment[q]], plan.classifierIds.get(r.classifierCode[q]), r.sportClass[q], importId);
      }
    }
    pending.splice(0, at);
  };
  for (let q = 0; q < m; q++) {
    const action = plan.ratingAction[q];
    if (action === NEW) {
      pending.push(q);
      if (pending.length >= RATING_ROWS * 16) flush(false);
    } else {
      if (action === CHANGED) {
        insertChange.run(importId, 'ratings', plan.existingRatingId[q], JSON.stringify({ sport_class: plan.existingRatingClass[q] }));
        updateRating.run(r.sportClass[q], plan.existingRatingId[q]);
      }
    }
  }
  flush(true);
}

export class RevertRefused extends Error {}

/**
 * Undoes an import: restores the before-images of what it changed (newest first), then removes
 * what it added. Call inside a transaction.
 */
export function revertRows(sqlite: BetterSqlite3.Database, importId: number): void {
  const changes = sqlite
    .prepare('select table_name, row_id, before from import_changes where import_id = ? order by id desc')
    .all(importId) as {
    table_name: 'assessments' | 'ratings';
    row_id: number;
    before: string;
  }[];
  const restoreAssessment = sqlite.prepare(
    'update assessments set athlete_id = @athlete_id, event_id = @event_id, assessed_on = @assessed_on, kind = @kind, panel_class = @panel_class, note = @note where id = @id',
  );
  const restoreRating = sqlite.prepare('update ratings set sport_class = @sport_class where id = @id');
  for (const change of changes) {
    const before = JSON.parse(change.before) as Record<string, unknown>;
    const result = (change.table_name === 'assessments' ? restoreAssessment : restoreRating).run({ ...before, id: change.row_id });
    if (result.changes !== 1) throw new RevertRefused(`a row this import changed (${change.table_name} ${change.row_id}) no longer exists`);
  }
  sqlite.prepare('delete from ratings where import_id = ?').run(importId);
  sqlite.prepare('delete from assessments where import_id = ?').run(importId);
  for (const table of ['classifiers', 'athletes', 'events']) sqlite.prepare(`delete from ${table} where import_id = ?`).run(importId);
  sqlite.prepare('delete from import_changes where import_id = ?').run(importId);
}

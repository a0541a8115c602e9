/**
 * Reads a tidy ratings CSV (one row per classifier rating) into rating rows for the engine.
 *
 * Columns (header required, any order, extra columns ignored): assessment_id, athlete_code,
 * event_code, assessed_on (ISO date YYYY-MM-DD), classifier_code, sport_class (1.0 … 4.5 in
 * half points, "3", "3.0", "3,5" accepted), optional panel_class and kind (first | review |
 * protest; blank = first), note. Every problem is reported with the file, the data row and its
 * line, the column and the value. The reading and checking are the importer's, so a file the
 * command line accepts is a file an upload accepts (apart from the roster, which only the
 * server knows).
 */
import { readFileSync } from 'node:fs';
import { ASSESSMENT_KINDS, isoDateToDay, type RatingRow, type RatingSet } from '../analysis';
import { classCount, DEFAULT_SCALE, type ClassScale } from '../../shared/scale';
import type { ImportIssue } from '../../shared/schemas/imports';
import { KIND_CODES, type BatchCore } from '../imports/batch';
import { readCsvCore, readCsvText } from '../imports/csv-reader';
import { problemOf } from '../imports/issues';

export class TidyCsvError extends Error {
  readonly file: string;
  /** 1-based data row (the header is not counted), or null for a file-level problem. */
  readonly row: number | null;
  /** 1-based line in the file, when known. */
  readonly line: number | null;
  readonly column: string | null;
  readonly value: string | null;
  constructor(file: string, problem: string, where: { row?: number; line?: number; column?: string; value?: string } = {}) {
    const parts = [file];
    if (where.row !== undefined) parts.push(`row ${where.row}${where.line !== undefined ? ` (line ${where.line})` : ''}`);
    if (where.column !== undefined) parts.push(`column ${where.column}`);
    const value = where.value !== undefined ? ` value "${where.value}"` : '';
    super(`${parts.join(', ')}:${value} ${problem}`);
    this.name = 'TidyCsvError';
    this.file = file;
    this.row = where.row ?? null;
    this.line = where.line ?? null;
    this.column = where.column ?? null;
    this.value = where.value ?? null;
  }
}

export interface TidyCsv {
  rows: RatingRow[];
  /** 1-based file line of each row (for messages about later checks). */
  lines: number[];
}

/** The first problem of a read as the command line says it. */
function tidyError(file: string, first: ImportIssue): TidyCsvError {
  const where: { row?: number; line?: number; column?: string; value?: string } = {};
  if (first.row !== null) where.row = first.row;
  if (first.line !== null) where.line = first.line;
  if (first.row !== null && first.column !== null) where.column = first.column;
  if (first.row !== null && first.value !== null) where.value = first.value;
  return new TidyCsvError(
    file,
    first.row === null ? first.message.charAt(0).toLowerCase() + first.message.slice(1) : problemOf(first),
    where,
  );
}

/**
 * Parses CSV text into rows (tests and callers that want row objects; the command line reads bytes); `file` is only used in messages. The reading and checking are the importer's
 * (server/imports/csv-reader.ts), in the long layout with unknown columns ignored; the first
 * problem found is thrown.
 */
export function parseTidyCsv(text: string, file: string, scale: ClassScale = DEFAULT_SCALE): TidyCsv {
  const read = readCsvText(text, { scale, unknownColumns: 'ignore', layout: 'long' });
  const first = read.issues.errors[0];
  if (first) throw tidyError(file, first);
  const batch = read.batch;
  if (!batch || batch.ratings.assessment.length === 0) throw new TidyCsvError(file, 'has no data rows', { line: 2 });
  const a = batch.assessments;
  const r = batch.ratings;
  const rows: RatingRow[] = [];
  const lines: number[] = [];
  for (let k = 0; k < r.assessment.length; k++) {
    const i = r.assessment[k];
    const kind = a.kind[i];
    rows.push({
      assessmentId: a.externalId[i],
      athleteCode: a.athleteCode[i],
      eventCode: a.eventCode[i],
      assessedOn: a.assessedOn[i],
      classifierCode: r.classifierCode[k],
      sportClass: r.sportClass[k],
      panelClass: a.panelClass[i] ?? null,
      kind: kind === -1 ? 'first' : ASSESSMENT_KINDS[kind],
    });
    lines.push(r.line[k] ?? 0);
  }
  return { rows, lines };
}

/**
 * The RatingSet of a checked batch, straight from its typed columns: the same set as
 * buildRatingSet over its rows (assessments in order of first appearance, ratings grouped by
 * assessment in file order, codes numbered in order of first appearance), without a row object.
 * The batch's checks are the stricter ones (scale, calendar dates, kinds, one rating per
 * classifier, rows of an assessment that agree), so nothing here can fail.
 */
export function ratingSetOfCore(core: BatchCore, scale: ClassScale = DEFAULT_SCALE): RatingSet {
  const a = core.assessments;
  const r = core.ratings;
  const A = a.externalId.length;
  const n = r.assessment.length;
  const renumber = (ids: Int32Array, size: number, names: readonly string[]) => {
    const to = new Int32Array(size).fill(-1);
    const codes: string[] = [];
    const out = new Int32Array(ids.length);
    for (let i = 0; i < ids.length; i++) {
      const id = ids[i];
      if (to[id] === -1) {
        to[id] = codes.length;
        codes.push(names[id]);
      }
      out[i] = to[id]!;
    }
    return { out, codes };
  };
  const athletes = renumber(a.athlete, core.athletes.length, core.athletes);
  const events = renumber(a.event, core.events.length, core.events);
  const classifiers = renumber(r.classifier, core.classifiers.length, core.classifiers);
  const dayOfDate = new Int32Array(core.dates.length);
  core.dates.forEach((d, i) => (dayOfDate[i] = isoDateToDay(d) ?? 0));
  const ratingStart = new Int32Array(A + 1);
  for (let k = 0; k < n; k++) ratingStart[r.assessment[k] + 1]++;
  for (let i = 0; i < A; i++) ratingStart[i + 1] += ratingStart[i];
  const fill = ratingStart.slice(0, A);
  const ratingAssessment = new Int32Array(n);
  const ratingClassifier = new Int32Array(n);
  const ratingClass = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    const i = r.assessment[k];
    const p = fill[i]++;
    ratingAssessment[p] = i;
    ratingClassifier[p] = classifiers.out[k]!;
    ratingClass[p] = r.sportClass[k] - scale.min;
  }
  const panelClass = new Int32Array(A);
  const day = new Int32Array(A);
  const kind = new Uint8Array(A);
  for (let i = 0; i < A; i++) {
    const pc = a.panelClass[i];
    panelClass[i] = pc < 0 ? -1 : pc - scale.min;
    day[i] = dayOfDate[a.date[i]]!;
    kind[i] = a.kind[i] < 0 ? 0 : ASSESSMENT_KINDS.indexOf(KIND_CODES[a.kind[i]]);
  }
  return {
    scale,
    q: classCount(scale),
    assessmentCount: A,
    ratingCount: n,
    classifierCodes: classifiers.codes,
    athleteCodes: athletes.codes,
    eventCodes: events.codes,
    assessmentIds: a.externalId,
    ratingStart,
    ratingAssessment,
    ratingClassifier,
    ratingClass,
    panelClass,
    day,
    kind,
    athlete: athletes.out,
    event: events.out,
  };
}

/** Reads the file's bytes through the importer's byte reader and builds the RatingSet from its typed columns. */
export function readTidyCsv(path: string, scale: ClassScale = DEFAULT_SCALE): RatingSet {
  let bytes: Buffer;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    throw new TidyCsvError(path, `cannot be read: ${(e as Error).message}`);
  }
  const read = readCsvCore(bytes, { scale, unknownColumns: 'ignore', layout: 'long' });
  const first = read.issues.errors[0];
  if (first) throw tidyError(path, first);
  if (!read.core || read.core.ratings.assessment.length === 0) throw new TidyCsvError(path, 'has no data rows', { line: 2 });
  return ratingSetOfCore(read.core, scale);
}

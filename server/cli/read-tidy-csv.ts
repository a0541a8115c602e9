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
import { ASSESSMENT_KINDS, buildRatingSet, RatingInputError, type RatingRow, type RatingSet } from '../analysis';
import { DEFAULT_SCALE, type ClassScale } from '../../shared/scale';
import { readCsvText } from '../imports/csv-reader';
import { problemOf } from '../imports/issues';

export const REQUIRED_COLUMNS = ['assessment_id', 'athlete_code', 'event_code', 'assessed_on', 'classifier_code', 'sport_class'] as const;
export const OPTIONAL_COLUMNS = ['panel_class', 'kind'] as const;

const FIELD_COLUMN: Record<keyof RatingRow, string> = {
  assessmentId: 'assessment_id',
  athleteCode: 'athlete_code',
  eventCode: 'event_code',
  assessedOn: 'assessed_on',
  classifierCode: 'classifier_code',
  sportClass: 'sport_class',
  panelClass: 'panel_class',
  kind: 'kind',
};

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

/**
 * Parses CSV text; `file` is only used in messages. The reading and checking are the importer's
 * (server/imports/csv-reader.ts), in the long layout with unknown columns ignored; the first
 * problem found is thrown.
 */
export function parseTidyCsv(text: string, file: string, scale: ClassScale = DEFAULT_SCALE): TidyCsv {
  const read = readCsvText(text, { scale, unknownColumns: 'ignore', layout: 'long' });
  const first = read.issues.errors[0];
  if (first) {
    const where: { row?: number; line?: number; column?: string; value?: string } = {};
    if (first.row !== null) where.row = first.row;
    if (first.line !== null) where.line = first.line;
    if (first.row !== null && first.column !== null) where.column = first.column;
    if (first.row !== null && first.value !== null) where.value = first.value;
    throw new TidyCsvError(file, first.row === null ? first.message.charAt(0).toLowerCase() + first.message.slice(1) : problemOf(first), where);
  }
  const batch = read.batch;
  if (!batch || batch.ratings.assessment.length === 0) throw new TidyCsvError(file, 'has no data rows', { line: 2 });
  const a = batch.assessments;
  const r = batch.ratings;
  const rows: RatingRow[] = [];
  const lines: number[] = [];
  for (let k = 0; k < r.assessment.length; k++) {
    const i = r.assessment[k]!;
    const kind = a.kind[i]!;
    rows.push({
      assessmentId: a.externalId[i]!,
      athleteCode: a.athleteCode[i]!,
      eventCode: a.eventCode[i]!,
      assessedOn: a.assessedOn[i]!,
      classifierCode: r.classifierCode[k]!,
      sportClass: r.sportClass[k]!,
      panelClass: a.panelClass[i] ?? null,
      kind: kind === -1 ? 'first' : ASSESSMENT_KINDS[kind]!,
    });
    lines.push(r.line[k] ?? 0);
  }
  return { rows, lines };
}

/** Reads and parses a file, then builds the RatingSet (consistency errors name row and column too). */
export function readTidyCsv(path: string, scale: ClassScale = DEFAULT_SCALE): RatingSet {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new TidyCsvError(path, `cannot be read: ${(e as Error).message}`);
  }
  const { rows, lines } = parseTidyCsv(text, path, scale);
  try {
    return buildRatingSet(rows, scale);
  } catch (e) {
    if (e instanceof RatingInputError) {
      const column = FIELD_COLUMN[e.field];
      const problem = e.message.replace(/^row \d+: \S+ "[^"]*" /, '');
      throw new TidyCsvError(path, problem, { row: e.rowIndex + 1, line: lines[e.rowIndex], column, value: e.fieldValue });
    }
    throw e;
  }
}

/**
 * Reads a tidy ratings CSV (one row per classifier rating) into rating rows for the engine.
 *
 * Columns (header required, any order, extra columns ignored): assessment_id, athlete_code,
 * event_code, assessed_on (ISO date YYYY-MM-DD), classifier_code, sport_class (1.0 … 4.5 in
 * half points, "3", "3.0", "3,5" accepted), optional panel_class and kind (first | review |
 * protest; blank = first). Every problem is reported with the file, the data row and its line,
 * the column and the value.
 */
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import { ASSESSMENT_KINDS, buildRatingSet, isoDateToDay, RatingInputError, type AssessmentKind, type RatingRow, type RatingSet } from '../analysis';
import { DEFAULT_SCALE, parseSportClass, type ClassScale } from '../../shared/scale';

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

/** Parses CSV text; `file` is only used in messages. */
export function parseTidyCsv(text: string, file: string, scale: ClassScale = DEFAULT_SCALE): TidyCsv {
  const source = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const parsed = Papa.parse<Record<string, string>>(source, {
    header: true,
    skipEmptyLines: 'greedy',
    transformHeader: (h) => h.trim().toLowerCase(),
  });
  const header = parsed.meta.fields ?? [];
  for (const col of REQUIRED_COLUMNS) {
    if (!header.includes(col)) throw new TidyCsvError(file, `the header has no column ${col} (required: ${REQUIRED_COLUMNS.join(', ')})`, { line: 1 });
  }
  // Line of each data row: papaparse reports cursor offsets only for errors, so count newlines.
  const lineStarts = dataRowLines(source, parsed.data.length);
  const firstError = parsed.errors.find((e) => e.type !== 'FieldMismatch' || e.code !== 'TooManyFields');
  if (firstError) {
    const rowNo = (firstError.row ?? 0) + 1;
    throw new TidyCsvError(file, `cannot be read as CSV: ${firstError.message}`, { row: rowNo, line: lineStarts[rowNo - 1] });
  }
  const rows: RatingRow[] = [];
  parsed.data.forEach((rec, i) => {
    const rowNo = i + 1;
    const line = lineStarts[i];
    const at = (column: string, value: string | undefined, problem: string): never => {
      throw new TidyCsvError(file, problem, { row: rowNo, line, column, value: value ?? '' });
    };
    const text = (column: string): string => {
      const v = (rec[column] ?? '').trim();
      if (v === '') at(column, rec[column], 'is blank');
      return v;
    };
    const assessedOn = text('assessed_on');
    if (isoDateToDay(assessedOn) === null) at('assessed_on', rec.assessed_on, 'is not a date YYYY-MM-DD');
    const cls = parseSportClass(rec.sport_class ?? '', scale);
    if (!cls.ok) at('sport_class', rec.sport_class, cls.reason);
    let panelClass: number | null = null;
    const pcText = (rec.panel_class ?? '').trim();
    if (pcText !== '') {
      const pc = parseSportClass(pcText, scale);
      if (!pc.ok) at('panel_class', rec.panel_class, pc.reason);
      else panelClass = pc.value;
    }
    let kind: AssessmentKind = 'first';
    const kindText = (rec.kind ?? '').trim().toLowerCase();
    if (kindText !== '') {
      if (!(ASSESSMENT_KINDS as readonly string[]).includes(kindText)) at('kind', rec.kind, `is not one of ${ASSESSMENT_KINDS.join(', ')}`);
      kind = kindText as AssessmentKind;
    }
    rows.push({
      assessmentId: text('assessment_id'),
      athleteCode: text('athlete_code'),
      eventCode: text('event_code'),
      assessedOn,
      classifierCode: text('classifier_code'),
      sportClass: (cls as { ok: true; value: number }).value,
      panelClass,
      kind,
    });
  });
  if (rows.length === 0) throw new TidyCsvError(file, 'has no data rows', { line: 2 });
  return { rows, lines: lineStarts.slice(0, rows.length) };
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

/** File line (1-based) of each data row, accounting for quoted newlines and blank lines. */
function dataRowLines(text: string, count: number): number[] {
  const lines: number[] = [];
  let line = 1;
  let inQuotes = false;
  let rowStart = true;
  let headerDone = false;
  let rowHasContent = false;
  let rowLine = 1;
  for (let i = 0; i <= text.length && lines.length < count; i++) {
    const ch = i < text.length ? text[i] : '\n';
    if (rowStart) {
      rowLine = line;
      rowStart = false;
      rowHasContent = false;
    }
    if (ch === '"') inQuotes = !inQuotes;
    if (ch === '\n' && !inQuotes) {
      if (!headerDone) headerDone = true;
      else if (rowHasContent) lines.push(rowLine);
      rowStart = true;
    } else if (ch !== '\r' && ch !== ',' && ch !== ' ' && ch !== '\t') rowHasContent = true;
    if (ch === '\n') line++;
  }
  return lines;
}

/**
 * Reads an import CSV (long or wide layout) into a validated batch. One code path for every
 * reader: the upload (streamed through papaparse in chunks, yielding to the event loop), the
 * command line's tidy CSV reader (server/cli/read-tidy-csv.ts) and the tests.
 *
 * File-level refusals (not a CSV, empty, header only, unknown, doubled or missing columns, mixed
 * delimiters) throw FileRefusal; problems of a row are collected (the first 200 in detail) with
 * the row, its line, the column as written in the header and the value. A byte-order mark, CRLF
 * line ends and newlines inside quoted fields are read as they are meant.
 */
import { Readable } from 'node:stream';
import Papa from 'papaparse';
import {
  guessMapping,
  isColumnTarget,
  layoutOf,
  MAX_SEATS,
  REQUIRED_ASSESSMENT_COLUMNS,
  REQUIRED_LONG_COLUMNS,
  type ColumnMapping,
  type ColumnTarget,
  type DateFormat,
  type ImportLayout,
} from '../../shared/import-columns';
import { DEFAULT_SCALE, type ClassScale } from '../../shared/scale';
import { BatchBuilder, type RowPlace, type ValidatedBatch } from './batch';
import { fieldValidators, type FieldValidator, type FieldValidators } from './fields';
import { FileRefusal, fileIssue, IssueList, rowIssue, shownValue } from './issues';

export interface CsvReadOptions {
  /** Header (as written, trimmed) → target. Headers it leaves out are guessed. */
  mapping?: ColumnMapping;
  dateFormat?: DateFormat;
  scale?: ClassScale;
  /** Columns that map to nothing: refused (uploads) or ignored (the command line). */
  unknownColumns?: 'reject' | 'ignore';
  /** Roster codes, to recognise classifier columns of the wide layout. */
  knownClassifierCodes?: readonly string[];
  /** Only this layout: guesses of the other layout's columns are dropped (the command line reads long files only). */
  layout?: ImportLayout;
}

export interface CsvReadResult {
  /** Null when the file was refused as a whole. */
  batch: ValidatedBatch | null;
  issues: IssueList;
  layout: ImportLayout | null;
  /** The mapping applied (after guessing). */
  mapping: ColumnMapping | null;
}

const DELIMITERS = [',', ';', '\t', '|'] as const;
const DELIMITER_NAMES: Record<string, string> = { ',': 'comma', ';': 'semicolon', '\t': 'tab', '|': 'vertical bar' };

/** Whether the first bytes look like something other than text (a workbook, a PDF, an image…). */
export function binaryKind(head: Uint8Array): string | null {
  const starts = (...bytes: number[]) => bytes.every((b, i) => head[i] === b);
  if (starts(0x50, 0x4b, 0x03, 0x04)) return 'a ZIP archive (for example a spreadsheet workbook)';
  if (starts(0xd0, 0xcf, 0x11, 0xe0)) return 'an old-style spreadsheet workbook';
  if (starts(0x25, 0x50, 0x44, 0x46)) return 'a PDF document';
  if (starts(0x89, 0x50, 0x4e, 0x47) || starts(0xff, 0xd8, 0xff) || starts(0x47, 0x49, 0x46)) return 'an image';
  if (starts(0x1f, 0x8b)) return 'a compressed (gzip) file';
  const n = Math.min(head.length, 65536);
  for (let i = 0; i < n; i++) if (head[i] === 0) return 'binary data (it contains NUL bytes)';
  return null;
}

/** Decodes UTF-8 strictly, without a byte-order mark; refuses binary files and other encodings. */
export function decodeCsvBytes(bytes: Uint8Array): string {
  const kind = binaryKind(bytes);
  if (kind) throw new FileRefusal([fileIssue(`The file is not a CSV: it looks like ${kind}. Save it as CSV (UTF-8) and upload it again.`)]);
  try {
    return new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes);
  } catch {
    throw new FileRefusal([fileIssue('The file is not UTF-8 text. Save it as "CSV UTF-8" and upload it again.')]);
  }
}

/** The first line of the text outside quotes. */
function firstLine(text: string): string {
  let inQuotes = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '"') inQuotes = !inQuotes;
    else if (!inQuotes && (ch === '\n' || ch === '\r')) {
      const line = text.slice(0, i);
      if (line.trim() !== '') return line;
      return firstLine(text.slice(i + 1));
    }
  }
  return text;
}

/** The delimiter of the header line; a header that mixes two delimiters is refused. */
export function detectDelimiter(text: string): string {
  const line = firstLine(text);
  let inQuotes = false;
  const counts = new Map<string, number>();
  for (const ch of line) {
    if (ch === '"') inQuotes = !inQuotes;
    else if (!inQuotes && (DELIMITERS as readonly string[]).includes(ch)) counts.set(ch, (counts.get(ch) ?? 0) + 1);
  }
  const used = [...counts.entries()].sort((a, b) => b[1] - a[1]);
  if (used.length === 0) return ',';
  if (used.length > 1) {
    throw new FileRefusal([
      fileIssue(`The file mixes delimiters: its header uses both ${DELIMITER_NAMES[used[0]![0]]}s and ${DELIMITER_NAMES[used[1]![0]]}s. Use one delimiter throughout.`, { line: 1 }),
    ]);
  }
  return used[0]![0];
}

interface ColumnPlan {
  layout: ImportLayout;
  /** Column index of each fixed field, or -1. */
  fixed: Record<'assessment_id' | 'athlete_code' | 'event_code' | 'assessed_on' | 'panel_class' | 'kind' | 'note' | 'classifier_code' | 'sport_class', number>;
  /** Wide layout, one column per classifier: [column index, classifier code]. */
  classifierColumns: [number, string][];
  /** Wide layout, panel seats: [classifier column, class column]. */
  seats: [number, number][];
  /** Columns whose values are ignored. */
  ignored: Set<number>;
  mapping: ColumnMapping;
}

function planColumns(headers: string[], options: CsvReadOptions): ColumnPlan {
  const issues = [] as ReturnType<typeof fileIssue>[];
  const seen = new Map<string, number>();
  headers.forEach((h, i) => {
    const key = h.toLowerCase();
    if (h === '') return;
    if (seen.has(key)) issues.push(fileIssue(`The header has the column "${h}" twice (columns ${seen.get(key)! + 1} and ${i + 1})`, { line: 1, column: h }));
    else seen.set(key, i);
  });
  if (issues.length) throw new FileRefusal(issues);

  const guessed = guessMapping(headers.filter((h) => h !== ''), options.knownClassifierCodes ?? []).mapping;
  if (options.layout === 'long') {
    for (const [h, target] of Object.entries(guessed)) if (target.startsWith('classifier:') || target.startsWith('seat')) delete guessed[h];
  }
  const given = options.mapping ?? {};
  const mapping: ColumnMapping = {};
  const fixed: ColumnPlan['fixed'] = {
    assessment_id: -1,
    athlete_code: -1,
    event_code: -1,
    assessed_on: -1,
    panel_class: -1,
    kind: -1,
    note: -1,
    classifier_code: -1,
    sport_class: -1,
  };
  const classifierColumns: [number, string][] = [];
  const seatParts = new Map<number, { classifier?: number; cls?: number }>();
  const ignored = new Set<number>();
  const usedBy = new Map<string, string>();
  const unknown: string[] = [];
  headers.forEach((h, i) => {
    if (h === '') {
      ignored.add(i);
      return;
    }
    const mapped = given[h] ?? Object.entries(given).find(([k]) => k.toLowerCase() === h.toLowerCase())?.[1];
    const target: ColumnTarget | undefined = mapped ?? guessed[h];
    if (mapped !== undefined && !isColumnTarget(mapped)) {
      issues.push(fileIssue(`The mapping of column "${h}" is not a column of the import`, { line: 1, column: h, value: String(mapped) }));
      return;
    }
    if (target === undefined) {
      if (options.unknownColumns === 'ignore') ignored.add(i);
      else unknown.push(h);
      return;
    }
    mapping[h] = target;
    if (target === 'ignore') {
      ignored.add(i);
      return;
    }
    const other = usedBy.get(target);
    if (other !== undefined) {
      issues.push(fileIssue(`Columns "${other}" and "${h}" are both mapped to ${target}: map one of them to something else or ignore it`, { line: 1, column: h }));
      return;
    }
    usedBy.set(target, h);
    if (target.startsWith('classifier:')) classifierColumns.push([i, target.slice('classifier:'.length)]);
    else if (target.startsWith('seat')) {
      const m = /^seat(\d+)_(classifier|class)$/.exec(target)!;
      const seat = Number(m[1]);
      const part = seatParts.get(seat) ?? {};
      if (m[2] === 'classifier') part.classifier = i;
      else part.cls = i;
      seatParts.set(seat, part);
    } else fixed[target as keyof ColumnPlan['fixed']] = i;
  });
  for (const h of unknown) {
    issues.push(fileIssue(`The column "${h}" is not a column of the import: map it to a field or choose to ignore it`, { line: 1, column: h }));
  }
  const layout = layoutOf(mapping);
  const hasLong = fixed.classifier_code >= 0 || fixed.sport_class >= 0;
  if (layout === 'wide' && hasLong) {
    issues.push(fileIssue('The columns mix the long layout (classifier_code, sport_class) and the wide layout (a column per classifier or per panel seat)', { line: 1 }));
  }
  const required = layout === 'long' ? REQUIRED_LONG_COLUMNS : REQUIRED_ASSESSMENT_COLUMNS;
  for (const col of required) {
    if (fixed[col] < 0) issues.push(fileIssue(`The header has no column ${col} (required: ${required.join(', ')})`, { line: 1, column: col }));
  }
  const seats: [number, number][] = [];
  for (const [seat, part] of [...seatParts.entries()].sort((a, b) => a[0] - b[0])) {
    if (seat > MAX_SEATS) continue;
    if (part.classifier === undefined || part.cls === undefined) {
      issues.push(fileIssue(`Panel seat ${seat} needs two columns, its classifier code and its sport class; one is missing`, { line: 1 }));
    } else seats.push([part.classifier, part.cls]);
  }
  if (layout === 'wide' && classifierColumns.length > 0 && seats.length > 0) {
    issues.push(fileIssue('The wide layout has either one column per classifier or columns per panel seat, not both', { line: 1 }));
  }
  if (issues.length) throw new FileRefusal(issues);
  return { layout, fixed, classifierColumns, seats, ignored, mapping };
}

/**
 * The row-by-row reader, fed with papaparse's records (arrays of fields) in order. Blank
 * records are skipped but counted as lines.
 */
export class CsvRowReader {
  readonly issues = new IssueList();
  private readonly options: CsvReadOptions;
  private readonly v: FieldValidators;
  private readonly newline: string;
  private headers: string[] | null = null;
  private plan: ColumnPlan | null = null;
  private builder: BatchBuilder | null = null;
  private names: RowPlace['names'] | null = null;
  private line = 1;
  private row = 0;
  private readonly delimiter: string;

  constructor(options: CsvReadOptions, delimiter: string, newline = '\n') {
    this.options = options;
    this.delimiter = delimiter;
    this.newline = newline === '\r' ? '\r' : '\n';
    this.v = fieldValidators(options.scale ?? DEFAULT_SCALE, options.dateFormat ?? 'iso');
  }

  get layout(): ImportLayout | null {
    return this.plan?.layout ?? null;
  }

  get mapping(): ColumnMapping | null {
    return this.plan?.mapping ?? null;
  }

  /** Marks papaparse's errors (unclosed quotes) on records of the next `feed`, by index in it. */
  feed(records: string[][], quoteErrors: Set<number> = new Set()): void {
    for (let k = 0; k < records.length; k++) {
      const fields = records[k]!;
      const line = this.line;
      let extraLines = 0;
      let blank = true;
      for (const f of fields) {
        if (blank && f.trim() !== '') blank = false;
        if (f.length > 0 && f.includes(this.newline)) extraLines += f.split(this.newline).length - 1;
      }
      this.line += 1 + extraLines;
      if (blank) continue;
      if (this.headers === null) {
        this.header(fields);
        continue;
      }
      this.row++;
      if (quoteErrors.has(k)) {
        this.issues.error(rowIssue(this.row, line, null, fields.join(this.delimiter), 'has a quote (") that is not closed or is misplaced'));
        continue;
      }
      this.record(fields, this.row, line);
    }
  }

  private header(fields: string[]): void {
    const headers = fields.map((f, i) => (i === 0 ? f.replace(/^\uFEFF/, '') : f).trim());
    this.headers = headers;
    this.plan = planColumns(headers, this.options);
    const name = (col: keyof ColumnPlan['fixed']) => (this.plan!.fixed[col] >= 0 ? headers[this.plan!.fixed[col]]! : col);
    this.names = {
      assessment_id: name('assessment_id'),
      athlete_code: name('athlete_code'),
      event_code: name('event_code'),
      assessed_on: name('assessed_on'),
      kind: name('kind'),
      panel_class: name('panel_class'),
      note: name('note'),
    };
    this.builder = new BatchBuilder(this.plan.layout, headers, this.issues);
  }

  private record(fields: string[], row: number, line: number): void {
    const plan = this.plan!;
    const headers = this.headers!;
    const issues = this.issues;
    if (fields.length !== headers.length) {
      if (fields.length < headers.length) {
        const other = DELIMITERS.find((d) => d !== this.delimiter && fields.some((f) => f.includes(d)));
        if (other) {
          throw new FileRefusal([
            fileIssue(
              `The file mixes delimiters: row ${row} (line ${line}) is separated by ${DELIMITER_NAMES[other]}s but the header by ${DELIMITER_NAMES[this.delimiter]}s (value "${shownValue(fields.join(this.delimiter))}")`,
              { row, line, value: fields.join(this.delimiter) },
            ),
          ]);
        }
        issues.error(rowIssue(row, line, headers[fields.length] ?? null, '', `is missing: the row has ${fields.length} fields where the header has ${headers.length}`));
        return;
      }
      const extra = fields.slice(headers.length).findIndex((f) => f.trim() !== '');
      if (extra >= 0) {
        issues.error(rowIssue(row, line, `${headers.length + extra + 1} (no header)`, fields[headers.length + extra], `is in a column the header does not have (the row has ${fields.length} fields, the header ${headers.length})`));
        return;
      }
    }
    const v = this.v;
    const f = plan.fixed;
    this.bad = false;
    const take = this.take;
    const externalId = take(fields, row, line, f.assessment_id, v.code, '');
    const athleteCode = take(fields, row, line, f.athlete_code, v.code, '');
    const eventCode = take(fields, row, line, f.event_code, v.code, '');
    const assessedOn = take(fields, row, line, f.assessed_on, v.date, '');
    const panelClass = take(fields, row, line, f.panel_class, v.panelClass, null);
    const kind = take(fields, row, line, f.kind, v.kind, null);
    const note = take(fields, row, line, f.note, v.note, null);
    let bad = false;
    const place = { row, line };
    const ratings: [string, number, number][] = [];
    if (plan.layout === 'long') {
      const code = take(fields, row, line, f.classifier_code, v.code, '');
      const cls = take(fields, row, line, f.sport_class, v.sportClass, 0);
      ratings.push([code, cls, f.classifier_code]);
    } else if (plan.seats.length > 0) {
      for (const [ci, si] of plan.seats) {
        const codeRaw = fields[ci] ?? '';
        const clsRaw = fields[si] ?? '';
        if (codeRaw.trim() === '' && clsRaw.trim() === '') continue;
        if (codeRaw.trim() === '') {
          bad = true;
          issues.error(rowIssue(row, line, headers[ci]!, codeRaw, `is blank but the seat's sport class (${headers[si]}) is "${clsRaw.trim()}"`));
          continue;
        }
        const code = v.code(codeRaw);
        const cls = v.sportClass(clsRaw);
        if (!code.ok) issues.error(rowIssue(row, line, headers[ci]!, codeRaw, code.message));
        if (!cls.ok) issues.error(rowIssue(row, line, headers[si]!, clsRaw, cls.message));
        if (!code.ok || !cls.ok) bad = true;
        else ratings.push([code.value, cls.value, ci]);
      }
    } else {
      for (const [ci, code] of plan.classifierColumns) {
        const raw = fields[ci] ?? '';
        if (raw.trim() === '') continue;
        const cls = v.sportClass(raw);
        if (!cls.ok) {
          bad = true;
          issues.error(rowIssue(row, line, headers[ci]!, raw, cls.message));
        } else ratings.push([code, cls.value, ci]);
      }
    }
    if (bad || this.bad) return;
    if (ratings.length === 0) {
      const cols = plan.seats.length > 0 ? plan.seats.map(([ci]) => headers[ci]!) : plan.classifierColumns.map(([ci]) => headers[ci]!);
      issues.error(rowIssue(row, line, cols.join(', '), '', 'has no rating: every classifier column of the row is blank'));
      return;
    }
    const b = this.builder!;
    const a = b.assessment({ externalId, athleteCode, eventCode, assessedOn, kind, panelClass, note }, { row, line, names: this.names! });
    if (a < 0) return;
    for (const [code, cls, column] of ratings) b.rating(a, code, cls, place, column);
  }

  private bad = false;

  /** One fixed column's value through its validator; an error is reported and marks the row bad. */
  private readonly take = <T,>(fields: string[], row: number, line: number, index: number, check: FieldValidator<T>, fallback: T): T => {
    if (index < 0) return fallback;
    const raw = fields[index];
    const r = check(raw);
    if (r.ok) return r.value;
    this.bad = true;
    this.issues.error(rowIssue(row, line, this.headers![index]!, raw ?? '', r.message));
    return fallback;
  };

  /** Ends the file: refuses a file without header or without data rows; returns the batch. */
  finish(): ValidatedBatch {
    if (this.headers === null) throw new FileRefusal([fileIssue('The file is empty: it has no header and no data rows')]);
    if (this.row === 0) throw new FileRefusal([fileIssue('The file has a header but no data rows', { line: 2 })]);
    const batch = this.builder!.finish(this.names!.assessment_id);
    batch.rows = this.row;
    return batch;
  }
}

function refuse(error: unknown): CsvReadResult {
  if (error instanceof FileRefusal) {
    const issues = new IssueList();
    for (const issue of error.issues) issues.error(issue);
    return { batch: null, issues, layout: null, mapping: null };
  }
  throw error;
}

function prepare(text: string): { text: string; delimiter: string } {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === '') throw new FileRefusal([fileIssue('The file is empty: it has no header and no data rows')]);
  return { text: body, delimiter: detectDelimiter(body) };
}

function quoteErrorRows(errors: Papa.ParseError[]): Set<number> {
  const rows = new Set<number>();
  for (const e of errors) if (e.type === 'Quotes' && typeof e.row === 'number') rows.add(e.row);
  return rows;
}

/** Reads CSV text synchronously (the command line and tests). */
export function readCsvText(text: string, options: CsvReadOptions = {}): CsvReadResult {
  try {
    const prepared = prepare(text);
    const parsed = Papa.parse<string[]>(prepared.text, { delimiter: prepared.delimiter, skipEmptyLines: false });
    const reader = new CsvRowReader(options, prepared.delimiter, parsed.meta.linebreak);
    reader.feed(parsed.data, quoteErrorRows(parsed.errors));
    const batch = reader.finish();
    return { batch, issues: reader.issues, layout: reader.layout, mapping: reader.mapping };
  } catch (error) {
    return refuse(error);
  }
}

const SLICE = 1 << 20;

/**
 * Reads CSV bytes in papaparse chunks through a stream, so the event loop stays free between
 * chunks (progress events go out, other requests are served). `onProgress` gets the share read.
 */
export async function readCsvBytes(bytes: Uint8Array, options: CsvReadOptions = {}, onProgress?: (done: number, total: number) => void): Promise<CsvReadResult> {
  let prepared: { text: string; delimiter: string };
  try {
    prepared = prepare(decodeCsvBytes(bytes));
  } catch (error) {
    return refuse(error);
  }
  const { text, delimiter } = prepared;
  const total = text.length;
  let fed = 0;
  const source = Readable.from(
    (function* slices() {
      for (let at = 0; at < total; at += SLICE) {
        fed = Math.min(total, at + SLICE);
        yield text.slice(at, at + SLICE);
      }
    })(),
    { objectMode: false, encoding: 'utf8' },
  );
  let reader: CsvRowReader | null = null;
  try {
    await new Promise<void>((resolve, reject) => {
      let failure: unknown = null;
      Papa.parse<string[]>(source as unknown as File, {
        delimiter,
        skipEmptyLines: false,
        chunk: (results, parser) => {
          try {
            reader ??= new CsvRowReader(options, delimiter, results.meta.linebreak);
            reader.feed(results.data, quoteErrorRows(results.errors));
            onProgress?.(fed, total);
          } catch (error) {
            failure = error;
            parser.abort();
          }
        },
        complete: () => (failure === null ? resolve() : reject(failure)),
        error: (error: Error) => reject(error),
      });
    });
    reader ??= new CsvRowReader(options, delimiter);
    const batch = (reader as CsvRowReader).finish();
    return { batch, issues: (reader as CsvRowReader).issues, layout: (reader as CsvRowReader).layout, mapping: (reader as CsvRowReader).mapping };
  } catch (error) {
    return refuse(error);
  }
}

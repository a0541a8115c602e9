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
import { Buffer, isUtf8 } from 'node:buffer';
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
import { binaryKind, notCsvMessage, utf16Order } from '../../shared/file-signature';
import { DEFAULT_SCALE, type ClassScale } from '../../shared/scale';
import { BatchBuilder, batchOfCore, KIND_CODES, type BatchCore, type RowPlace, type ValidatedBatch } from './batch';
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

export { binaryKind };

/**
 * Decodes the file's text: UTF-8 strictly (a byte-order mark dropped), or UTF-16 when its
 * byte-order mark or its NUL bytes say so (as a spreadsheet's "Unicode text" gives); refuses
 * binary files and other encodings.
 */
export function decodeCsvBytes(bytes: Uint8Array): string {
  const kind = binaryKind(bytes);
  if (kind) throw new FileRefusal([fileIssue(notCsvMessage(kind))]);
  const utf16 = utf16Order(bytes);
  if (utf16) {
    try {
      return new TextDecoder(utf16, { fatal: true, ignoreBOM: false }).decode(bytes);
    } catch {
      throw new FileRefusal([
        fileIssue(
          `The file looks like UTF-16 text (${utf16 === 'utf-16le' ? 'little' : 'big'}-endian) but is not valid UTF-16. Save it as "CSV UTF-8" and upload it again.`,
        ),
      ]);
    }
  }
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
      fileIssue(
        `The file mixes delimiters: its header uses both ${DELIMITER_NAMES[used[0][0]]}s and ${DELIMITER_NAMES[used[1][0]]}s. Use one delimiter throughout.`,
        { line: 1 },
      ),
    ]);
  }
  return used[0][0];
}

interface ColumnPlan {
  layout: ImportLayout;
  /** Column index of each fixed field, or -1. */
  fixed: Record<
    'assessment_id' | 'athlete_code' | 'event_code' | 'assessed_on' | 'panel_class' | 'kind' | 'note' | 'classifier_code' | 'sport_class',
    number
  >;
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
    if (seen.has(key))
      issues.push(fileIssue(`The header has the column "${h}" twice (columns ${seen.get(key)! + 1} and ${i + 1})`, { line: 1, column: h }));
    else seen.set(key, i);
  });
  if (issues.length) throw new FileRefusal(issues);

  const guessed = guessMapping(
    headers.filter((h) => h !== ''),
    options.knownClassifierCodes ?? [],
  ).mapping;
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
      issues.push(
        fileIssue(`Columns "${other}" and "${h}" are both mapped to ${target}: map one of them to something else or ignore it`, {
          line: 1,
          column: h,
        }),
      );
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
    issues.push(
      fileIssue(`The column "${h}" is not a column of the import: map it to a field or choose to ignore it`, { line: 1, column: h }),
    );
  }
  const layout = layoutOf(mapping);
  const hasLong = fixed.classifier_code >= 0 || fixed.sport_class >= 0;
  if (layout === 'wide' && hasLong) {
    issues.push(
      fileIssue(
        'The columns mix the long layout (classifier_code, sport_class) and the wide layout (a column per classifier or per panel seat)',
        { line: 1 },
      ),
    );
  }
  const required = layout === 'long' ? REQUIRED_LONG_COLUMNS : REQUIRED_ASSESSMENT_COLUMNS;
  for (const col of required) {
    if (fixed[col] < 0)
      issues.push(fileIssue(`The header has no column ${col} (required: ${required.join(', ')})`, { line: 1, column: col }));
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
      const fields = records[k];
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
        this.issues.error(
          rowIssue(this.row, line, null, fields.join(this.delimiter), 'has a quote (") that is not closed or is misplaced'),
        );
        continue;
      }
      this.record(fields, this.row, line);
    }
  }

  private header(fields: string[]): void {
    const headers = fields.map((f, i) => (i === 0 ? f.replace(/^\uFEFF/, '') : f).trim());
    this.headers = headers;
    this.plan = planColumns(headers, this.options);
    const name = (col: keyof ColumnPlan['fixed']) => (this.plan!.fixed[col] >= 0 ? headers[this.plan!.fixed[col]] : col);
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
        issues.error(
          rowIssue(
            row,
            line,
            headers[fields.length] ?? null,
            '',
            `is missing: the row has ${fields.length} fields where the header has ${headers.length}`,
          ),
        );
        return;
      }
      const extra = fields.slice(headers.length).findIndex((f) => f.trim() !== '');
      if (extra >= 0) {
        issues.error(
          rowIssue(
            row,
            line,
            `${headers.length + extra + 1} (no header)`,
            fields[headers.length + extra],
            `is in a column the header does not have (the row has ${fields.length} fields, the header ${headers.length})`,
          ),
        );
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
          issues.error(
            rowIssue(row, line, headers[ci], codeRaw, `is blank but the seat's sport class (${headers[si]}) is "${clsRaw.trim()}"`),
          );
          continue;
        }
        const code = v.code(codeRaw);
        const cls = v.sportClass(clsRaw);
        if (!code.ok) issues.error(rowIssue(row, line, headers[ci], codeRaw, code.message));
        if (!cls.ok) issues.error(rowIssue(row, line, headers[si], clsRaw, cls.message));
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
          issues.error(rowIssue(row, line, headers[ci], raw, cls.message));
        } else ratings.push([code, cls.value, ci]);
      }
    }
    if (bad || this.bad) return;
    if (ratings.length === 0) {
      const cols = plan.seats.length > 0 ? plan.seats.map(([ci]) => headers[ci]) : plan.classifierColumns.map(([ci]) => headers[ci]);
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
  private readonly take = <T>(fields: string[], row: number, line: number, index: number, check: FieldValidator<T>, fallback: T): T => {
    if (index < 0) return fallback;
    const raw = fields[index];
    const r = check(raw);
    if (r.ok) return r.value;
    this.bad = true;
    this.issues.error(rowIssue(row, line, this.headers![index], raw ?? '', r.message));
    return fallback;
  };

  /** Ends the file: refuses a file without header or without data rows; returns the batch in typed columns. */
  finishCore(): BatchCore {
    if (this.headers === null) throw new FileRefusal([fileIssue('The file is empty: it has no header and no data rows')]);
    if (this.row === 0) throw new FileRefusal([fileIssue('The file has a header but no data rows', { line: 2 })]);
    this.builder!.rows = this.row;
    return this.builder!.finishCore(this.names!.assessment_id);
  }

  /** Ends the file: refuses a file without header or without data rows; returns the batch. */
  finish(): ValidatedBatch {
    return batchOfCore(this.finishCore());
  }

  /**
   * Reads lines of a quote-free file from its bytes: `buf[from, to)` holds whole lines, each
   * ended by `\n` (`\r\n` when `crlf`) except perhaps the last one of the file. Without quotes a
   * record is its line split at the delimiter, so this is what papaparse would give, without an
   * array of fields per row: each distinct value of a column is decoded and checked once, and a
   * row whose values all pass goes straight into the batch as dictionary indices. Any other row
   * (a problem, a short or long row, the wide layout) is decoded and read as `feed` would.
   * Throws NotPlain when a carriage return is out of place (the caller reads the file as text).
   */
  feedBytes(buf: Buffer, from: number, to: number, crlf: boolean): void {
    const delim = this.delimiter.charCodeAt(0);
    let at = from;
    while (at < to) {
      // One pass over the line: its field starts (as many as the header has, plus one) and its end.
      const starts = this.starts;
      const room = starts.length - 1;
      starts[0] = at;
      let fields = 1;
      let i = at;
      for (; i < to; i++) {
        const b = buf[i];
        if (b === delim) {
          if (fields < room) starts[fields] = i + 1;
          fields++;
        } else if (b === 10) break;
        else if (b === 13 && buf[i + 1] !== 10) throw new NotPlain();
      }
      let end = i;
      if (crlf && i < to) {
        if (i === at || buf[i - 1] !== 13) throw new NotPlain();
        end--;
      }
      if (fields < room) starts[fields] = end + 1;
      const next = i < to ? i + 1 : to;
      this.bytesLine(buf, at, end, this.line++, fields);
      at = next;
    }
  }

  /** Field starts of the current line (room for the header's columns and one more). */
  private starts = new Int32Array(2);
  private values: ByteValues[] = [];

  /** Whether the bytes of a line hold nothing but blanks and delimiters. */
  private blankLine(buf: Buffer, from: number, to: number): boolean {
    const delim = this.delimiter.charCodeAt(0);
    let high = false;
    for (let i = from; i < to; i++) {
      const b = buf[i];
      if (b >= 0x80) high = true;
      else if (b !== delim && b !== 0x20 && b !== 0x09 && b !== 0x0b && b !== 0x0c) return false;
    }
    return (
      !high ||
      buf
        .toString('utf8', from, to)
        .split(this.delimiter)
        .every((f) => f.trim() === '')
    );
  }

  private bytesLine(buf: Buffer, from: number, to: number, line: number, fields: number): void {
    const first = from < to ? buf[from] : 0;
    if ((first <= 0x20 || first >= 0x7f || first === this.delimiter.charCodeAt(0)) && this.blankLine(buf, from, to)) return;
    const plan = this.plan;
    if (plan === null) {
      this.header(buf.toString('utf8', from, to).split(this.delimiter));
      this.values = this.headers!.map(() => new ByteValues());
      this.starts = new Int32Array(this.headers!.length + 2);
      return;
    }
    const row = ++this.row;
    if (plan.layout !== 'long' || fields !== this.headers!.length || !this.plainRow(buf, row, line)) {
      this.record(buf.toString('utf8', from, to).split(this.delimiter), row, line);
    }
  }

  /**
   * The index of column `column`'s value of the current row among its distinct values (decoded,
   * checked and interned the first time it is seen), −1 without the column, −2 when it fails.
   */
  private valueIndex(buf: Buffer, column: number, what: ValueKind): number {
    if (column < 0) return -1;
    const vals = this.values[column];
    const s = this.starts[column];
    const e = this.starts[column + 1] - 1;
    let k = vals.find(buf, s, e);
    if (k < 0) {
      const plain = what !== ValueKind.Note && plainCode(buf, s, e);
      if (plain && (what === ValueKind.Athlete || what === ValueKind.Event || what === ValueKind.Classifier || what === ValueKind.Text)) {
        const text = buf.toString('latin1', s, e);
        const b = this.builder!;
        const value =
          what === ValueKind.Text
            ? text
            : (what === ValueKind.Athlete ? b.athletes : what === ValueKind.Event ? b.events : b.classifiers).intern(text);
        k = vals.add(buf, s, e, true, value);
        return k;
      }
      const text = buf.toString('utf8', s, e);
      const v = this.v;
      const b = this.builder!;
      let value: unknown = null;
      let ok = false;
      switch (what) {
        case ValueKind.Text: {
          const r = v.code(text);
          if ((ok = r.ok)) value = r.value;
          break;
        }
        case ValueKind.Athlete:
        case ValueKind.Event:
        case ValueKind.Classifier: {
          const r = v.code(text);
          const dict = what === ValueKind.Athlete ? b.athletes : what === ValueKind.Event ? b.events : b.classifiers;
          if ((ok = r.ok)) value = dict.intern(r.value);
          break;
        }
        case ValueKind.Date: {
          const r = v.date(text);
          if ((ok = r.ok)) value = b.dates.intern(r.value);
          break;
        }
        case ValueKind.PanelClass: {
          const r = v.panelClass(text);
          if ((ok = r.ok)) value = r.value ?? -1;
          break;
        }
        case ValueKind.Kind: {
          const r = v.kind(text);
          if ((ok = r.ok)) value = r.value === null ? -1 : KIND_CODES.indexOf(r.value);
          break;
        }
        case ValueKind.Note: {
          const r = v.note(text);
          if ((ok = r.ok)) value = r.value;
          break;
        }
        case ValueKind.SportClass: {
          const r = v.sportClass(text);
          if ((ok = r.ok)) value = r.value;
          break;
        }
      }
      k = vals.add(buf, s, e, ok, value);
    }
    return vals.ok[k] ? k : -2;
  }

  /** A long-layout row whose values all pass, straight into the batch; false when it needs the full reading. */
  private plainRow(buf: Buffer, row: number, line: number): boolean {
    const f = this.plan!.fixed;
    const ext = this.externalId(buf);
    const kExt = ext === null ? -2 : 0;
    const kAth = this.valueIndex(buf, f.athlete_code, ValueKind.Athlete);
    const kEv = this.valueIndex(buf, f.event_code, ValueKind.Event);
    const kDate = this.valueIndex(buf, f.assessed_on, ValueKind.Date);
    const kPanel = this.valueIndex(buf, f.panel_class, ValueKind.PanelClass);
    const kKind = this.valueIndex(buf, f.kind, ValueKind.Kind);
    const kNote = this.valueIndex(buf, f.note, ValueKind.Note);
    const kCode = this.valueIndex(buf, f.classifier_code, ValueKind.Classifier);
    const kCls = this.valueIndex(buf, f.sport_class, ValueKind.SportClass);
    if (kExt < 0 || kAth < 0 || kEv < 0 || kDate < 0 || kCode < 0 || kCls < 0 || kPanel === -2 || kKind === -2 || kNote === -2)
      return false;
    const values = this.values;
    const b = this.builder!;
    const a = b.assessmentOf(
      ext!,
      this.lastExternal === ext ? this.lastAssessment : this.existingAssessment(buf, ext!),
      values[f.athlete_code].value[kAth] as number,
      values[f.event_code].value[kEv] as number,
      values[f.assessed_on].value[kDate] as number,
      kKind < 0 ? -1 : (values[f.kind].value[kKind] as number),
      kPanel < 0 ? -1 : (values[f.panel_class].value[kPanel] as number),
      kNote < 0 ? null : (values[f.note].value[kNote] as string | null),
      row,
      line,
      this.names!,
    );
    if (a >= 0) {
      this.lastExternal = ext;
      this.lastAssessment = a;
      this.lastIdStart = this.starts[f.assessment_id]!;
      this.lastIdEnd = this.starts[f.assessment_id + 1] - 1;
      b.ratingOf(
        a,
        values[f.classifier_code].value[kCode] as number,
        values[f.sport_class].value[kCls] as number,
        row,
        line,
        f.classifier_code,
      );
    }
    return true;
  }

  /** Assessment ids by their bytes → assessment index (ids of rows that went straight into the batch). */
  private readonly idBytes = new ByteValues();
  /** Assessments added from a plain id (its text is its bytes, and it is in idBytes). */
  private plainIds = 0;

  /**
   * The assessment of the current row's id if the batch has it, else −1 (and the caller adds
   * it): by the id's bytes, and by its text only when some assessment was not added from a plain
   * id (rows of the text reader, ids with spaces around them), so a file of plain ids needs no
   * map of texts.
   */
  private existingAssessment(buf: Buffer, ext: string): number {
    const column = this.plan!.fixed.assessment_id;
    const s = this.starts[column];
    const e = this.starts[column + 1] - 1;
    const k = this.idBytes.find(buf, s, e);
    if (k >= 0) return this.idBytes.value[k] as number;
    const b = this.builder!;
    const plain = plainCode(buf, s, e);
    const known = plain && this.plainIds === b.assessmentCount ? -1 : b.known(ext);
    if (known >= 0) {
      this.idBytes.add(buf, s, e, true, known);
      return known;
    }
    this.idBytes.add(buf, s, e, true, b.assessmentCount);
    if (plain) this.plainIds++;
    return -1;
  }

  /** The assessment and its id of the last row that went straight into the batch. */
  private lastExternal: string | null = null;
  private lastAssessment = -1;
  private lastIdStart = 0;
  private lastIdEnd = -1;

  /**
   * The checked assessment id of the current row, or null when it fails. Assessment ids are
   * mostly distinct, so they bypass the table of distinct values: the same bytes as the last row's
   * give the same text; other plain codes are read as they are; the rest go through the check.
   */
  private externalId(buf: Buffer): string | null {
    const column = this.plan!.fixed.assessment_id;
    const s = this.starts[column];
    const e = this.starts[column + 1] - 1;
    const ls = this.lastIdStart;
    if (this.lastExternal !== null && e - s === this.lastIdEnd - ls) {
      let same = true;
      for (let i = 0; i < e - s; i++) {
        if (buf[s + i] !== buf[ls + i]) {
          same = false;
          break;
        }
      }
      if (same) return this.lastExternal;
    }
    let text: string;
    if (plainCode(buf, s, e)) text = buf.toString('latin1', s, e);
    else {
      const r = this.v.code(buf.toString('utf8', s, e));
      if (!r.ok) return null;
      text = r.value;
    }
    return text;
  }
}

/** What a column's values are, for the byte reader. */
const ValueKind = { Text: 0, Athlete: 1, Event: 2, Date: 3, PanelClass: 4, Kind: 5, Note: 6, Classifier: 7, SportClass: 8 } as const;
type ValueKind = (typeof ValueKind)[keyof typeof ValueKind];

/**
 * Whether bytes [s, e) are a code that passes codeSchema as it is: 1 to 64 printable ASCII
 * characters without spaces (nothing to trim, no control characters), so its text is its bytes.
 */
function plainCode(buf: Buffer, s: number, e: number): boolean {
  if (e <= s || e - s > 64) return false;
  for (let i = s; i < e; i++) {
    const b = buf[i];
    if (b < 0x21 || b > 0x7e) return false;
  }
  return true;
}

/** A carriage return where the byte reader does not expect one: read the file as text instead. */
class NotPlain extends Error {}

/**
 * The distinct values of one column, by their bytes: an open-addressing hash table over
 * (start, length) in the file, with each value's check result. Looks at the previous row's value
 * first (rows of one assessment repeat it).
 */
class ByteValues {
  private table = new Int32Array(64);
  private start: number[] = [];
  private length: number[] = [];
  readonly ok: boolean[] = [];
  readonly value: unknown[] = [];
  private last = -1;

  private static hash(buf: Buffer, s: number, e: number): number {
    let h = 0x811c9dc5;
    for (let i = s; i < e; i++) h = Math.imul(h ^ buf[i], 0x01000193);
    return h >>> 0;
  }

  private equal(buf: Buffer, k: number, s: number, e: number): boolean {
    const len = e - s;
    if (this.length[k] !== len) return false;
    const t = this.start[k];
    for (let i = 0; i < len; i++) if (buf[t + i] !== buf[s + i]) return false;
    return true;
  }

  /** The index of the value in buf[s, e), or −1. */
  find(buf: Buffer, s: number, e: number): number {
    if (this.last >= 0 && this.equal(buf, this.last, s, e)) return this.last;
    const mask = this.table.length - 1;
    for (let slot = ByteValues.hash(buf, s, e) & mask; ; slot = (slot + 1) & mask) {
      const k = this.table[slot] - 1;
      if (k < 0) return -1;
      if (this.equal(buf, k, s, e)) return (this.last = k);
    }
  }

  add(buf: Buffer, s: number, e: number, ok: boolean, value: unknown): number {
    const k = this.start.length;
    this.start.push(s);
    this.length.push(e - s);
    this.ok.push(ok);
    this.value.push(value);
    if (k * 2 >= this.table.length) {
      const old = this.table;
      this.table = new Int32Array(old.length * 2);
      for (let j = 0; j < k; j++) this.place(buf, j);
    }
    this.place(buf, k);
    return (this.last = k);
  }

  private place(buf: Buffer, k: number): void {
    const mask = this.table.length - 1;
    let slot = ByteValues.hash(buf, this.start[k], this.start[k] + this.length[k]) & mask;
    while (this.table[slot] !== 0) slot = (slot + 1) & mask;
    this.table[slot] = k + 1;
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

/** A file the byte reader can read: UTF-8 without quotes, one kind of line end. */
interface PlainFile {
  buf: Buffer;
  /** After the byte-order mark. */
  from: number;
  crlf: boolean;
  delimiter: string;
}

/**
 * Whether the byte reader can read the file (null: read it as text). Refuses binary files and
 * other encodings with decodeCsvBytes's messages.
 */
function plainFile(bytes: Uint8Array): PlainFile | null {
  const buf = Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (buf.indexOf(0x22) >= 0) return null;
  if (binaryKind(buf) || utf16Order(buf) || !isUtf8(buf)) return null;
  const bom = (at: number) => buf[at] === 0xef && buf[at + 1] === 0xbb && buf[at + 2] === 0xbf;
  const from = bom(0) ? 3 : 0;
  if (bom(from)) return null;
  const crlf = buf.indexOf(13, from) >= 0;
  for (let at = from; at < buf.length;) {
    const nl = buf.indexOf(10, at);
    const end = nl < 0 ? buf.length : nl;
    const text = buf.toString('utf8', at, crlf && nl >= 0 && buf[end - 1] === 13 ? end - 1 : end);
    if (text.includes('\r')) return null;
    if (text.trim() !== '') return { buf, from, crlf, delimiter: detectDelimiter(text) };
    at = end + 1;
  }
  return null;
}

/** Whether the byte reader reads this file (UTF-8 without quotes; otherwise the text reader does). */
export function byteReadable(bytes: Uint8Array): boolean {
  try {
    return plainFile(bytes) !== null;
  } catch {
    return false;
  }
}

/** Reads and checks the file's bytes synchronously (the command line): the batch in typed columns. */
export function readCsvCore(
  bytes: Uint8Array,
  options: CsvReadOptions = {},
): { core: BatchCore | null; issues: IssueList; layout: ImportLayout | null } {
  try {
    const plain = plainFile(bytes);
    if (plain) {
      try {
        const reader = new CsvRowReader(options, plain.delimiter, plain.crlf ? '\r\n' : '\n');
        reader.feedBytes(plain.buf, plain.from, plain.buf.length, plain.crlf);
        return { core: reader.finishCore(), issues: reader.issues, layout: reader.layout };
      } catch (error) {
        if (!(error instanceof NotPlain)) throw error;
      }
    }
    const prepared = prepare(decodeCsvBytes(bytes));
    const parsed = Papa.parse<string[]>(prepared.text, { delimiter: prepared.delimiter, skipEmptyLines: false });
    const reader = new CsvRowReader(options, prepared.delimiter, parsed.meta.linebreak);
    reader.feed(parsed.data, quoteErrorRows(parsed.errors));
    return { core: reader.finishCore(), issues: reader.issues, layout: reader.layout };
  } catch (error) {
    const refused = refuse(error);
    return { core: null, issues: refused.issues, layout: null };
  }
}

/** Bytes the byte reader reads between two turns of the event loop. */
const BYTE_SLICE = 4 << 20;

/** The byte reader in slices, giving the event loop a turn between them; null when the file needs the text reader. */
async function readPlainBytes(
  plain: PlainFile,
  options: CsvReadOptions,
  onProgress?: (done: number, total: number) => void,
): Promise<CsvReadResult | null> {
  const { buf, crlf } = plain;
  const reader = new CsvRowReader(options, plain.delimiter, crlf ? '\r\n' : '\n');
  try {
    for (let at = plain.from; at < buf.length;) {
      const nl = buf.indexOf(10, Math.min(buf.length, at + BYTE_SLICE));
      const end = nl < 0 ? buf.length : nl + 1;
      reader.feedBytes(buf, at, end, crlf);
      at = end;
      onProgress?.(at, buf.length);
      if (at < buf.length) await new Promise((resolve) => setImmediate(resolve));
    }
    const batch = reader.finish();
    return { batch, issues: reader.issues, layout: reader.layout, mapping: reader.mapping };
  } catch (error) {
    if (error instanceof NotPlain) return null;
    return refuse(error);
  }
}

const SLICE = 1 << 20;

/**
 * Reads CSV bytes: a UTF-8 file without quotes by the byte reader (CsvRowReader.feedBytes), any
 * other in papaparse chunks through a stream; either way the event loop gets a turn between
 * slices (progress events go out, other requests are served). `onProgress` gets the share read.
 */
export async function readCsvBytes(
  bytes: Uint8Array,
  options: CsvReadOptions = {},
  onProgress?: (done: number, total: number) => void,
): Promise<CsvReadResult> {
  let prepared: { text: string; delimiter: string };
  try {
    const plain = plainFile(bytes);
    if (plain) {
      const read = await readPlainBytes(plain, options, onProgress);
      if (read) return read;
    }
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
        complete: () => (failure === null ? resolve() : reject(failure instanceof Error ? failure : new Error(String(failure)))),
        error: (error: Error) => reject(error),
      });
    });
    reader ??= new CsvRowReader(options, delimiter);
    const batch = reader.finish();
    return { batch, issues: reader.issues, layout: reader.layout, mapping: reader.mapping };
  } catch (error) {
    return refuse(error);
  }
}

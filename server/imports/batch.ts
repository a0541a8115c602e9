/**
 * Assembles validated rows into a batch of assessments with their ratings, checking what no
 * single row can show: an assessment whose rows disagree (athlete, event, date, kind, panel
 * class), a classifier rating the same assessment twice (duplicate rows, or two different
 * classes), and assessments rated by a single classifier (kept, counted as not analysable).
 * No database: the planner compares the batch with the federation's data afterwards.
 */
import type { ImportLayout } from '../../shared/import-columns';
import { ASSESSMENT_KINDS, type AssessmentKind } from '../../shared/schemas/common';
import { formatClass } from '../../shared/scale';
import { rowIssue, type IssueList } from './issues';

export const KIND_CODES: readonly AssessmentKind[] = ASSESSMENT_KINDS;

/** The batch in columns (compact to keep and to stage as JSON). */
export interface ValidatedBatch {
  layout: ImportLayout;
  /** Column names as written in the file (or the API's field names), indexed by `column`. */
  columns: string[];
  /** Data rows read (blank rows not counted). */
  rows: number;
  assessments: {
    externalId: string[];
    athleteCode: string[];
    eventCode: string[];
    assessedOn: string[];
    /** Index into KIND_CODES, or -1 when not given. */
    kind: number[];
    panelClass: (number | null)[];
    note: (string | null)[];
    row: number[];
    line: (number | null)[];
  };
  ratings: {
    assessment: number[];
    classifierCode: string[];
    sportClass: number[];
    row: number[];
    line: (number | null)[];
    /** Index into `columns` of the column that named the classifier. */
    column: number[];
  };
  notAnalysable: number;
}

export interface AssessmentFields {
  externalId: string;
  athleteCode: string;
  eventCode: string;
  assessedOn: string;
  kind: AssessmentKind | null;
  panelClass: number | null;
  note: string | null;
}

/** Where a row came from, and the names of its columns for messages. */
export interface RowPlace {
  row: number;
  line: number | null;
  /** Column names for the assessment's fields. */
  names: {
    assessment_id: string;
    athlete_code: string;
    event_code: string;
    assessed_on: string;
    kind: string;
    panel_class: string;
    note: string;
  };
}

/** A growable column of 32-bit integers. */
class Int32Column {
  data = new Int32Array(1024);
  length = 0;
  push(x: number): void {
    if (this.length === this.data.length) {
      const bigger = new Int32Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = x;
  }
  view(): Int32Array {
    return this.data.subarray(0, this.length);
  }
}

/** A growable column of 8-bit integers (kinds and classes). */
class Int8Column {
  data = new Int8Array(1024);
  length = 0;
  push(x: number): void {
    if (this.length === this.data.length) {
      const bigger = new Int8Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = x;
  }
  view(): Int8Array {
    return this.data.subarray(0, this.length);
  }
}

/** Strings interned once: text → index, index → text. */
export class Dictionary {
  readonly values: string[] = [];
  private readonly index = new Map<string, number>();
  intern(value: string): number {
    let i = this.index.get(value);
    if (i === undefined) {
      i = this.values.length;
      this.index.set(value, i);
      this.values.push(value);
    }
    return i;
  }
  get(value: string): number | undefined {
    return this.index.get(value);
  }
}

/**
 * The batch in typed columns, with codes interned once (what the command line builds its
 * RatingSet from). Indices −1 stand for "not given".
 */
export interface BatchCore {
  layout: ImportLayout;
  columns: string[];
  rows: number;
  notAnalysable: number;
  athletes: readonly string[];
  events: readonly string[];
  dates: readonly string[];
  classifiers: readonly string[];
  assessments: {
    externalId: readonly string[];
    athlete: Int32Array;
    event: Int32Array;
    date: Int32Array;
    /** Index into KIND_CODES, or −1. */
    kind: Int8Array;
    /** Half points, or −1 when not given. */
    panelClass: Int8Array;
    note: readonly (string | null)[];
    row: Int32Array;
    /** −1 when there is no line (the batch API). */
    line: Int32Array;
  };
  ratings: {
    assessment: Int32Array;
    classifier: Int32Array;
    sportClass: Int8Array;
    row: Int32Array;
    line: Int32Array;
    column: Int32Array;
  };
}

/**
 * Builds a batch row by row, in typed columns with interned codes. Two doors: `assessment` and
 * `rating` take the values as text (the batch API, rows of the text reader); `assessmentOf` and
 * `ratingOf` take dictionary indices (the byte reader, which interns each distinct value once).
 * Both check the same things and say the same.
 */
export class BatchBuilder {
  readonly layout: ImportLayout;
  readonly columns: string[];
  private readonly issues: IssueList;
  readonly athletes = new Dictionary();
  readonly events = new Dictionary();
  readonly dates = new Dictionary();
  readonly classifiers = new Dictionary();
  private readonly byExternal = new Map<string, number>();
  private readonly externalId: string[] = [];
  private readonly note: (string | null)[] = [];
  private readonly aAthlete = new Int32Column();
  private readonly aEvent = new Int32Column();
  private readonly aDate = new Int32Column();
  private readonly aKind = new Int8Column();
  private readonly aPanel = new Int8Column();
  private readonly aRow = new Int32Column();
  private readonly aLine = new Int32Column();
  /** Per assessment: its last rating, and per rating the one before it of the same assessment (−1 ends). */
  private readonly lastRating = new Int32Column();
  private readonly prevRating = new Int32Column();
  private readonly rAssessment = new Int32Column();
  private readonly rClassifier = new Int32Column();
  private readonly rClass = new Int8Column();
  private readonly rRow = new Int32Column();
  private readonly rLine = new Int32Column();
  private readonly rColumn = new Int32Column();
  rows = 0;
  private notAnalysable = 0;

  constructor(layout: ImportLayout, columns: string[], issues: IssueList) {
    this.layout = layout;
    this.columns = columns;
    this.issues = issues;
  }

  /** How many assessments (the first ones) `byExternal` holds: it catches up when asked. */
  private mapped = 0;

  /** The index of an assessment already in the batch, or −1. */
  known(externalId: string): number {
    const ids = this.externalId;
    const last = ids.length - 1;
    if (last >= 0 && ids[last] === externalId) return last;
    for (; this.mapped < ids.length; this.mapped++) this.byExternal.set(ids[this.mapped], this.mapped);
    return this.byExternal.get(externalId) ?? -1;
  }

  /** How many assessments the batch has. */
  get assessmentCount(): number {
    return this.externalId.length;
  }

  /**
   * The assessment of a row: new, or the same as an earlier row's (its fields must agree).
   * Returns its index, or -1 after reporting a disagreement.
   */
  assessment(fields: AssessmentFields, place: RowPlace): number {
    return this.assessmentOf(
      fields.externalId,
      this.known(fields.externalId),
      this.athletes.intern(fields.athleteCode),
      this.events.intern(fields.eventCode),
      this.dates.intern(fields.assessedOn),
      fields.kind === null ? -1 : KIND_CODES.indexOf(fields.kind),
      fields.panelClass ?? -1,
      fields.note,
      place.row,
      place.line ?? -1,
      place.names,
    );
  }

  /** `assessment` with interned values; `existing` is `known(externalId)` (−1: a new assessment). */
  assessmentOf(
    externalId: string,
    existing: number,
    athlete: number,
    event: number,
    date: number,
    kind: number,
    panelClass: number,
    note: string | null,
    row: number,
    line: number,
    names: RowPlace['names'],
  ): number {
    if (existing < 0) {
      const i = this.externalId.length;
      this.externalId.push(externalId);
      this.aAthlete.push(athlete);
      this.aEvent.push(event);
      this.aDate.push(date);
      this.aKind.push(kind);
      this.aPanel.push(panelClass);
      this.note.push(note);
      this.aRow.push(row);
      this.aLine.push(line);
      this.lastRating.push(-1);
      return i;
    }
    const i = existing;
    const at = { row, line: line < 0 ? null : line };
    if (this.aAthlete.data[i] !== athlete)
      return this.differs(i, at, names.athlete_code, this.athletes.values[athlete], this.athletes.values[this.aAthlete.data[i]]);
    if (this.aEvent.data[i] !== event)
      return this.differs(i, at, names.event_code, this.events.values[event], this.events.values[this.aEvent.data[i]]);
    if (this.aDate.data[i] !== date)
      return this.differs(i, at, names.assessed_on, this.dates.values[date], this.dates.values[this.aDate.data[i]]);
    if (kind >= 0) {
      const before = this.aKind.data[i];
      if (before === -1) this.aKind.data[i] = kind;
      else if (before !== kind) return this.differs(i, at, names.kind, KIND_CODES[kind], KIND_CODES[before]);
    }
    if (panelClass >= 0) {
      const pc = this.aPanel.data[i];
      if (pc < 0) this.aPanel.data[i] = panelClass;
      else if (pc !== panelClass) return this.differs(i, at, names.panel_class, formatClass(panelClass), formatClass(pc));
    }
    if (note !== null) {
      const before = this.note[i];
      if (before === null || before === undefined) this.note[i] = note;
      else if (before !== note) return this.differs(i, at, names.note, note, before);
    }
    return i;
  }

  private differs(i: number, place: { row: number; line: number | null }, column: string, value: string, earlier: string): number {
    this.issues.error(
      rowIssue(
        place.row,
        place.line,
        column,
        value,
        `differs from row ${this.aRow.data[i]} of assessment ${this.externalId[i]} ("${earlier}")`,
      ),
    );
    return -1;
  }

  /** One classifier's rating of an assessment; a second rating by the same classifier is an error. */
  rating(
    assessment: number,
    classifierCode: string,
    sportClass: number,
    place: { row: number; line: number | null },
    column: number,
  ): void {
    this.ratingOf(assessment, this.classifiers.intern(classifierCode), sportClass, place.row, place.line ?? -1, column);
  }

  /** `rating` with the classifier interned. */
  ratingOf(assessment: number, classifier: number, sportClass: number, row: number, line: number, column: number): void {
    const prev = this.prevRating.data;
    const cls = this.rClassifier.data;
    for (let k = this.lastRating.data[assessment]; k >= 0; k = prev[k]!) {
      if (cls[k] !== classifier) continue;
      const id = this.externalId[assessment];
      const name = this.columns[column] ?? 'classifier_code';
      const before = this.rClass.data[k];
      const problem =
        before === sportClass
          ? `rates assessment ${id} twice: a duplicate of row ${this.rRow.data[k]}`
          : `rates assessment ${id} twice with different classes: ${formatClass(before)} on row ${this.rRow.data[k]}, ${formatClass(sportClass)} here`;
      this.issues.error(rowIssue(row, line < 0 ? null : line, name, this.classifiers.values[classifier], problem));
      return;
    }
    const k = this.rAssessment.length;
    this.prevRating.push(this.lastRating.data[assessment]);
    this.lastRating.data[assessment] = k;
    this.rAssessment.push(assessment);
    this.rClassifier.push(classifier);
    this.rClass.push(sportClass);
    this.rRow.push(row);
    this.rLine.push(line);
    this.rColumn.push(column);
  }

  /** Counts assessments rated by a single classifier (warnings, not errors) and returns the typed batch. */
  finishCore(idColumn: string): BatchCore {
    const n = this.externalId.length;
    const count = new Int32Array(n);
    const ra = this.rAssessment.view();
    for (let k = 0; k < ra.length; k++) count[ra[k]]++;
    this.notAnalysable = 0;
    for (let i = 0; i < n; i++) {
      if (count[i] !== 1) continue;
      this.notAnalysable++;
      const line = this.aLine.data[i];
      this.issues.warning(
        rowIssue(
          this.aRow.data[i],
          line < 0 ? null : line,
          idColumn,
          this.externalId[i],
          'has ratings from a single classifier: it is kept, but it is not analysable for agreement',
        ),
      );
    }
    return {
      layout: this.layout,
      columns: this.columns,
      rows: this.rows,
      notAnalysable: this.notAnalysable,
      athletes: this.athletes.values,
      events: this.events.values,
      dates: this.dates.values,
      classifiers: this.classifiers.values,
      assessments: {
        externalId: this.externalId,
        athlete: this.aAthlete.view(),
        event: this.aEvent.view(),
        date: this.aDate.view(),
        kind: this.aKind.view(),
        panelClass: this.aPanel.view(),
        note: this.note,
        row: this.aRow.view(),
        line: this.aLine.view(),
      },
      ratings: {
        assessment: ra,
        classifier: this.rClassifier.view(),
        sportClass: this.rClass.view(),
        row: this.rRow.view(),
        line: this.rLine.view(),
        column: this.rColumn.view(),
      },
    };
  }

  /** Counts assessments rated by a single classifier (warnings, not errors) and returns the batch. */
  finish(idColumn: string): ValidatedBatch {
    return batchOfCore(this.finishCore(idColumn));
  }
}

/** The batch in plain arrays of text and numbers (what the planner, the writer and the staging file use). */
export function batchOfCore(core: BatchCore): ValidatedBatch {
  const a = core.assessments;
  const r = core.ratings;
  const n = a.externalId.length;
  const m = r.assessment.length;
  const lineOf = (x: number) => (x < 0 ? null : x);
  const assessments: ValidatedBatch['assessments'] = {
    externalId: a.externalId.slice(),
    athleteCode: new Array<string>(n),
    eventCode: new Array<string>(n),
    assessedOn: new Array<string>(n),
    kind: new Array<number>(n),
    panelClass: new Array<number | null>(n),
    note: a.note.slice(),
    row: new Array<number>(n),
    line: new Array<number | null>(n),
  };
  for (let i = 0; i < n; i++) {
    assessments.athleteCode[i] = core.athletes[a.athlete[i]]!;
    assessments.eventCode[i] = core.events[a.event[i]]!;
    assessments.assessedOn[i] = core.dates[a.date[i]]!;
    assessments.kind[i] = a.kind[i]!;
    assessments.panelClass[i] = a.panelClass[i] < 0 ? null : a.panelClass[i];
    assessments.row[i] = a.row[i]!;
    assessments.line[i] = lineOf(a.line[i]);
  }
  const ratings: ValidatedBatch['ratings'] = {
    assessment: new Array<number>(m),
    classifierCode: new Array<string>(m),
    sportClass: new Array<number>(m),
    row: new Array<number>(m),
    line: new Array<number | null>(m),
    column: new Array<number>(m),
  };
  for (let k = 0; k < m; k++) {
    ratings.assessment[k] = r.assessment[k]!;
    ratings.classifierCode[k] = core.classifiers[r.classifier[k]]!;
    ratings.sportClass[k] = r.sportClass[k]!;
    ratings.row[k] = r.row[k]!;
    ratings.line[k] = lineOf(r.line[k]);
    ratings.column[k] = r.column[k]!;
  }
  return { layout: core.layout, columns: core.columns, rows: core.rows, assessments, ratings, notAnalysable: core.notAnalysable };
}

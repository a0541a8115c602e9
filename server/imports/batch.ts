/**
 * Assembles validated rows into a batch of assessments with their ratings, checking what no
 * single row can show: an assessment whose rows disagree (athlete, event, date, kind, panel
 * class), a classifier rating the same assessment twice (duplicate rows, or two different
 * classes), and assessments rated by a single classifier (kept, counted as not analysable).
 * No database: the planner compares the batch with the federation's data afterwards.
 */
import type { ImportLayout } from '../../shared/import-columns';
import type { AssessmentKind } from '../analysis';
import { formatClass } from '../../shared/scale';
import { rowIssue, type IssueList } from './issues';

export const KIND_CODES: readonly AssessmentKind[] = ['first', 'review', 'protest'];

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
  names: { assessment_id: string; athlete_code: string; event_code: string; assessed_on: string; kind: string; panel_class: string; note: string };
}

export class BatchBuilder {
  readonly batch: ValidatedBatch;
  private readonly issues: IssueList;
  private readonly index = new Map<string, number>();
  /** Per assessment: indexes of its ratings. */
  private readonly ratingsOf: number[][] = [];

  constructor(layout: ImportLayout, columns: string[], issues: IssueList) {
    this.issues = issues;
    this.batch = {
      layout,
      columns,
      rows: 0,
      assessments: { externalId: [], athleteCode: [], eventCode: [], assessedOn: [], kind: [], panelClass: [], note: [], row: [], line: [] },
      ratings: { assessment: [], classifierCode: [], sportClass: [], row: [], line: [], column: [] },
      notAnalysable: 0,
    };
  }

  /**
   * The assessment of a row: new, or the same as an earlier row's (its fields must agree).
   * Returns its index, or -1 after reporting a disagreement.
   */
  assessment(fields: AssessmentFields, place: RowPlace): number {
    const a = this.batch.assessments;
    const last = a.externalId.length - 1;
    const existing = last >= 0 && a.externalId[last] === fields.externalId ? last : this.index.get(fields.externalId);
    if (existing === undefined) {
      const i = a.externalId.length;
      this.index.set(fields.externalId, i);
      a.externalId.push(fields.externalId);
      a.athleteCode.push(fields.athleteCode);
      a.eventCode.push(fields.eventCode);
      a.assessedOn.push(fields.assessedOn);
      a.kind.push(fields.kind === null ? -1 : KIND_CODES.indexOf(fields.kind));
      a.panelClass.push(fields.panelClass);
      a.note.push(fields.note);
      a.row.push(place.row);
      a.line.push(place.line);
      this.ratingsOf.push([]);
      return i;
    }
    const i = existing;
    if (a.athleteCode[i] !== fields.athleteCode) return this.differs(i, place, place.names.athlete_code, fields.athleteCode, a.athleteCode[i]!);
    if (a.eventCode[i] !== fields.eventCode) return this.differs(i, place, place.names.event_code, fields.eventCode, a.eventCode[i]!);
    if (a.assessedOn[i] !== fields.assessedOn) return this.differs(i, place, place.names.assessed_on, fields.assessedOn, a.assessedOn[i]!);
    if (fields.kind !== null) {
      const k = KIND_CODES.indexOf(fields.kind);
      if (a.kind[i] === -1) a.kind[i] = k;
      else if (a.kind[i] !== k) return this.differs(i, place, place.names.kind, fields.kind, KIND_CODES[a.kind[i]!]!);
    }
    if (fields.panelClass !== null) {
      const pc = a.panelClass[i];
      if (pc === null || pc === undefined) a.panelClass[i] = fields.panelClass;
      else if (pc !== fields.panelClass) return this.differs(i, place, place.names.panel_class, formatClass(fields.panelClass), formatClass(pc));
    }
    if (fields.note !== null) {
      const note = a.note[i];
      if (note === null || note === undefined) a.note[i] = fields.note;
      else if (note !== fields.note) return this.differs(i, place, place.names.note, fields.note, note);
    }
    return i;
  }

  private differs(i: number, place: RowPlace, column: string, value: string, earlier: string): number {
    const a = this.batch.assessments;
    this.issues.error(rowIssue(place.row, place.line, column, value, `differs from row ${a.row[i]} of assessment ${a.externalId[i]} ("${earlier}")`));
    return -1;
  }

  /** One classifier's rating of an assessment; a second rating by the same classifier is an error. */
  rating(assessment: number, classifierCode: string, sportClass: number, place: { row: number; line: number | null }, column: number): void {
    const r = this.batch.ratings;
    for (const k of this.ratingsOf[assessment]!) {
      if (r.classifierCode[k] !== classifierCode) continue;
      const id = this.batch.assessments.externalId[assessment]!;
      const name = this.batch.columns[column] ?? 'classifier_code';
      const problem =
        r.sportClass[k] === sportClass
          ? `rates assessment ${id} twice: a duplicate of row ${r.row[k]}`
          : `rates assessment ${id} twice with different classes: ${formatClass(r.sportClass[k]!)} on row ${r.row[k]}, ${formatClass(sportClass)} here`;
      this.issues.error(rowIssue(place.row, place.line, name, classifierCode, problem));
      return;
    }
    this.ratingsOf[assessment]!.push(r.assessment.length);
    r.assessment.push(assessment);
    r.classifierCode.push(classifierCode);
    r.sportClass.push(sportClass);
    r.row.push(place.row);
    r.line.push(place.line);
    r.column.push(column);
  }

  /** Counts assessments rated by a single classifier (warnings, not errors) and returns the batch. */
  finish(idColumn: string): ValidatedBatch {
    const a = this.batch.assessments;
    this.ratingsOf.forEach((ratings, i) => {
      if (ratings.length === 1) {
        this.batch.notAnalysable++;
        this.issues.warning(
          rowIssue(a.row[i]!, a.line[i]!, idColumn, a.externalId[i]!, 'has ratings from a single classifier: it is kept, but it is not analysable for agreement'),
        );
      }
    });
    return this.batch;
  }
}

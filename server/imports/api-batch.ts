/**
 * The batch API's items (a JSON array of assessments with their ratings) read into the same
 * validated batch as a CSV, through the same field validators and the same checks; problems
 * name the item (its index in the array), the field and the value.
 */
import { batchRequestSchema, type BatchIssue, type ImportIssue } from '../../shared/schemas/imports';
import { DEFAULT_SCALE, type ClassScale } from '../../shared/scale';
import { BatchBuilder, type ValidatedBatch } from './batch';
import { fieldValidators } from './fields';
import { IssueList, rowIssue, shownValue } from './issues';

const MAX_RATINGS = 10;
const ASSESSMENT_FIELDS = ['assessment_id', 'athlete_code', 'event_code', 'assessed_on', 'kind', 'panel_class', 'note'] as const;

/** Columns of a batch: the assessment's fields, then each rating's classifier code. */
function batchColumns(): string[] {
  const columns: string[] = [...ASSESSMENT_FIELDS];
  for (let j = 0; j < MAX_RATINGS; j++) columns.push(`ratings[${j}].classifier_code`);
  return columns;
}

/** An import issue (row = item index) in the API's words. */
export function toBatchIssue(issue: ImportIssue): BatchIssue {
  return {
    item: issue.row,
    field: issue.column,
    value: issue.value,
    message: issue.message
      .replace(/\bRow (\d+)/g, 'Item $1')
      .replace(/\brow (\d+)/g, 'item $1')
      .replace(', column ', ', field '),
  };
}

function valueAt(input: unknown, path: PropertyKey[]): unknown {
  let at: unknown = input;
  for (const key of path) {
    if (at === null || typeof at !== 'object') return undefined;
    at = (at as Record<PropertyKey, unknown>)[key];
  }
  return at;
}

export interface BatchRead {
  batch: ValidatedBatch | null;
  issues: IssueList;
}

export function readBatchItems(input: unknown, scale: ClassScale = DEFAULT_SCALE): BatchRead {
  const issues = new IssueList();
  const parsed = batchRequestSchema.safeParse(input);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) {
      const [item, ...rest] = issue.path;
      const index = typeof item === 'number' ? item : null;
      const field = rest.map((p, k) => (typeof p === 'number' ? `[${p}]` : k === 0 ? String(p) : `.${String(p)}`)).join('') || null;
      const value = index === null ? undefined : valueAt(input, issue.path);
      const shown = value === undefined ? null : shownValue(typeof value === 'object' ? JSON.stringify(value) : value);
      const where = [index !== null ? `Item ${index}` : 'The body', field ? `field ${field}` : null].filter(Boolean).join(', ');
      issues.error({
        row: index,
        line: null,
        column: field,
        value: shown,
        message: `${where}: ${shown !== null ? `value "${shown}" ` : ''}${issue.message}`,
      });
    }
    return { batch: null, issues };
  }
  const v = fieldValidators(scale, 'iso');
  const columns = batchColumns();
  const builder = new BatchBuilder('long', columns, issues);
  const names = {
    assessment_id: 'assessment_id',
    athlete_code: 'athlete_code',
    event_code: 'event_code',
    assessed_on: 'assessed_on',
    kind: 'kind',
    panel_class: 'panel_class',
    note: 'note',
  };
  parsed.data.forEach((item, index) => {
    let bad = false;
    const check = <T>(
      field: string,
      raw: string | undefined,
      validator: (raw: string | undefined) => { ok: true; value: T } | { ok: false; message: string },
      fallback: T,
    ): T => {
      const r = validator(raw);
      if (r.ok) return r.value;
      bad = true;
      issues.error(rowIssue(index, null, field, raw ?? '', r.message));
      return fallback;
    };
    const externalId = check('assessment_id', item.assessment_id, v.code, '');
    const athleteCode = check('athlete_code', item.athlete_code, v.code, '');
    const eventCode = check('event_code', item.event_code, v.code, '');
    const assessedOn = check('assessed_on', item.assessed_on, v.date, '');
    const panelClass = check(
      'panel_class',
      item.panel_class === null || item.panel_class === undefined ? '' : String(item.panel_class),
      v.panelClass,
      null,
    );
    const note = check('note', item.note ?? '', v.note, null);
    const ratings = item.ratings.map((rating, j) => ({
      code: check(`ratings[${j}].classifier_code`, rating.classifier_code, v.code, ''),
      cls: check(`ratings[${j}].sport_class`, String(rating.sport_class), v.sportClass, 0),
      column: ASSESSMENT_FIELDS.length + j,
    }));
    if (bad) return;
    const a = builder.assessment(
      { externalId, athleteCode, eventCode, assessedOn, kind: item.kind ?? null, panelClass, note },
      { row: index, line: null, names },
    );
    if (a < 0) return;
    for (const r of ratings) builder.rating(a, r.code, r.cls, { row: index, line: null }, r.column);
  });
  const batch = builder.finish('assessment_id');
  batch.rows = parsed.data.length;
  return { batch, issues };
}

import type { ImportIssue, ImportIssueKind } from '../../shared/schemas/imports';

/** How many errors and warnings are kept in detail; the rest are only counted. */
export const ISSUE_DETAIL_LIMIT = 200;

const VALUE_SHOWN = 120;

/** A value as shown in a message: at most 120 characters. */
export function shownValue(value: unknown): string {
  const text = value === undefined || value === null ? '' : String(value);
  return text.length > VALUE_SHOWN ? `${text.slice(0, VALUE_SHOWN)}…` : text;
}

/** The kind of a problem: its column and its words without the values (quoted text, numbers, ids). */
function kindKey(issue: ImportIssue): string {
  const problem = problemOf(issue)
    .replace(/"[^"]*"/g, '"…"')
    .replace(/\(“[^”]*”\)/g, '')
    .replace(/\bassessment \S+/g, 'assessment …')
    .replace(/\S*\d\S*/g, '#');
  return `${issue.column ?? ''}\u0000${problem}`;
}

/** Collects errors and warnings, keeping the first 200 of each and counting all, in total and by kind. */
export class IssueList {
  readonly errors: ImportIssue[] = [];
  readonly warnings: ImportIssue[] = [];
  errorCount = 0;
  warningCount = 0;
  private readonly kinds = new Map<string, ImportIssueKind>();

  error(issue: ImportIssue): void {
    this.errorCount++;
    const shown = this.errors.length < ISSUE_DETAIL_LIMIT;
    if (shown) this.errors.push(issue);
    const key = kindKey(issue);
    let kind = this.kinds.get(key);
    if (!kind) this.kinds.set(key, (kind = { column: issue.column, problem: problemOf(issue).trim(), count: 0, shown: 0 }));
    kind.count++;
    if (shown) kind.shown++;
  }

  /** Every kind of error with how many there are and how many of them are among the errors listed (in order of first appearance). */
  errorKinds(): ImportIssueKind[] {
    return [...this.kinds.values()].map((k) => ({ ...k }));
  }

  warning(issue: ImportIssue): void {
    this.warningCount++;
    if (this.warnings.length < ISSUE_DETAIL_LIMIT) this.warnings.push(issue);
  }
}

/** An issue for a row and column, with its message as people read it. */
export function rowIssue(row: number | null, line: number | null, column: string | null, value: unknown, problem: string): ImportIssue {
  const shown = value === undefined ? null : shownValue(value);
  return { row, line, column, value: shown, message: describe(row, line, column, shown, problem) };
}

export function describe(row: number | null, line: number | null, column: string | null, value: string | null, problem: string): string {
  const parts: string[] = [];
  if (row !== null) parts.push(`Row ${row}${line !== null ? ` (line ${line})` : ''}`);
  else if (line !== null) parts.push(`Line ${line}`);
  if (column !== null) parts.push(`column ${column}`);
  const where = parts.join(', ');
  const what = value !== null ? `value "${value}" ${problem}` : problem;
  return where ? `${where}: ${what}` : what.charAt(0).toUpperCase() + what.slice(1);
}

/** A refusal of the file as a whole (not a CSV, empty, header problems, too large…). */
export class FileRefusal extends Error {
  readonly issues: ImportIssue[];
  constructor(issues: ImportIssue[]) {
    super(issues.map((i) => i.message).join('; '));
    this.name = 'FileRefusal';
    this.issues = issues;
  }
}

export function fileIssue(message: string, where: { row?: number; line?: number; column?: string; value?: string } = {}): ImportIssue {
  return {
    row: where.row ?? null,
    line: where.line ?? null,
    column: where.column ?? null,
    value: where.value === undefined ? null : shownValue(where.value),
    message,
  };
}

/** The problem of an issue without its "Row …, column …: value …" prefix. */
export function problemOf(issue: ImportIssue): string {
  if (issue.row === null && issue.column === null) return issue.message;
  const prefix = describe(issue.row, issue.line, issue.column, issue.value, '');
  return issue.message.startsWith(prefix) ? issue.message.slice(prefix.length) : issue.message;
}

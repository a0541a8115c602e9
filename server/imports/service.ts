/**
 * Imports of panel decisions: the dry run of an uploaded CSV (read, check, compare with the
 * federation's data, stage), its commit and revert, discarding a staged import, the history,
 * and the batch API. Every write is one transaction on the raw connection; a refused file or
 * batch writes nothing at all.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import {
  STAGED_IMPORT_DAYS,
  type UploadOptions,
  type DryRun,
  type ImportCounts,
  type ImportView,
  type BatchResult,
  type ImportStatus,
} from '../../shared/schemas/imports';
import type { FederationAccess } from '../auth/access';
import type { AppContext } from '../context';
import { HttpError, notFound } from '../http/errors';
import { auditSync } from '../services/audit';
import { bumpDataVersion } from '../services/data-version';
import type { ValidatedBatch } from './batch';
import { readBatchItems, toBatchIssue } from './api-batch';
import { readCsvBytes } from './csv-reader';
import { IssueList } from './issues';
import { planChangesSomething, planImport, type ImportPlan } from './plan';
import { readStaged, removeStaged, writeStaged } from './staging';
import { applyPlan, revertRows, RevertRefused } from './write';

export const MAX_UPLOAD_BYTES = 50 * 1024 * 1024;

type Federation = FederationAccess['federation'];

export interface Reporter {
  report(phase: 'reading' | 'checking' | 'writing' | 'reverting', done: number, total: number): void;
}

const silent: Reporter = { report: () => {} };

function scaleOf(federation: Federation) {
  return { min: federation.scaleMin, max: federation.scaleMax };
}

function rosterCodes(ctx: AppContext, federationId: number): string[] {
  return ctx.sqlite.prepare('select code from classifiers where federation_id = ?').pluck().all(federationId) as string[];
}

function sameFileAs(ctx: AppContext, federationId: number, hash: string | null): DryRun['sameFileAs'] {
  if (!hash) return null;
  const row = ctx.sqlite
    .prepare(
      "select id, committed_at from imports where federation_id = ? and file_hash = ? and status = 'committed' order by id desc limit 1",
    )
    .get(federationId, hash) as { id: number; committed_at: string | null } | undefined;
  return row ? { importId: row.id, committedAt: row.committed_at } : null;
}

/**
 * Reads, checks and compares an uploaded file without touching the federation's data. A file
 * that passes and would change something is staged as an import to commit.
 */
export async function dryRunCsv(
  ctx: AppContext,
  federation: Federation,
  userId: number | null,
  file: { bytes: Uint8Array; name: string | null },
  options: UploadOptions,
  reporter: Reporter = silent,
): Promise<DryRun> {
  const fileHash = crypto.createHash('sha256').update(file.bytes).digest('hex');
  const read = await readCsvBytes(
    file.bytes,
    {
      mapping: options.mapping,
      dateFormat: options.dateFormat,
      scale: scaleOf(federation),
      unknownColumns: 'reject',
      knownClassifierCodes: rosterCodes(ctx, federation.id),
    },
    (done, total) => reporter.report('reading', done, total),
  );
  const base = { fileName: file.name, fileHash, layout: read.layout, sameFileAs: sameFileAs(ctx, federation.id, fileHash) };
  const refused = (issues: IssueList, counts: ImportCounts | null): DryRun => ({
    ...base,
    importId: null,
    outcome: 'refused',
    counts,
    errorCount: issues.errorCount,
    errors: issues.errors,
    errorKinds: issues.errorKinds(),
    warningCount: issues.warningCount,
    warnings: issues.warnings,
  });
  if (!read.batch) return refused(read.issues, null);
  // Compared with the federation's data even when rows have problems, so that every kind of
  // problem (unknown classifiers too) is counted in this round, not after the first is fixed.
  reporter.report('checking', 0, 1);
  const plan = planImport(ctx.sqlite, federation.id, read.batch, { addClassifiers: options.addClassifiers }, read.issues);
  if (read.issues.errorCount > 0) return refused(read.issues, plan.counts);
  const answer = (importId: number | null, outcome: DryRun['outcome']): DryRun => ({
    ...base,
    importId,
    outcome,
    counts: plan.counts,
    errorCount: 0,
    errors: [],
    errorKinds: [],
    warningCount: read.issues.warningCount,
    warnings: read.issues.warnings,
    athleteChanges: plan.athleteChanges,
    athleteChangeCount: plan.athleteChangeCount,
    expiresAt: importId === null ? null : expiryOf(ctx, importId),
  });
  if (!planChangesSomething(plan.counts)) return answer(null, 'nothing-to-do');

  const importId = Number(
    ctx.sqlite
      .prepare(
        "insert into imports (federation_id, user_id, source, file_name, file_hash, status, counts) values (?, ?, 'csv', ?, ?, 'staged', ?)",
      )
      .run(federation.id, userId, file.name, fileHash, JSON.stringify(plan.counts)).lastInsertRowid,
  );
  try {
    await writeStaged(ctx, importId, { federationId: federation.id, addClassifiers: options.addClassifiers, batch: read.batch });
  } catch (error) {
    ctx.sqlite.prepare('delete from imports where id = ?').run(importId);
    throw error;
  }
  return answer(importId, 'ready');
}

interface ImportRow {
  id: number;
  federation_id: number;
  status: ImportStatus;
  source: 'csv' | 'api' | 'seed';
  counts: string;
}

function importRow(ctx: AppContext, federationId: number, importId: number): ImportRow {
  const row = ctx.sqlite
    .prepare('select id, federation_id, status, source, counts from imports where id = ? and federation_id = ?')
    .get(importId, federationId) as ImportRow | undefined;
  if (!row) throw notFound('The import');
  return row;
}

/**
 * Writes a batch as import `importId` in the caller's transaction: plans again against the data
 * as it is now (another import may have come in since the dry run), refuses on any error, writes.
 */
function writeBatch(
  ctx: AppContext,
  federationId: number,
  importId: number,
  batch: ValidatedBatch,
  addClassifiers: boolean,
  confirmAthleteChanges = true,
): { plan: ImportPlan; issues: IssueList; unconfirmed?: true } {
  const issues = new IssueList();
  const plan = planImport(ctx.sqlite, federationId, batch, { addClassifiers }, issues);
  if (issues.errorCount > 0) return { plan, issues };
  if (plan.athleteChangeCount > 0 && !confirmAthleteChanges) return { plan, issues, unconfirmed: true };
  applyPlan(ctx.sqlite, federationId, importId, batch, plan);
  return { plan, issues };
}

/** When a staged import expires: STAGED_IMPORT_DAYS after it was checked. */
function expiryOf(ctx: AppContext, importId: number): string | null {
  const created = ctx.sqlite.prepare('select created_at from imports where id = ?').pluck().get(importId) as string | undefined;
  if (!created) return null;
  return new Date(Date.parse(created) + STAGED_IMPORT_DAYS * DAY_MS).toISOString();
}

const DAY_MS = 24 * 60 * 60 * 1000;

/**
 * Expires checked files that were never committed: staged imports older than `days` (default
 * STAGED_IMPORT_DAYS) become `expired` (kept in the history with a note) and their staged batch
 * is removed. Awaitable; call it at start and once a day. Returns the ids it expired.
 */
export async function expireStagedImports(ctx: AppContext, options: { now?: Date; days?: number } = {}): Promise<number[]> {
  const now = options.now ?? new Date();
  const cutoff = new Date(now.getTime() - (options.days ?? STAGED_IMPORT_DAYS) * DAY_MS).toISOString();
  const rows = ctx.sqlite.prepare("select id, federation_id from imports where status = 'staged' and created_at < ?").all(cutoff) as {
    id: number;
    federation_id: number;
  }[];
  const expired: number[] = [];
  for (const row of rows) {
    const changed = ctx.sqlite.transaction(() => {
      const result = ctx.sqlite.prepare("update imports set status = 'expired' where id = ? and status = 'staged'").run(row.id);
      if (result.changes === 1)
        auditSync(ctx.sqlite, {
          federationId: row.federation_id,
          userId: null,
          action: 'import.expire',
          entity: 'import',
          entityId: row.id,
          detail: {
            expiredAt: now.toISOString(),
            days: options.days ?? STAGED_IMPORT_DAYS,
          },
        });
      return result.changes === 1;
    })();
    if (!changed) continue;
    await removeStaged(ctx, row.id);
    expired.push(row.id);
  }
  return expired;
}

/** Runs expireStagedImports now and then daily; `stop()` ends it; `idle()` awaits the run in progress. */
export function scheduleStagedImportExpiry(
  ctx: AppContext,
  onError: (error: unknown) => void = () => {},
): { stop(): void; idle(): Promise<void> } {
  let running: Promise<void> = Promise.resolve();
  const run = () => {
    running = running
      .then(() => expireStagedImports(ctx))
      .then(
        () => undefined,
        (error: unknown) => onError(error),
      );
  };
  run();
  const timer = setInterval(run, DAY_MS);
  timer.unref();
  return { stop: () => clearInterval(timer), idle: () => running };
}

/** Commits a staged import in one transaction. */
export async function commitImport(
  ctx: AppContext,
  federation: Federation,
  userId: number | null,
  importId: number,
  reporter: Reporter = silent,
  options: { confirmAthleteChanges?: boolean } = {},
): Promise<ImportView> {
  const row = importRow(ctx, federation.id, importId);
  if (row.status !== 'staged') throw new HttpError(409, 'conflict', `The import is ${row.status}, not waiting to be committed`);
  const staged = await readStaged(ctx, importId);
  if (!staged || staged.federationId !== federation.id) {
    throw new HttpError(410, 'gone', 'The checked file is no longer kept on the server: upload it again');
  }
  const total = staged.batch.assessments.externalId.length + staged.batch.ratings.assessment.length;
  reporter.report('writing', 0, total);
  const result = ctx.sqlite
    .transaction(() => {
      // Re-read inside the transaction: a concurrent commit of the same import loses here.
      const now = ctx.sqlite.prepare('select status from imports where id = ?').pluck().get(importId);
      if (now !== 'staged') return { conflict: true as const };
      const written = writeBatch(ctx, federation.id, importId, staged.batch, staged.addClassifiers, options.confirmAthleteChanges === true);
      if (written.issues.errorCount > 0) return { issues: written.issues };
      if (written.unconfirmed) return { unconfirmed: written.plan };
      ctx.sqlite
        .prepare("update imports set status = 'committed', counts = ?, committed_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where id = ?")
        .run(JSON.stringify(written.plan.counts), importId);
      auditSync(ctx.sqlite, {
        federationId: federation.id,
        userId,
        action: 'import.commit',
        entity: 'import',
        entityId: importId,
        detail: { counts: written.plan.counts },
      });
      return { counts: written.plan.counts };
    })
    .immediate();
  if ('conflict' in result) throw new HttpError(409, 'conflict', 'The import is no longer waiting to be committed');
  if ('unconfirmed' in result && result.unconfirmed) {
    const n = result.unconfirmed.athleteChangeCount;
    throw new HttpError(
      409,
      'conflict',
      `The file gives ${n} ${n === 1 ? 'stored assessment' : 'stored assessments'} to another athlete: confirm ${n === 1 ? 'this change' : 'these changes'} to commit`,
      { athleteChangeCount: n, athleteChanges: result.unconfirmed.athleteChanges },
    );
  }
  if ('issues' in result && result.issues) {
    throw new HttpError(409, 'conflict', 'The data changed since the dry run and the file no longer passes: check it again', {
      errorCount: result.issues.errorCount,
      errors: result.issues.errors,
    });
  }
  reporter.report('writing', total, total);
  await removeStaged(ctx, importId);
  const view = importView(ctx, federation.id, importId);
  // Last, with nothing awaited after it: listeners may start background work (flag evaluation)
  // that should not hold up the answer to the lead.
  bumpDataVersion(ctx, federation.id);
  return view;
}

/** Why an import cannot be reverted now, or null. */
function revertBlocker(ctx: AppContext, row: ImportRow): string | null {
  if (row.status !== 'committed') return `The import is ${row.status}`;
  if (row.source === 'seed') return 'The demo data cannot be reverted';
  const later = ctx.sqlite
    .prepare("select id from imports where federation_id = ? and id > ? and status = 'committed' order by id limit 1")
    .pluck()
    .get(row.federation_id, row.id) as number | undefined;
  return later === undefined ? null : `Import #${later} came later: revert it first`;
}

export async function revertImport(
  ctx: AppContext,
  federation: Federation,
  userId: number | null,
  importId: number,
  reporter: Reporter = silent,
): Promise<ImportView> {
  const row = importRow(ctx, federation.id, importId);
  const blocker = revertBlocker(ctx, row);
  if (blocker) throw new HttpError(409, 'conflict', blocker);
  reporter.report('reverting', 0, 1);
  try {
    ctx.sqlite
      .transaction(() => {
        const again = importRow(ctx, federation.id, importId);
        const stillBlocked = revertBlocker(ctx, again);
        if (stillBlocked) throw new RevertRefused(stillBlocked);
        revertRows(ctx.sqlite, importId);
        ctx.sqlite
          .prepare("update imports set status = 'reverted', reverted_at = strftime('%Y-%m-%dT%H:%M:%fZ','now') where id = ?")
          .run(importId);
        auditSync(ctx.sqlite, {
          federationId: federation.id,
          userId,
          action: 'import.revert',
          entity: 'import',
          entityId: importId,
          detail: { counts: JSON.parse(again.counts) as unknown },
        });
      })
      .immediate();
  } catch (error) {
    if (error instanceof RevertRefused) throw new HttpError(409, 'conflict', `The import cannot be reverted: ${error.message}`);
    if ((error as { code?: string }).code === 'SQLITE_CONSTRAINT_FOREIGNKEY') {
      throw new HttpError(409, 'conflict', 'The import cannot be reverted: other records now refer to what it added');
    }
    throw error;
  }
  reporter.report('reverting', 1, 1);
  const view = importView(ctx, federation.id, importId);
  bumpDataVersion(ctx, federation.id);
  return view;
}

export async function discardImport(ctx: AppContext, federation: Federation, userId: number | null, importId: number): Promise<void> {
  const row = importRow(ctx, federation.id, importId);
  if (row.status !== 'staged')
    throw new HttpError(409, 'conflict', `The import is ${row.status}: only a checked file waiting to be committed can be discarded`);
  ctx.sqlite.transaction(() => {
    const result = ctx.sqlite.prepare("update imports set status = 'discarded' where id = ? and status = 'staged'").run(importId);
    if (result.changes === 1)
      auditSync(ctx.sqlite, { federationId: federation.id, userId, action: 'import.discard', entity: 'import', entityId: importId });
  })();
  await removeStaged(ctx, importId);
}

interface HistoryRow {
  id: number;
  federation_id: number;
  source: 'csv' | 'api' | 'seed';
  file_name: string | null;
  status: ImportStatus;
  counts: string;
  created_at: string;
  committed_at: string | null;
  reverted_at: string | null;
  by: string | null;
}

const HISTORY_SQL = `select imports.id, imports.federation_id, imports.source, imports.file_name, imports.status, imports.counts,
       imports.created_at, imports.committed_at, imports.reverted_at, users.display_name as by
  from imports left join users on users.id = imports.user_id
 where imports.federation_id = ?`;

function toView(ctx: AppContext, row: HistoryRow): ImportView {
  let counts: ImportView['counts'] = null;
  try {
    const raw = JSON.parse(row.counts) as Record<string, unknown>;
    // The demo seed records plain totals: show them as new records.
    for (const key of ['assessments', 'ratings'] as const)
      if (typeof raw[key] === 'number') raw[key] = { new: raw[key], changed: 0, unchanged: 0 };
    counts = raw;
  } catch {
    counts = null;
  }
  const blocker = revertBlocker(ctx, row);
  return {
    id: row.id,
    source: row.source,
    fileName: row.file_name,
    status: row.status,
    counts,
    by: row.by ?? (row.source === 'api' ? 'API token' : null),
    createdAt: row.created_at,
    committedAt: row.committed_at,
    revertedAt: row.reverted_at,
    revertable: blocker === null,
    revertBlockedBy: blocker,
    note:
      row.status === 'expired'
        ? `Checked but not committed within ${STAGED_IMPORT_DAYS} days: it expired and the checked file was removed. Upload the file again to import it.`
        : row.status === 'staged'
          ? `Waiting to be committed; it expires ${new Date(Date.parse(row.created_at) + STAGED_IMPORT_DAYS * DAY_MS).toISOString().slice(0, 10)} if it is not.`
          : null,
  };
}

export function importView(ctx: AppContext, federationId: number, importId: number): ImportView {
  const row = ctx.sqlite.prepare(`${HISTORY_SQL} and imports.id = ?`).get(federationId, importId) as HistoryRow | undefined;
  if (!row) throw notFound('The import');
  return toView(ctx, row);
}

export function listImports(ctx: AppContext, federationId: number): ImportView[] {
  const rows = ctx.sqlite
    .prepare(`${HISTORY_SQL} and imports.status != 'discarded' order by imports.id desc limit 500`)
    .all(federationId) as HistoryRow[];
  return rows.map((row) => toView(ctx, row));
}

/** Thrown by importBatch when items are refused; the route answers 422 with every issue. */
export class BatchRefused extends Error {
  readonly issues: IssueList;
  constructor(issues: IssueList) {
    super(`${issues.errorCount} problem(s) in the batch`);
    this.issues = issues;
  }
}

/**
 * The batch API: checks every item, then (unless a dry run) writes them all in one transaction
 * or nothing. Idempotent by natural key: posting the same items again changes nothing.
 */
export function importBatch(
  ctx: AppContext,
  federation: Federation,
  userId: number | null,
  items: unknown,
  options: { dryRun: boolean; addClassifiers: boolean },
): { status: 200 | 201; body: BatchResult } {
  const read = readBatchItems(items, scaleOf(federation));
  if (!read.batch || read.issues.errorCount > 0) throw new BatchRefused(read.issues);
  const batch = read.batch;
  const warnings = read.issues.warnings.map(toBatchIssue);
  const preview = planImport(ctx.sqlite, federation.id, batch, { addClassifiers: options.addClassifiers }, read.issues);
  if (read.issues.errorCount > 0) throw new BatchRefused(read.issues);
  if (options.dryRun) return { status: 200, body: { importId: null, outcome: 'dry-run', counts: preview.counts, warnings } };
  if (!planChangesSomething(preview.counts))
    return { status: 200, body: { importId: null, outcome: 'nothing-to-do', counts: preview.counts, warnings } };
  const hash = crypto.createHash('sha256').update(JSON.stringify(items)).digest('hex');
  const result = ctx.sqlite
    .transaction(() => {
      const importId = Number(
        ctx.sqlite
          .prepare(
            "insert into imports (federation_id, user_id, source, file_name, file_hash, status, counts, committed_at) values (?, ?, 'api', null, ?, 'committed', '{}', strftime('%Y-%m-%dT%H:%M:%fZ','now'))",
          )
          .run(federation.id, userId, hash).lastInsertRowid,
      );
      const written = writeBatch(ctx, federation.id, importId, batch, options.addClassifiers);
      if (written.issues.errorCount > 0) throw new BatchRefused(written.issues);
      ctx.sqlite.prepare('update imports set counts = ? where id = ?').run(JSON.stringify(written.plan.counts), importId);
      auditSync(ctx.sqlite, {
        federationId: federation.id,
        userId,
        action: 'import.commit',
        entity: 'import',
        entityId: importId,
        detail: { source: 'api', counts: written.plan.counts },
      });
      return { importId, counts: written.plan.counts };
    })
    .immediate();
  bumpDataVersion(ctx, federation.id);
  return { status: 201, body: { importId: result.importId, outcome: 'committed', counts: result.counts, warnings } };
}

/** Reads an uploaded temporary file and removes it. */
export async function takeUpload(path: string): Promise<Uint8Array> {
  try {
    return await fs.promises.readFile(path);
  } finally {
    await fs.promises.rm(path, { force: true });
  }
}

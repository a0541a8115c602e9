/**
 * Backup and restore of the SQLite database, for `panelwise backup` and `panelwise restore`.
 *
 * A backup uses SQLite's online backup API (better-sqlite3's `db.backup`) while the server runs:
 * after a first step of 100 pages the rest is copied in one step, inside one read transaction,
 * so the copy is one consistent state of the database; if another connection writes between
 * the steps, SQLite starts the copy over by itself. The copy is written to a temporary name,
 * checked with `PRAGMA integrity_check`, switched to a self-contained rollback journal and only
 * then renamed to the file asked for.
 *
 * A restore refuses while a server holds the database (its lock file names a live process),
 * checks the file (integrity, a Panelwise schema no newer than this version's migrations),
 * keeps the replaced database beside it, removes stale -wal/-shm files, and empties the staging
 * folder of dry runs (their import ids belong to the replaced database).
 */
import fs from 'node:fs';
import path from 'node:path';
import BetterSqlite3 from 'better-sqlite3';
import { serverHolding } from './server-lock';

export class OpsError extends Error {}

export interface DatabaseSummary {
  bytes: number;
  integrity: 'ok';
  /** The newest migration applied, or null for a database that was never migrated. */
  migration: string | null;
  federations: number;
  assessments: number;
  users: number;
}

function count(db: BetterSqlite3.Database, table: string): number {
  const exists = db.prepare("select 1 from sqlite_master where type = 'table' and name = ?").get(table);
  return exists ? (db.prepare(`select count(*) from "${table}"`).pluck().get() as number) : 0;
}

/** Opens a database file read-only and checks it: integrity_check must answer ok. */
export function inspectDatabase(file: string): DatabaseSummary {
  if (!fs.existsSync(file)) throw new OpsError(`${file} does not exist`);
  let db: BetterSqlite3.Database;
  try {
    db = new BetterSqlite3(file, { readonly: true, fileMustExist: true });
  } catch (error) {
    throw new OpsError(`${file} cannot be opened as a SQLite database: ${(error as Error).message}`);
  }
  try {
    let problems: string[];
    try {
      problems = (db.pragma('integrity_check') as { integrity_check: string }[]).map((r) => r.integrity_check);
    } catch (error) {
      throw new OpsError(`${file} is not a sound SQLite database: ${(error as Error).message}`);
    }
    if (problems.length !== 1 || problems[0] !== 'ok')
      throw new OpsError(`${file} fails integrity_check: ${problems.slice(0, 5).join('; ')}`);
    const migrated = db.prepare("select 1 from sqlite_master where type = 'table' and name = 'kysely_migration'").get();
    const migration = migrated
      ? ((db.prepare('select name from kysely_migration order by name desc limit 1').pluck().get() as string | undefined) ?? null)
      : null;
    return {
      bytes: fs.statSync(file).size,
      integrity: 'ok',
      migration,
      federations: count(db, 'federations'),
      assessments: count(db, 'assessments'),
      users: count(db, 'users'),
    };
  } finally {
    db.close();
  }
}

/** Copies the live database at `databasePath` to `outFile` and checks the copy. */
export async function backupDatabase(databasePath: string, outFile: string): Promise<DatabaseSummary> {
  if (databasePath === ':memory:') throw new OpsError('DATABASE_PATH is :memory:, there is nothing on disk to back up');
  if (!fs.existsSync(databasePath)) throw new OpsError(`there is no database at ${databasePath} (set DATABASE_PATH)`);
  const target = path.resolve(outFile);
  if (target === path.resolve(databasePath)) throw new OpsError('the backup cannot overwrite the database itself');
  if (fs.existsSync(target)) throw new OpsError(`${outFile} already exists: choose a new file name (nothing is overwritten)`);
  fs.mkdirSync(path.dirname(target), { recursive: true });
  const partial = `${target}.partial-${process.pid}`;
  const source = new BetterSqlite3(databasePath, { fileMustExist: true });
  try {
    source.pragma('busy_timeout = 10000');
    // After the first step, copy everything left in one step: one read transaction, one state.
    await source.backup(partial, { progress: ({ totalPages }) => Math.max(totalPages, 100) });
  } catch (error) {
    fs.rmSync(partial, { force: true });
    throw new OpsError(`the backup failed: ${(error as Error).message}`);
  } finally {
    source.close();
  }
  try {
    // A single self-contained file: rollback journal instead of WAL.
    const copy = new BetterSqlite3(partial, { fileMustExist: true });
    copy.pragma('journal_mode = DELETE');
    copy.close();
    const summary = inspectDatabase(partial);
    const fd = fs.openSync(partial, 'r');
    fs.fsyncSync(fd);
    fs.closeSync(fd);
    fs.renameSync(partial, target);
    return { ...summary, bytes: fs.statSync(target).size };
  } catch (error) {
    for (const f of [partial, `${partial}-wal`, `${partial}-shm`, `${partial}-journal`]) fs.rmSync(f, { force: true });
    throw error instanceof OpsError ? error : new OpsError(`the copy could not be checked: ${(error as Error).message}`);
  }
}

export interface RestoreResult {
  summary: DatabaseSummary;
  /** Where the replaced database was kept, or null when there was none. */
  keptAs: string | null;
  /** How many staged dry runs were removed from the staging folder. */
  stagedRemoved: number;
}

/**
 * Replaces the database at `databasePath` with the backup `file`, after checking both that no
 * server holds the database and that the file is a sound Panelwise database.
 * `knownMigrations` are the migration names this version has: a backup from a newer version is
 * refused (its schema would be unknown here).
 */
export function restoreDatabase(databasePath: string, file: string, knownMigrations: readonly string[]): RestoreResult {
  if (databasePath === ':memory:') throw new OpsError('DATABASE_PATH is :memory:, there is no file to restore into');
  const holder = serverHolding(databasePath);
  if (holder) {
    throw new OpsError(
      `a Panelwise server (pid ${holder.pid} on ${holder.host}, started ${holder.startedAt}) holds ${databasePath}: stop it first, then restore. ` +
        `If that server is certainly stopped, remove ${databasePath}.pid.`,
    );
  }
  const source = path.resolve(file);
  const target = path.resolve(databasePath);
  if (source === target) throw new OpsError('the backup is the database itself');
  const summary = inspectDatabase(source);
  if (summary.migration === null) throw new OpsError(`${file} is not a Panelwise database (it has no migrations table)`);
  if (!knownMigrations.includes(summary.migration)) {
    throw new OpsError(
      `${file} was written by a newer Panelwise (migration ${summary.migration} is unknown here): upgrade first, then restore`,
    );
  }
  fs.mkdirSync(path.dirname(target), { recursive: true });
  const incoming = `${target}.restoring-${process.pid}`;
  fs.copyFileSync(source, incoming);
  const fd = fs.openSync(incoming, 'r');
  fs.fsyncSync(fd);
  fs.closeSync(fd);

  let keptAs: string | null = null;
  if (fs.existsSync(target)) {
    // Fold the replaced database's WAL into it, so the kept copy is whole, then set it aside.
    try {
      const old = new BetterSqlite3(target, { fileMustExist: true });
      old.pragma('wal_checkpoint(TRUNCATE)');
      old.close();
    } catch {
      // A damaged database is kept as it is.
    }
    keptAs = `${target}.before-restore-${new Date().toISOString().replace(/[:.]/g, '-')}`;
    fs.renameSync(target, keptAs);
    for (const suffix of ['-wal', '-shm']) if (fs.existsSync(target + suffix)) fs.renameSync(target + suffix, keptAs + suffix);
  }
  for (const suffix of ['-wal', '-shm', '-journal']) fs.rmSync(target + suffix, { force: true });
  fs.renameSync(incoming, target);

  const staging = path.join(path.dirname(target), 'import-staging');
  let stagedRemoved = 0;
  if (fs.existsSync(staging)) {
    for (const name of fs.readdirSync(staging)) {
      fs.rmSync(path.join(staging, name), { force: true, recursive: true });
      stagedRemoved++;
    }
  }
  return { summary, keptAs, stagedRemoved };
}

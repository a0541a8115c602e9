/**
 * Where research exports live: gzip-compressed files in the `exports` folder beside the database
 * file (for an in-memory database, a temporary folder of the process). The database row names
 * its files by a random `storage_key`; the files are removed when the export expires
 * (`removeExpiredExports`, run at start and periodically), and the row stays as the record.
 *
 * File names: `export-<id>-<storage key>-<csv|json|dictionary>.gz`.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import zlib from 'node:zlib';
import type { Config } from '../config';
import type { Db } from '../db/connection';
import type { ExportFile } from '../../shared/schemas/exports';
import { EXPORT_FILES } from '../../shared/schemas/exports';

/** What storage needs of the app context (a worker thread can build one from its own connection). */
export interface ExportStorageContext {
  db: Db;
  config: Pick<Config, 'databasePath'>;
  /** Overrides the folder (otherwise beside the database, or a temporary folder for `:memory:`). */
  exportsDir?: string;
}

const temporaryFolders = new WeakMap<object, string>();

/** The folder of a context's export files (created on first use). */
export function exportsDirectory(ctx: Pick<ExportStorageContext, 'config' | 'exportsDir'>): string {
  let dir = ctx.exportsDir;
  if (!dir) {
    if (ctx.config.databasePath === ':memory:' || ctx.config.databasePath === '') {
      dir = temporaryFolders.get(ctx.config);
      if (!dir) {
        const created = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-exports-'));
        temporaryFolders.set(ctx.config, created);
        process.once('exit', () => fs.rmSync(created, { recursive: true, force: true }));
        dir = created;
      }
    } else dir = path.join(path.dirname(path.resolve(ctx.config.databasePath)), 'exports');
  }
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}

export function newStorageKey(): string {
  return crypto.randomBytes(12).toString('hex');
}

export function exportFilePath(dir: string, exportId: number, storageKey: string, file: ExportFile): string {
  return path.join(dir, `export-${exportId}-${storageKey}-${file}.gz`);
}

const FILE_NAME = /^export-(\d+)-([0-9a-f]{24})-(csv|json|dictionary)\.gz(\.partial)?$/;

/**
 * Writes the files gzip-compressed (each first as `.partial`, then renamed, so a half-written
 * file never has a final name). Returns the paths and the bytes on disk.
 */
export async function writeExportFiles(
  dir: string,
  exportId: number,
  storageKey: string,
  contents: Record<ExportFile, string>,
): Promise<{ paths: Record<ExportFile, string>; bytes: number }> {
  const paths = {} as Record<ExportFile, string>;
  let bytes = 0;
  for (const file of EXPORT_FILES) {
    const target = exportFilePath(dir, exportId, storageKey, file);
    const partial = `${target}.partial`;
    await pipeline(Readable.from([Buffer.from(contents[file], 'utf8')]), zlib.createGzip({ level: 6 }), fs.createWriteStream(partial));
    await fs.promises.rename(partial, target);
    bytes += (await fs.promises.stat(target)).size;
    paths[file] = target;
  }
  return { paths, bytes };
}

/** Removes an export's files (missing ones are fine). */
export async function removeExportFiles(dir: string, exportId: number, storageKey: string): Promise<void> {
  for (const file of EXPORT_FILES) {
    const target = exportFilePath(dir, exportId, storageKey, file);
    await fs.promises.rm(target, { force: true });
    await fs.promises.rm(`${target}.partial`, { force: true });
  }
}

/** Files in the folder older than this and named by no export are left-overs of an interrupted build. */
const ORPHAN_AGE_MS = 60 * 60 * 1000;

/**
 * Removes the files of every export that has expired at `now` (the rows stay, with
 * `removed_at`), and files that no export names any more (an interrupted build), once they are
 * an hour old. Awaitable: run it at start and periodically.
 */
export async function removeExpiredExports(
  ctx: ExportStorageContext,
  now: Date = new Date(),
): Promise<{ exports: number; orphanFiles: number; bytes: number }> {
  const dir = exportsDirectory(ctx);
  const expired = await ctx.db
    .selectFrom('research_exports')
    .select(['id', 'storage_key', 'stored_bytes'])
    .where('storage_key', 'is not', null)
    .where('expires_at', '<=', now.toISOString())
    .execute();
  let bytes = 0;
  for (const row of expired) {
    await removeExportFiles(dir, row.id, row.storage_key!);
    await ctx.db
      .updateTable('research_exports')
      .set({ storage_key: null, stored_bytes: 0, removed_at: now.toISOString() })
      .where('id', '=', row.id)
      .where('storage_key', '=', row.storage_key)
      .execute();
    bytes += row.stored_bytes;
  }

  const live = new Set(
    (await ctx.db.selectFrom('research_exports').select(['id', 'storage_key']).where('storage_key', 'is not', null).execute()).map(
      (r) => `${r.id}-${r.storage_key}`,
    ),
  );
  let orphanFiles = 0;
  for (const name of await fs.promises.readdir(dir)) {
    const match = FILE_NAME.exec(name);
    if (!match || live.has(`${match[1]}-${match[2]}`)) continue;
    const full = path.join(dir, name);
    const stat = await fs.promises.stat(full).catch(() => null);
    if (!stat || now.getTime() - stat.mtimeMs < ORPHAN_AGE_MS) continue;
    await fs.promises.rm(full, { force: true });
    orphanFiles++;
    bytes += stat.size;
  }
  return { exports: expired.length, orphanFiles, bytes };
}

/**
 * Runs `removeExpiredExports` now and then every `intervalMs` (one run at a time). `idle()`
 * resolves when the current run, if any, has finished; `stop()` ends the schedule and waits.
 */
export function scheduleExportCleanup(
  ctx: ExportStorageContext & { logger?: { warn(obj: unknown, msg?: string): void } },
  intervalMs = 60 * 60 * 1000,
): { idle(): Promise<void>; stop(): Promise<void> } {
  let running: Promise<void> = Promise.resolve();
  let stopped = false;
  const run = () => {
    running = running
      .then(() => removeExpiredExports(ctx))
      .then(
        () => undefined,
        (error: unknown) => ctx.logger?.warn({ err: error }, 'removing expired research exports failed'),
      );
  };
  run();
  const timer = setInterval(() => {
    if (!stopped) run();
  }, intervalMs);
  timer.unref();
  return {
    idle: () => running,
    stop: async () => {
      stopped = true;
      clearInterval(timer);
      await running;
    },
  };
}

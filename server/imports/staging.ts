/**
 * Where a dry run's result waits for the lead's commit: a JSON file per staged import, in a
 * folder beside the database (or in the system's temporary folder for an in-memory database).
 * Written to a temporary name and renamed, so a file is either whole or absent.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AppContext } from '../context';
import type { ValidatedBatch } from './batch';

export interface StagedImport {
  federationId: number;
  addClassifiers: boolean;
  batch: ValidatedBatch;
}

const memoryFolder = path.join(os.tmpdir(), `panelwise-import-staging-${process.pid}-${crypto.randomBytes(4).toString('hex')}`);

export function stagingFolder(ctx: AppContext): string {
  const file = ctx.config.databasePath;
  return file === ':memory:' ? memoryFolder : path.join(path.dirname(path.resolve(file)), 'import-staging');
}

function stagedPath(ctx: AppContext, importId: number): string {
  return path.join(stagingFolder(ctx), `${importId}.json`);
}

export async function writeStaged(ctx: AppContext, importId: number, staged: StagedImport): Promise<void> {
  const folder = stagingFolder(ctx);
  await fs.promises.mkdir(folder, { recursive: true });
  const target = stagedPath(ctx, importId);
  const temp = `${target}.${crypto.randomBytes(4).toString('hex')}.tmp`;
  await fs.promises.writeFile(temp, JSON.stringify(staged));
  await fs.promises.rename(temp, target);
}

export async function readStaged(ctx: AppContext, importId: number): Promise<StagedImport | null> {
  try {
    return JSON.parse(await fs.promises.readFile(stagedPath(ctx, importId), 'utf8')) as StagedImport;
  } catch {
    return null;
  }
}

export async function removeStaged(ctx: AppContext, importId: number): Promise<void> {
  await fs.promises.rm(stagedPath(ctx, importId), { force: true });
}

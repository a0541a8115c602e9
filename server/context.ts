import type BetterSqlite3 from 'better-sqlite3';
import type { Logger } from 'pino';
import type { Config } from './config';
import type { Db } from './db/connection';
import type { Mailer } from './mail/mailer';
import { DataVersions } from './services/data-version';
import { Jobs } from './workers/jobs';
import { createPool, type PoolOptions, type TaskPool } from './workers/pool';

/**
 * What every router and service is given: the database, the configuration and the logger, and
 * the app's own state (two apps in one process share none of it).
 */
export interface AppContext {
  db: Db;
  sqlite: BetterSqlite3.Database;
  config: Config;
  logger: Logger;
  /** E-mail over SMTP (`ctx.mailer.send({to, subject, text, html})`); absent when none was started. */
  mailer?: Mailer;
  /** Per-federation data versions and their listeners (server/services/data-version.ts). */
  dataVersions: DataVersions;
  /** Background work, awaitable (`await ctx.jobs.idle()`), durable where it matters (server/workers/jobs.ts). */
  jobs: Jobs;
  /** Heavy work off the request path: `ctx.pool.run(task, payload, {federationId, key})` (server/workers/pool.ts). */
  pool: TaskPool;
}

export type ContextParts = Pick<AppContext, 'db' | 'sqlite' | 'config' | 'logger' | 'mailer'>;

/** The app's context from its parts: data versions, background jobs and the worker pool of its own. */
export function createContext(parts: ContextParts, options: { pool?: Partial<PoolOptions> } = {}): AppContext {
  const ctx: AppContext = {
    ...parts,
    dataVersions: new DataVersions(),
    jobs: new Jobs(parts.sqlite, parts.logger),
    pool: createPool(
      () => ctx,
      { databasePath: parts.config.databasePath, env: parts.config.env, mailer: parts.mailer ? { local: parts.mailer.local } : null },
      options.pool,
    ),
  };
  return ctx;
}

/** Stops the app's background work: no new durable job starts, running jobs and tasks finish, workers stop. */
export async function closeContext(ctx: AppContext): Promise<void> {
  ctx.jobs.close();
  await ctx.jobs.idle();
  await ctx.pool.close();
}

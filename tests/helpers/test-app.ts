import type { Express } from 'express';
import request from 'supertest';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config';
import { closeContext, createContext, type AppContext } from '../../server/context';
import { openDatabase } from '../../server/db/connection';
import { migrateToLatest } from '../../server/db/migrate';
import { DEMO_PASSWORD, seedDemo } from '../../server/demo/seed';
import { createLogger } from '../../server/logger';
import { startMailer } from '../../server/mail/mailer';
import type { PoolOptions } from '../../server/workers/pool';

export interface TestApp {
  ctx: AppContext;
  app: Express;
  close(): Promise<void>;
}

/**
 * A freshly migrated throw-away database (in memory unless a file is given) and the app on it,
 * without a port. With `seed: 'demo'` it holds the demo federation and accounts. Heavy work runs
 * in worker threads on a file database, in process on `:memory:` (server/workers/pool.ts); await
 * `t.ctx.jobs.idle()` before checking what background work (flag evaluation) writes.
 */
export async function createTestApp(
  options: { seed?: 'demo' | 'none'; databasePath?: string; pool?: Partial<PoolOptions> } = {},
): Promise<TestApp> {
  const databasePath = options.databasePath ?? ':memory:';
  const { db, sqlite } = openDatabase(databasePath);
  await migrateToLatest(db);
  if (options.seed === 'demo') await seedDemo(db, sqlite);
  const config = loadConfig({ databasePath, env: 'test' });
  const logger = createLogger('test');
  // E-mail goes to a local fake SMTP server that keeps every message in outbox_messages.
  const mailer = await startMailer({ config, db, logger });
  const ctx = createContext({ db, sqlite, config, logger, mailer }, { pool: options.pool });
  const app = createApp(ctx, { serveClient: false });
  return {
    ctx,
    app,
    close: async () => {
      await closeContext(ctx);
      await mailer.close();
      await db.destroy();
    },
  };
}

/** A supertest agent signed in as the given user (the demo password by default). */
export async function signedInAgent(app: Express, email: string, password = DEMO_PASSWORD) {
  const agent = request.agent(app);
  const response = await agent.post('/api/session').send({ email, password });
  if (response.status !== 201) throw new Error(`Sign-in as ${email} failed: ${response.status} ${JSON.stringify(response.body)}`);
  return agent;
}

/** Row counts of every table, to assert that a refused request wrote nothing. */
export function tableCounts(ctx: AppContext): Record<string, number> {
  const tables = ctx.sqlite
    .prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like 'kysely_%' order by name")
    .all() as { name: string }[];
  return Object.fromEntries(
    tables.map(({ name }) => [name, (ctx.sqlite.prepare(`select count(*) as n from "${name}"`).get() as { n: number }).n]),
  );
}

import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { clientDist, createApp } from './app';
import { loadPasswordEstimator } from './auth/password-strength';
import { ConfigError, loadConfig } from './config';
import { closeContext, createContext } from './context';
import { openDatabase } from './db/connection';
import { migrateToLatest } from './db/migrate';
import { isEmpty, seedDemo } from './demo/seed';
import { createLogger } from './logger';
import { scheduleStagedImportExpiry } from './imports/service';
import { startMailer } from './mail/mailer';
import { scheduleExportCleanup } from './exports/storage';
import { createExerciseScheduler } from './services/exercise-scheduler';
import { demoChoice, productionRefusal, siteOwnerCount } from './ops/demo-guard';
import { acquireServerLock } from './ops/server-lock';

/**
 * Starts Panelwise: checks the environment (one line per problem, exit code 1), builds the
 * client when it is missing (with --build-if-missing), applies migrations, seeds the demo into an
 * empty database outside production (or with --demo / SEED_DEMO=1; never with SEED_DEMO=0),
 * keeps a lock file beside the database, and serves the API and the client on PORT (default 3000).
 */
async function main() {
  let config: ReturnType<typeof loadConfig>;
  try {
    config = loadConfig();
  } catch (error) {
    if (!(error instanceof ConfigError)) throw error;
    for (const problem of error.problems) process.stderr.write(`panelwise: ${problem}\n`);
    process.stderr.write('panelwise: not started; see docs/operations.md for the environment\n');
    process.exit(1);
  }
  const logger = createLogger(config.env);

  if (process.argv.includes('--build-if-missing') && !fs.existsSync(path.join(clientDist, 'index.html'))) {
    logger.info('client not built yet: building it once');
    execFileSync('npx', ['vite', 'build', '--logLevel', 'warn'], { stdio: 'inherit', cwd: path.resolve(import.meta.dirname, '..') });
  }

  const { db, sqlite } = openDatabase(config.databasePath);
  await migrateToLatest(db);
  const demo = demoChoice(config, process.argv, process.env.SEED_DEMO);
  if (demo.seed && (await isEmpty(db))) {
    logger.info('empty database: seeding the demo federation');
    await seedDemo(db, sqlite);
  }
  const refusal = await productionRefusal(db, config, demo);
  if (refusal) {
    logger.fatal(`not started: ${refusal}`);
    await db.destroy();
    process.exit(1);
  }
  if ((await siteOwnerCount(db)) === 0) {
    logger.warn(
      'no site owner yet: create the first one with `npx panelwise create-owner EMAIL` (it asks for the password, or reads it from standard input)',
    );
  }
  const lock = acquireServerLock(config.databasePath);
  process.on('exit', () => lock.release());
  if (lock.replaced)
    logger.warn(
      `the lock file named another live server (pid ${lock.replaced.pid} on ${lock.replaced.host}): two servers share ${config.databasePath}`,
    );

  // The password estimator's dictionaries take a moment to load: before listening, not in a request.
  await loadPasswordEstimator();
  const mailer = await startMailer({ config, db, logger });
  const ctx = createContext({ db, sqlite, config, logger, mailer });
  // Removes the files of expired research exports now and every hour.
  const exportCleanup = scheduleExportCleanup(ctx);
  const app = createApp(ctx);
  // Closes exercises past their close date and sends the reminders due (each run awaited).
  const exerciseScheduler = createExerciseScheduler(ctx);
  exerciseScheduler.start();
  // Checked files never committed expire after 7 days: now, then daily (awaited on stop).
  const stagedExpiry = scheduleStagedImportExpiry(ctx, (err) => logger.error({ err }, 'staged imports could not be expired'));
  const server = app.listen(config.port, (error?: Error) => {
    // Express 5 hands a listen error (such as a port in use) to this callback instead of throwing.
    if (error) {
      logger.error({ err: error }, `cannot listen on port ${config.port}`);
      process.exit(1);
    }
    logger.info(`Panelwise ${config.version} on http://localhost:${config.port} (database ${config.databasePath})`);
  });

  const stop = () => {
    stagedExpiry.stop();
    server.close(() => {
      void Promise.all([exportCleanup.stop(), exerciseScheduler.stop(), stagedExpiry.idle()])
        .then(() => closeContext(ctx))
        .then(() => mailer.close())
        .finally(() => db.destroy().then(() => process.exit(0)));
    });
    setTimeout(() => process.exit(0), 10_000).unref();
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});

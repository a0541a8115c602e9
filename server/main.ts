import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { clientDist, createApp } from './app';
import { loadConfig } from './config';
import { closeContext, createContext } from './context';
import { openDatabase } from './db/connection';
import { migrateToLatest } from './db/migrate';
import { isEmpty, seedDemo } from './demo/seed';
import { createLogger } from './logger';
import { startMailer } from './mail/mailer';

/**
 * Starts Panelwise: builds the client when it is missing (with --build-if-missing), applies
 * migrations, seeds the demo into an empty database (unless SEED_DEMO=0), and serves the API
 * and the client on PORT (default 3000).
 */
async function main() {
  const config = loadConfig();
  const logger = createLogger(config.env);

  if (process.argv.includes('--build-if-missing') && !fs.existsSync(path.join(clientDist, 'index.html'))) {
    logger.info('client not built yet: building it once');
    execFileSync('npx', ['vite', 'build', '--logLevel', 'warn'], { stdio: 'inherit', cwd: path.resolve(import.meta.dirname, '..') });
  }

  const { db, sqlite } = openDatabase(config.databasePath);
  await migrateToLatest(db);
  if (process.env.SEED_DEMO !== '0' && (await isEmpty(db))) {
    logger.info('empty database: seeding the demo federation');
    await seedDemo(db, sqlite);
  }

  const mailer = await startMailer({ config, db, logger });
  const ctx = createContext({ db, sqlite, config, logger, mailer });
  const app = createApp(ctx);
  const server = app.listen(config.port, (error?: Error) => {
    // Express 5 hands a listen error (such as a port in use) to this callback instead of throwing.
    if (error) {
      logger.error({ err: error }, `cannot listen on port ${config.port}`);
      process.exit(1);
    }
    logger.info(`Panelwise ${config.version} on http://localhost:${config.port} (database ${config.databasePath})`);
  });

  const stop = () => {
    server.close(() => {
      void closeContext(ctx)
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

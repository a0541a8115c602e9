import { envName } from '../config';
import { defaultDatabasePath, openDatabase } from '../db/connection';
import { migrateToLatest } from '../db/migrate';
import { isEmpty, seedDemo } from '../demo/seed';
import { demoChoice } from '../ops/demo-guard';

/**
 * `npm run seed` migrates and seeds the demo into an empty database; with NODE_ENV=production
 * only when asked for explicitly (`--demo` or SEED_DEMO=1), as at the server's start.
 */
const choice = demoChoice({ env: envName(process.env.NODE_ENV) }, process.argv, process.env.SEED_DEMO);
if (!choice.seed) {
  console.error(
    'panelwise: not seeding: the demo accounts have a published password (production needs --demo or SEED_DEMO=1; SEED_DEMO=0 never seeds)',
  );
  process.exit(1);
}
const { db, sqlite } = openDatabase(defaultDatabasePath());
await migrateToLatest(db);
if (await isEmpty(db)) {
  await seedDemo(db, sqlite);
  console.log('demo seeded');
} else {
  console.log('database is not empty: nothing seeded');
}
await db.destroy();

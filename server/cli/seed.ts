import { defaultDatabasePath, openDatabase } from '../db/connection';
import { migrateToLatest } from '../db/migrate';
import { isEmpty, seedDemo } from '../demo/seed';

/** `npm run seed` migrates and seeds the demo into an empty database. */
const { db, sqlite } = openDatabase(defaultDatabasePath());
await migrateToLatest(db);
if (await isEmpty(db)) {
  await seedDemo(db, sqlite);
  console.log('demo seeded');
} else {
  console.log('database is not empty: nothing seeded');
}
await db.destroy();

import { defaultDatabasePath, openDatabase } from '../db/connection';
import { migrateDownToNothing, migrateToLatest } from '../db/migrate';

/** `npm run migrate` applies every migration; `npm run migrate -- down` undoes them all. */
const { db } = openDatabase(defaultDatabasePath());
if (process.argv.includes('down')) await migrateDownToNothing(db);
else await migrateToLatest(db);
await db.destroy();
console.log('migrations done');

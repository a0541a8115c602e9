import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';
import zlib from 'node:zlib';
import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.
//
// Research exports move out of the database: their files are kept gzip-compressed in the
// `exports` folder beside the database file (a row names them by `storage_key`). Existing files
// are moved there; in a database without a file (in memory) they are dropped. Also: the lead's
// quota of exports per researcher, and what each export held (assessment, athlete, a fingerprint
// of the exported content) so that a new export can be compared with earlier ones.

const FILES = ['csv', 'json', 'dictionary'] as const;

function databaseFolder(rows: { name: string; file: string }[]): string | null {
  const main = rows.find((r) => r.name === 'main');
  return main && main.file ? path.dirname(main.file) : null;
}

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('research_exports').addColumn('storage_key', 'text').execute();
  await db.schema
    .alterTable('research_exports')
    .addColumn('stored_bytes', 'integer', (c) => c.notNull().defaultTo(0))
    .execute();
  await db.schema.alterTable('research_exports').addColumn('removed_at', 'text').execute();

  const list = await sql<{ name: string; file: string }>`pragma database_list`.execute(db);
  const folder = databaseFolder(list.rows);
  const stored = await db.selectFrom('research_exports').select(['id', 'csv', 'json', 'dictionary']).where('csv', 'is not', null).execute();
  if (folder && stored.length > 0) {
    const dir = path.join(folder, 'exports');
    fs.mkdirSync(dir, { recursive: true });
    for (const row of stored) {
      const key = crypto.randomBytes(12).toString('hex');
      let bytes = 0;
      for (const file of FILES) {
        const content = zlib.gzipSync(Buffer.from(String(row[file] ?? ''), 'utf8'));
        fs.writeFileSync(path.join(dir, `export-${row.id}-${key}-${file}.gz`), content);
        bytes += content.length;
      }
      await db.updateTable('research_exports').set({ storage_key: key, stored_bytes: bytes }).where('id', '=', row.id).execute();
    }
  }
  const now = new Date().toISOString();
  await db.updateTable('research_exports').set({ removed_at: now }).where('storage_key', 'is', null).execute();
  await db.schema.alterTable('research_exports').dropColumn('csv').execute();
  await db.schema.alterTable('research_exports').dropColumn('json').execute();
  await db.schema.alterTable('research_exports').dropColumn('dictionary').execute();

  await db.schema
    .alterTable('research_export_settings')
    .addColumn('max_exports_per_day', 'integer', (c) => c.notNull().defaultTo(20))
    .execute();
  await db.schema
    .alterTable('research_export_settings')
    .addColumn('max_stored_megabytes', 'integer', (c) => c.notNull().defaultTo(1000))
    .execute();

  // What each export held, kept after its files expire: a researcher still has the download.
  await db.schema
    .createTable('research_export_assessments')
    .addColumn('export_id', 'integer', (c) => c.notNull().references('research_exports.id').onDelete('cascade'))
    .addColumn('assessment_id', 'integer', (c) => c.notNull())
    .addColumn('athlete_id', 'integer', (c) => c.notNull())
    .addColumn('fingerprint', 'integer', (c) => c.notNull())
    .addPrimaryKeyConstraint('research_export_assessments_pk', ['export_id', 'assessment_id'])
    .modifyEnd(sql`without rowid`)
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('research_export_assessments').execute();
  await db.schema.alterTable('research_export_settings').dropColumn('max_stored_megabytes').execute();
  await db.schema.alterTable('research_export_settings').dropColumn('max_exports_per_day').execute();
  await db.schema.alterTable('research_exports').addColumn('csv', 'text').execute();
  await db.schema.alterTable('research_exports').addColumn('json', 'text').execute();
  await db.schema.alterTable('research_exports').addColumn('dictionary', 'text').execute();

  const list = await sql<{ name: string; file: string }>`pragma database_list`.execute(db);
  const folder = databaseFolder(list.rows);
  const rows = await db.selectFrom('research_exports').select(['id', 'storage_key']).where('storage_key', 'is not', null).execute();
  for (const row of rows) {
    const values: Record<string, string | null> = {};
    for (const file of FILES) {
      const name = folder ? path.join(folder, 'exports', `export-${row.id}-${row.storage_key}-${file}.gz`) : null;
      values[file] = name && fs.existsSync(name) ? zlib.gunzipSync(fs.readFileSync(name)).toString('utf8') : null;
    }
    await db.updateTable('research_exports').set(values).where('id', '=', row.id).execute();
  }
  await db.schema.alterTable('research_exports').dropColumn('removed_at').execute();
  await db.schema.alterTable('research_exports').dropColumn('stored_bytes').execute();
  await db.schema.alterTable('research_exports').dropColumn('storage_key').execute();
}

import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

export async function up(db: Kysely<any>): Promise<void> {
  // One row per federation, written on first use: the pseudonym key (never sent to any client)
  // and the smallest number of athletes an exported cell may describe (k).
  await db.schema
    .createTable('research_export_settings')
    .addColumn('federation_id', 'integer', (c) => c.primaryKey().references('federations.id').onDelete('cascade'))
    .addColumn('pseudonym_key', 'text', (c) => c.notNull())
    .addColumn('min_athletes', 'integer', (c) => c.notNull().defaultTo(5))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'text')
    .addColumn('updated_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addCheckConstraint('research_export_settings_k_check', sql`min_athletes between 2 and 100`)
    .execute();

  // A named study whose exports share one stable salt, so that they can be joined.
  await db.schema
    .createTable('research_studies')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('purpose', 'text')
    .addColumn('salt', 'text', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('closed_at', 'text')
    .addUniqueConstraint('research_studies_federation_name_unique', ['federation_id', 'name'])
    .execute();

  // Every export made, with its generated files kept for re-download until expires_at
  // (then the files are cleared and the row stays as the record).
  await db.schema
    .createTable('research_exports')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('study_id', 'integer', (c) => c.references('research_studies.id').onDelete('set null'))
    .addColumn('request', 'text', (c) => c.notNull())
    .addColumn('min_athletes', 'integer', (c) => c.notNull())
    .addColumn('counts', 'text', (c) => c.notNull().defaultTo('{}'))
    .addColumn('csv', 'text')
    .addColumn('json', 'text')
    .addColumn('dictionary', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('expires_at', 'text', (c) => c.notNull())
    .execute();
  await db.schema
    .createIndex('research_exports_user_idx')
    .on('research_exports')
    .columns(['federation_id', 'user_id', 'created_at'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('research_exports').execute();
  await db.schema.dropTable('research_studies').execute();
  await db.schema.dropTable('research_export_settings').execute();
}

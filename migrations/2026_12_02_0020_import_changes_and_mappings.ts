import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

export async function up(db: Kysely<any>): Promise<void> {
  // Before-images of the rows an import changed, so that reverting it restores them exactly.
  // Rows an import added carry its id in their import_id column instead.
  await db.schema
    .createTable('import_changes')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('import_id', 'integer', (c) => c.notNull().references('imports.id').onDelete('cascade'))
    .addColumn('table_name', 'text', (c) => c.notNull())
    .addColumn('row_id', 'integer', (c) => c.notNull())
    .addColumn('before', 'text', (c) => c.notNull())
    .addCheckConstraint('import_changes_table_check', sql`table_name in ('assessments', 'ratings')`)
    .execute();
  await db.schema.createIndex('import_changes_import_idx').on('import_changes').column('import_id').execute();

  // Column mappings saved by name, for a federation's next upload.
  await db.schema
    .createTable('import_mappings')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('layout', 'text', (c) => c.notNull())
    .addColumn('mapping', 'text', (c) => c.notNull())
    .addColumn('date_format', 'text', (c) => c.notNull().defaultTo('iso'))
    .addColumn('user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(now))
    .addCheckConstraint('import_mappings_layout_check', sql`layout in ('long', 'wide')`)
    .addUniqueConstraint('import_mappings_federation_name_unique', ['federation_id', 'name'])
    .execute();

  // Finding an earlier import of the same file.
  await db.schema.createIndex('imports_federation_hash_idx').on('imports').columns(['federation_id', 'file_hash']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropIndex('imports_federation_hash_idx').execute();
  await db.schema.dropTable('import_mappings').execute();
  await db.schema.dropTable('import_changes').execute();
}

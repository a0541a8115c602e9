import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('imports')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('source', 'text', (c) => c.notNull())
    .addColumn('file_name', 'text')
    .addColumn('file_hash', 'text')
    .addColumn('status', 'text', (c) => c.notNull())
    .addColumn('counts', 'text', (c) => c.notNull().defaultTo('{}'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('committed_at', 'text')
    .addColumn('reverted_at', 'text')
    .addCheckConstraint('imports_source_check', sql`source in ('csv', 'api', 'seed')`)
    .execute();
  await db.schema.createIndex('imports_federation_idx').on('imports').columns(['federation_id', 'created_at']).execute();

  await db.schema
    .createTable('classifiers')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('display_name', 'text', (c) => c.notNull())
    .addColumn('certification_level', 'text', (c) => c.notNull().defaultTo('national'))
    .addColumn('active', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('import_id', 'integer', (c) => c.references('imports.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addCheckConstraint('classifiers_level_check', sql`certification_level in ('trainee', 'national', 'international')`)
    .addUniqueConstraint('classifiers_federation_code_unique', ['federation_id', 'code'])
    .execute();

  await db.schema
    .createTable('athletes')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('display_name', 'text')
    // Competition category only (for example women, men, junior): never medical or impairment data.
    .addColumn('category', 'text', (c) => c.notNull().defaultTo('open'))
    .addColumn('import_id', 'integer', (c) => c.references('imports.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addUniqueConstraint('athletes_federation_code_unique', ['federation_id', 'code'])
    .execute();

  await db.schema
    .createTable('events')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('code', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('starts_on', 'text')
    .addColumn('ends_on', 'text')
    .addColumn('level', 'text', (c) => c.notNull().defaultTo('national'))
    .addColumn('import_id', 'integer', (c) => c.references('imports.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addUniqueConstraint('events_federation_code_unique', ['federation_id', 'code'])
    .execute();

  await db.schema
    .createTable('assessments')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    // The federation's own identifier of the assessment: the natural key for imports.
    .addColumn('external_id', 'text', (c) => c.notNull())
    .addColumn('athlete_id', 'integer', (c) => c.notNull().references('athletes.id').onDelete('restrict'))
    .addColumn('event_id', 'integer', (c) => c.references('events.id').onDelete('restrict'))
    .addColumn('assessed_on', 'text', (c) => c.notNull())
    .addColumn('kind', 'text', (c) => c.notNull().defaultTo('first'))
    // The panel's final sport class in half points, when recorded.
    .addColumn('panel_class', 'integer')
    .addColumn('note', 'text')
    .addColumn('import_id', 'integer', (c) => c.references('imports.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addCheckConstraint('assessments_kind_check', sql`kind in ('first', 'review', 'protest')`)
    .addUniqueConstraint('assessments_federation_external_unique', ['federation_id', 'external_id'])
    .execute();
  await db.schema.createIndex('assessments_federation_date_idx').on('assessments').columns(['federation_id', 'assessed_on']).execute();
  await db.schema.createIndex('assessments_athlete_idx').on('assessments').columns(['athlete_id', 'assessed_on']).execute();

  await db.schema
    .createTable('ratings')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('assessment_id', 'integer', (c) => c.notNull().references('assessments.id').onDelete('cascade'))
    .addColumn('classifier_id', 'integer', (c) => c.notNull().references('classifiers.id').onDelete('restrict'))
    // The classifier's sport class in half points.
    .addColumn('sport_class', 'integer', (c) => c.notNull())
    .addColumn('import_id', 'integer', (c) => c.references('imports.id').onDelete('set null'))
    .addUniqueConstraint('ratings_assessment_classifier_unique', ['assessment_id', 'classifier_id'])
    .execute();
  await db.schema.createIndex('ratings_classifier_idx').on('ratings').column('classifier_id').execute();

  await db.schema
    .createTable('audit_log')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.references('federations.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('entity', 'text', (c) => c.notNull())
    .addColumn('entity_id', 'text')
    .addColumn('detail', 'text', (c) => c.notNull().defaultTo('{}'))
    .addColumn('at', 'text', (c) => c.notNull().defaultTo(now))
    .execute();
  await db.schema.createIndex('audit_log_federation_idx').on('audit_log').columns(['federation_id', 'at']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of ['audit_log', 'ratings', 'assessments', 'events', 'athletes', 'classifiers', 'imports']) {
    await db.schema.dropTable(table).execute();
  }
}

import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

/**
 * Background jobs that must survive a restart (a flag evaluation asked for by a data change):
 * one row per kind and subject while the job is owed, removed once it has run.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('background_jobs')
    .addColumn('kind', 'text', (c) => c.notNull())
    // What the job is about, e.g. a federation id.
    .addColumn('subject', 'integer', (c) => c.notNull())
    .addColumn('requested_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('last_error', 'text')
    .addPrimaryKeyConstraint('background_jobs_pk', ['kind', 'subject'])
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('background_jobs').execute();
}

import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

/**
 * Calibration flags raised by the agreement dashboards, with the lead's status and note, and
 * the thresholds the lead sets per federation.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('calibration_thresholds')
    .addColumn('federation_id', 'integer', (c) => c.primaryKey().references('federations.id').onDelete('cascade'))
    // JSON of the thresholds (kappa, bias, drift, windows, notification).
    .addColumn('thresholds', 'text', (c) => c.notNull())
    .addColumn('updated_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(now))
    .execute();

  await db.schema
    .createTable('calibration_flags')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('classifier_id', 'integer', (c) => c.notNull().references('classifiers.id').onDelete('cascade'))
    .addColumn('rule', 'text', (c) => c.notNull())
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('open'))
    .addColumn('note', 'text')
    // JSON: what was measured when the flag was last evaluated.
    .addColumn('evidence', 'text', (c) => c.notNull())
    // Date of the latest rating the evidence rests on (a closed flag is not raised again on the same ratings).
    .addColumn('evidence_through', 'text')
    .addColumn('still_met', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('status_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('opened_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('evaluated_at', 'text', (c) => c.notNull().defaultTo(now))
    .addCheckConstraint('calibration_flags_rule_check', sql`rule in ('kappa', 'bias', 'drift')`)
    .addCheckConstraint('calibration_flags_status_check', sql`status in ('open', 'acknowledged', 'closed')`)
    .execute();
  await db.schema.createIndex('calibration_flags_federation_idx').on('calibration_flags').columns(['federation_id', 'status']).execute();
  await db.schema.createIndex('calibration_flags_classifier_idx').on('calibration_flags').columns(['classifier_id', 'rule']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('calibration_flags').execute();
  await db.schema.dropTable('calibration_thresholds').execute();
}

import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

/**
 * Calibration exercises: a lead's set of practice cases with a reference class each, the
 * classifiers assigned, their blind answers, the reminders sent, and the flags an exercise answered.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('exercises')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('title', 'text', (c) => c.notNull())
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('draft'))
    // ISO dates; answers are taken through the close date (UTC) and the exercise closes after it.
    .addColumn('opens_on', 'text', (c) => c.notNull())
    .addColumn('closes_on', 'text', (c) => c.notNull())
    // Where it started: a flag (source_ref = flag id) or a class boundary (source_ref = lower class in half points).
    .addColumn('source_kind', 'text')
    .addColumn('source_ref', 'text')
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('opened_at', 'text')
    .addColumn('closed_at', 'text')
    .addCheckConstraint('exercises_status_check', sql`status in ('draft', 'open', 'closed')`)
    .addCheckConstraint('exercises_source_check', sql`source_kind is null or source_kind in ('flag', 'boundary')`)
    .execute();
  await db.schema.createIndex('exercises_federation_idx').on('exercises').columns(['federation_id', 'status']).execute();

  await db.schema
    .createTable('exercise_cases')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('exercise_id', 'integer', (c) => c.notNull().references('exercises.id').onDelete('cascade'))
    .addColumn('position', 'integer', (c) => c.notNull())
    .addColumn('description', 'text', (c) => c.notNull())
    // A link only: no video is stored.
    .addColumn('video_url', 'text')
    // JSON array of skill keys to watch.
    .addColumn('skills', 'text', (c) => c.notNull().defaultTo('[]'))
    // In half points; never sent to a classifier before the close.
    .addColumn('reference_class', 'integer', (c) => c.notNull())
    .execute();
  await db.schema.createIndex('exercise_cases_exercise_idx').on('exercise_cases').columns(['exercise_id', 'position']).unique().execute();

  await db.schema
    .createTable('exercise_assignments')
    .addColumn('exercise_id', 'integer', (c) => c.notNull().references('exercises.id').onDelete('cascade'))
    .addColumn('classifier_id', 'integer', (c) => c.notNull().references('classifiers.id').onDelete('cascade'))
    // The calibration flag the classifier had open when the exercise opened, if any.
    .addColumn('flag_id', 'integer', (c) => c.references('calibration_flags.id').onDelete('set null'))
    .addColumn('had_open_flag', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('finished_at', 'text')
    .addColumn('invited_at', 'text')
    // Set when the reminder before the close was sent: it is never sent twice.
    .addColumn('reminded_at', 'text')
    .addColumn('results_sent_at', 'text')
    .addPrimaryKeyConstraint('exercise_assignments_pk', ['exercise_id', 'classifier_id'])
    .execute();

  await db.schema
    .createTable('exercise_answers')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('case_id', 'integer', (c) => c.notNull().references('exercise_cases.id').onDelete('cascade'))
    .addColumn('classifier_id', 'integer', (c) => c.notNull().references('classifiers.id').onDelete('cascade'))
    .addColumn('sport_class', 'integer', (c) => c.notNull())
    // JSON array of the skill keys that decided the class.
    .addColumn('skills', 'text', (c) => c.notNull().defaultTo('[]'))
    .addColumn('reason', 'text')
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(now))
    .execute();
  await db.schema.createIndex('exercise_answers_case_idx').on('exercise_answers').columns(['case_id', 'classifier_id']).unique().execute();

  // A flag closed as answered by an exercise (kept apart from the flags table, whose rules move on their own).
  await db.schema
    .createTable('exercise_flag_links')
    .addColumn('flag_id', 'integer', (c) => c.primaryKey().references('calibration_flags.id').onDelete('cascade'))
    .addColumn('exercise_id', 'integer', (c) => c.notNull().references('exercises.id').onDelete('cascade'))
    .addColumn('linked_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('linked_at', 'text', (c) => c.notNull().defaultTo(now))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('exercise_flag_links').execute();
  await db.schema.dropTable('exercise_answers').execute();
  await db.schema.dropTable('exercise_assignments').execute();
  await db.schema.dropTable('exercise_cases').execute();
  await db.schema.dropTable('exercises').execute();
}

import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('federations')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('slug', 'text', (c) => c.notNull().unique())
    .addColumn('name', 'text', (c) => c.notNull())
    // The class scale in half points (default 2..9 = 1.0..4.5).
    .addColumn('scale_min', 'integer', (c) => c.notNull().defaultTo(2))
    .addColumn('scale_max', 'integer', (c) => c.notNull().defaultTo(9))
    .addColumn('settings', 'text', (c) => c.notNull().defaultTo('{}'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`))
    .addCheckConstraint('federations_scale_check', sql`scale_min >= 1 and scale_max <= 12 and scale_min < scale_max`)
    .execute();

  await db.schema
    .createTable('users')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('email', 'text', (c) => c.notNull().unique())
    .addColumn('display_name', 'text', (c) => c.notNull())
    .addColumn('password_hash', 'text')
    .addColumn('is_owner', 'integer', (c) => c.notNull().defaultTo(0))
    // Raised on sign-out everywhere, password change and deactivation: older sessions stop working.
    .addColumn('session_version', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`))
    .execute();

  await db.schema
    .createTable('memberships')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('role', 'text', (c) => c.notNull())
    .addColumn('active', 'integer', (c) => c.notNull().defaultTo(1))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`))
    .addCheckConstraint('memberships_role_check', sql`role in ('lead', 'classifier', 'researcher')`)
    .addUniqueConstraint('memberships_user_federation_unique', ['user_id', 'federation_id'])
    .execute();

  await db.schema
    .createTable('sessions')
    .addColumn('id', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('created_at', 'text', (c) => c.notNull())
    .addColumn('last_seen_at', 'text', (c) => c.notNull())
    .addColumn('revoked_at', 'text')
    .execute();
  await db.schema.createIndex('sessions_user_idx').on('sessions').column('user_id').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('sessions').execute();
  await db.schema.dropTable('memberships').execute();
  await db.schema.dropTable('users').execute();
  await db.schema.dropTable('federations').execute();
}

import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

/**
 * Invitations and password resets (single-use e-mailed links, stored only as a sha256 of the
 * token), API tokens of a federation's own systems (stored hashed), and the outbox of the local
 * mail server used outside production.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema
    .createTable('invitations')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('role', 'text', (c) => c.notNull())
    // For a classifier: the roster entry the new account is linked to.
    .addColumn('classifier_id', 'integer', (c) => c.references('classifiers.id').onDelete('cascade'))
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('invited_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('expires_at', 'text', (c) => c.notNull())
    .addColumn('accepted_at', 'text')
    .addColumn('accepted_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('revoked_at', 'text')
    .addCheckConstraint('invitations_role_check', sql`role in ('lead', 'classifier', 'researcher')`)
    .execute();
  await db.schema.createIndex('invitations_federation_idx').on('invitations').columns(['federation_id', 'created_at']).execute();

  await db.schema
    .createTable('password_resets')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('expires_at', 'text', (c) => c.notNull())
    .addColumn('used_at', 'text')
    .execute();
  await db.schema.createIndex('password_resets_user_idx').on('password_resets').column('user_id').execute();

  await db.schema
    .createTable('api_tokens')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('federation_id', 'integer', (c) => c.notNull().references('federations.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('scope', 'text', (c) => c.notNull())
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    // The first characters of the token, so people can tell tokens apart.
    .addColumn('token_prefix', 'text', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(now))
    .addColumn('last_used_at', 'text')
    .addColumn('revoked_at', 'text')
    .addCheckConstraint('api_tokens_scope_check', sql`scope in ('import', 'read')`)
    .execute();
  await db.schema.createIndex('api_tokens_federation_idx').on('api_tokens').column('federation_id').execute();

  await db.schema
    .createTable('outbox_messages')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    // The federation the message is about (slug from the X-Panelwise-Federation header), if any.
    .addColumn('federation_slug', 'text')
    .addColumn('mail_from', 'text', (c) => c.notNull())
    .addColumn('mail_to', 'text', (c) => c.notNull())
    .addColumn('subject', 'text', (c) => c.notNull())
    .addColumn('text_body', 'text', (c) => c.notNull())
    .addColumn('html_body', 'text')
    .addColumn('raw', 'text', (c) => c.notNull())
    .addColumn('received_at', 'text', (c) => c.notNull().defaultTo(now))
    .execute();
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of ['outbox_messages', 'api_tokens', 'password_resets', 'invitations']) {
    await db.schema.dropTable(table).execute();
  }
}

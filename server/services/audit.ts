import type Sqlite from 'better-sqlite3';
import type { Kysely, Transaction } from 'kysely';
import type { Database } from '../db/database';

export interface AuditInput {
  federationId?: number | null;
  userId?: number | null;
  action: string;
  entity: string;
  entityId?: string | number | null;
  detail?: Record<string, unknown>;
}

/** The row of an audit entry: one place for its columns, whichever writer stores it. */
function auditRow(input: AuditInput) {
  return {
    federation_id: input.federationId ?? null,
    user_id: input.userId ?? null,
    action: input.action,
    entity: input.entity,
    entity_id: input.entityId === undefined || input.entityId === null ? null : String(input.entityId),
    detail: JSON.stringify(input.detail ?? {}),
  };
}

/**
 * Records who did what, when, to which record. Pass the transaction of the change, so that the
 * change and its entry are stored together or not at all.
 */
export async function audit(db: Kysely<Database> | Transaction<Database>, input: AuditInput): Promise<void> {
  await db.insertInto('audit_log').values(auditRow(input)).execute();
}

/**
 * `audit` for a synchronous better-sqlite3 transaction (an import's commit and revert, a flag
 * evaluation), called inside it on the same connection: the same row, written by the same rule.
 */
export function auditSync(sqlite: Sqlite.Database, input: AuditInput): void {
  const row = auditRow(input);
  sqlite
    .prepare(
      'insert into audit_log (federation_id, user_id, action, entity, entity_id, detail) values (@federation_id, @user_id, @action, @entity, @entity_id, @detail)',
    )
    .run(row);
}

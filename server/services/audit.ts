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

/** Records who did what, when, to which record. Pass the transaction to make it part of the change. */
export async function audit(db: Kysely<Database> | Transaction<Database>, input: AuditInput): Promise<void> {
  await db
    .insertInto('audit_log')
    .values({
      federation_id: input.federationId ?? null,
      user_id: input.userId ?? null,
      action: input.action,
      entity: input.entity,
      entity_id: input.entityId === undefined || input.entityId === null ? null : String(input.entityId),
      detail: JSON.stringify(input.detail ?? {}),
    })
    .execute();
}

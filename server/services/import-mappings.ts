/**
 * Column mappings saved by name for the imports page: each change and its audit entry are
 * written in one transaction.
 */
import type { SaveMapping } from '../../shared/schemas/imports';
import type { AppContext } from '../context';
import { audit } from './audit';

export interface MappingRow {
  id: number;
  name: string;
  layout: 'long' | 'wide';
  mapping: string;
  date_format: string;
  updated_at: string;
}

const COLUMNS = ['id', 'name', 'layout', 'mapping', 'date_format', 'updated_at'] as const;

export async function listMappings(ctx: AppContext, federationId: number): Promise<MappingRow[]> {
  return ctx.db.selectFrom('import_mappings').select(COLUMNS).where('federation_id', '=', federationId).orderBy('name').execute();
}

/** Saves the mapping under its name, replacing one of the same name; says whether it is new. */
export async function saveMapping(
  ctx: AppContext,
  federationId: number,
  userId: number | null,
  input: SaveMapping,
): Promise<{ row: MappingRow; created: boolean }> {
  const layout = Object.values(input.mapping).some((t) => t.startsWith('classifier:') || t.startsWith('seat')) ? 'wide' : 'long';
  return ctx.db.transaction().execute(async (trx) => {
    const existing = await trx
      .selectFrom('import_mappings')
      .select('id')
      .where('federation_id', '=', federationId)
      .where('name', '=', input.name)
      .executeTakeFirst();
    const values = { layout, mapping: JSON.stringify(input.mapping), date_format: input.dateFormat, user_id: userId } as const;
    if (existing) {
      await trx
        .updateTable('import_mappings')
        .set({ ...values, updated_at: new Date().toISOString() })
        .where('id', '=', existing.id)
        .execute();
    } else {
      await trx
        .insertInto('import_mappings')
        .values({ federation_id: federationId, name: input.name, ...values })
        .execute();
    }
    const row = await trx
      .selectFrom('import_mappings')
      .select(COLUMNS)
      .where('federation_id', '=', federationId)
      .where('name', '=', input.name)
      .executeTakeFirstOrThrow();
    await audit(trx, {
      federationId,
      userId,
      action: existing ? 'import_mapping.update' : 'import_mapping.create',
      entity: 'import_mapping',
      entityId: row.id,
      detail: { name: input.name },
    });
    return { row, created: !existing };
  });
}

/** Deletes a saved mapping of the federation; false when there is none with that id. */
export async function deleteMapping(ctx: AppContext, federationId: number, userId: number | null, id: number): Promise<boolean> {
  return ctx.db.transaction().execute(async (trx) => {
    const result = await trx
      .deleteFrom('import_mappings')
      .where('id', '=', id)
      .where('federation_id', '=', federationId)
      .executeTakeFirst();
    if (Number(result.numDeletedRows) === 0) return false;
    await audit(trx, { federationId, userId, action: 'import_mapping.delete', entity: 'import_mapping', entityId: id });
    return true;
  });
}

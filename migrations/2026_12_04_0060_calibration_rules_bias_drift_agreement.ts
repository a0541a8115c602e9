import { type Kysely, sql } from 'kysely';

// Frozen in time: migrations never import application code.

const now = sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`;

const RETIRED_NOTE =
  'Closed when the weighted-kappa rule was replaced by the same-class agreement rule (decision record 0008); kept for the record.';

/** Old threshold keys that the new rules no longer read. */
const OLD_KEYS = ['kappaMin', 'kappaWindow', 'biasMax', 'driftK', 'driftH', 'driftWindow'];

async function rebuildFlags(db: Kysely<any>, rules: string, withLapse: boolean, select: string): Promise<void> {
  await sql
    .raw(
      `
    create table calibration_flags_next (
      id integer primary key autoincrement,
      federation_id integer not null references federations(id) on delete cascade,
      classifier_id integer not null references classifiers(id) on delete cascade,
      rule text not null,
      status text not null default 'open',
      note text,
      evidence text not null,
      evidence_through text,
      still_met integer not null default 1,
      status_by integer references users(id) on delete set null,
      opened_at text not null default (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
      updated_at text not null default (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
      evaluated_at text not null default (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
      ${withLapse ? 'lapsed_at text, lapse_reason text,' : ''}
      constraint calibration_flags_rule_check check (rule in (${rules})),
      constraint calibration_flags_status_check check (status in ('open', 'acknowledged', 'closed'))
    )`,
    )
    .execute(db);
  await sql.raw(select).execute(db);
  await db.schema.dropTable('calibration_flags').execute();
  await sql.raw('alter table calibration_flags_next rename to calibration_flags').execute(db);
  await db.schema.createIndex('calibration_flags_federation_idx').on('calibration_flags').columns(['federation_id', 'status']).execute();
  await db.schema.createIndex('calibration_flags_classifier_idx').on('calibration_flags').columns(['classifier_id', 'rule']).execute();
}

async function rewriteThresholds(db: Kysely<any>, rewrite: (t: Record<string, unknown>) => Record<string, unknown>): Promise<void> {
  const rows = (await db.selectFrom('calibration_thresholds').select(['federation_id', 'thresholds']).execute()) as {
    federation_id: number;
    thresholds: string;
  }[];
  for (const row of rows) {
    let parsed: Record<string, unknown>;
    try {
      parsed = JSON.parse(row.thresholds) as Record<string, unknown>;
    } catch {
      parsed = {};
    }
    await db
      .updateTable('calibration_thresholds')
      .set({ thresholds: JSON.stringify(rewrite(parsed)), updated_at: now })
      .where('federation_id', '=', row.federation_id)
      .execute();
  }
}

/**
 * The calibration rules become `bias`, `drift` and `agreement` (decision record 0008):
 * - flags of the retired `kappa` rule become closed `agreement` flags with a note saying why
 *   (their evidence kept as it was; no ratings are held against a new flag);
 * - flags gain `lapsed_at` and `lapse_reason`: when and why the condition stopped holding;
 * - thresholds lose the keys of the old rules; a bias threshold the lead changed from the old
 *   default (0.25) becomes the new rule's minimum lean, the old default gives way to the new one.
 */
export async function up(db: Kysely<any>): Promise<void> {
  await rebuildFlags(
    db,
    "'bias', 'drift', 'agreement'",
    true,
    `insert into calibration_flags_next (id, federation_id, classifier_id, rule, status, note, evidence, evidence_through, still_met,
       status_by, opened_at, updated_at, evaluated_at, lapsed_at, lapse_reason)
     select id, federation_id, classifier_id,
       case rule when 'kappa' then 'agreement' else rule end,
       case rule when 'kappa' then 'closed' else status end,
       case when rule = 'kappa' and status != 'closed' then coalesce(note || ' — ', '') || '${RETIRED_NOTE}' else note end,
       evidence,
       case rule when 'kappa' then null else evidence_through end,
       case rule when 'kappa' then 0 else still_met end,
       status_by, opened_at, updated_at, evaluated_at,
       case when still_met = 0 then evaluated_at else null end,
       case when rule = 'kappa' then 'the weighted-kappa rule was retired' when still_met = 0 then 'no longer met at the last evaluation' else null end
     from calibration_flags`,
  );
  await rewriteThresholds(db, (old) => {
    const next: Record<string, unknown> = {};
    for (const [key, value] of Object.entries(old)) if (!OLD_KEYS.includes(key)) next[key] = value;
    if (typeof old.biasMax === 'number' && old.biasMax !== 0.25) next.biasMin = old.biasMax;
    return next;
  });
}

export async function down(db: Kysely<any>): Promise<void> {
  await rebuildFlags(
    db,
    "'kappa', 'bias', 'drift'",
    false,
    `insert into calibration_flags_next (id, federation_id, classifier_id, rule, status, note, evidence, evidence_through, still_met,
       status_by, opened_at, updated_at, evaluated_at)
     select id, federation_id, classifier_id, case rule when 'agreement' then 'kappa' else rule end, status, note, evidence,
       evidence_through, still_met, status_by, opened_at, updated_at, evaluated_at
     from calibration_flags`,
  );
  await rewriteThresholds(db, (next) => {
    const old: Record<string, unknown> = {};
    for (const [key, value] of Object.entries(next)) {
      if (!['biasMin', 'falseDiscoveryRate', 'agreementGap', 'agreementWindow', 'driftMin'].includes(key)) old[key] = value;
    }
    if (typeof next.biasMin === 'number') old.biasMax = next.biasMin;
    return old;
  });
}

/**
 * Migration 2026_12_04_0060 on a database holding flags and thresholds of the old rules: kappa
 * flags become closed agreement flags with the reason in their note, lapsed flags get a lapse
 * date and reason, the old threshold keys go (a lead's own bias threshold becomes the minimum
 * lean), and the rule check now allows exactly bias, drift and agreement. Down maps back.
 */
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/db/connection';
import { migratorFor } from '../../server/db/migrate';

describe('migration to the three calibration rules', () => {
  it('keeps old rows sensible, up and down', async () => {
    const { db, sqlite } = openDatabase(':memory:');
    const migrator = migratorFor(db);
    expect((await migrator.migrateTo('2026_12_02_0040_research_exports')).error).toBeUndefined();
    sqlite
      .prepare("insert into federations (id, slug, name) values (1, 'f1', 'Invented federation'), (2, 'f2', 'Another invented federation')")
      .run();
    sqlite
      .prepare(
        "insert into classifiers (id, federation_id, code, display_name) values (1, 1, 'C01', 'Invented One'), (2, 1, 'C02', 'Invented Two')",
      )
      .run();
    const evidence = JSON.stringify({
      summary: 'old',
      value: 0.7,
      ci95: null,
      threshold: 0.8,
      n: 100,
      from: '2024-01-01',
      to: '2024-06-01',
      direction: null,
    });
    const insert = sqlite.prepare(
      'insert into calibration_flags (federation_id, classifier_id, rule, status, note, evidence, evidence_through, still_met) values (1, ?, ?, ?, ?, ?, ?, ?)',
    );
    insert.run(1, 'kappa', 'open', null, evidence, '2024-06-01', 1);
    insert.run(2, 'kappa', 'closed', 'Discussed.', evidence, '2024-06-01', 0);
    insert.run(1, 'bias', 'acknowledged', null, evidence, '2024-06-01', 0);
    insert.run(2, 'drift', 'open', null, evidence, '2024-06-01', 1);
    sqlite.prepare('insert into calibration_thresholds (federation_id, thresholds) values (?, ?)').run(
      1,
      JSON.stringify({
        kappaMin: 0.8,
        kappaWindow: 100,
        biasMax: 0.2,
        biasWindow: 40,
        minRatings: 25,
        driftK: 0.5,
        driftH: 5,
        driftWindow: 100,
        driftEnabled: true,
        notifyLead: false,
      }),
    );
    sqlite
      .prepare('insert into calibration_thresholds (federation_id, thresholds) values (?, ?)')
      .run(2, JSON.stringify({ biasMax: 0.25, notifyLead: true }));

    expect((await migrator.migrateTo('2026_12_04_0060_calibration_rules_bias_drift_agreement')).error).toBeUndefined();
    const rows = sqlite
      .prepare(
        'select classifier_id, rule, status, note, evidence, evidence_through, still_met, lapsed_at, lapse_reason from calibration_flags order by id',
      )
      .all() as Record<string, unknown>[];
    expect(rows[0]).toMatchObject({
      rule: 'agreement',
      status: 'closed',
      still_met: 0,
      evidence_through: null,
      lapse_reason: 'the weighted-kappa rule was retired',
    });
    expect(String(rows[0].note)).toMatch(/weighted-kappa rule was replaced .*decision record 0008/);
    // A flag the lead had closed keeps the lead's note.
    expect(rows[1]).toMatchObject({ rule: 'agreement', status: 'closed', note: 'Discussed.' });
    expect(rows[2]).toMatchObject({
      rule: 'bias',
      status: 'acknowledged',
      still_met: 0,
      lapse_reason: 'no longer met at the last evaluation',
      evidence,
    });
    expect(rows[2].lapsed_at).not.toBeNull();
    expect(rows[3]).toMatchObject({ rule: 'drift', status: 'open', still_met: 1, lapsed_at: null, lapse_reason: null });
    expect(() => insert.run(1, 'kappa', 'open', null, evidence, null, 1)).toThrow(/CHECK constraint/);
    const th = (id: number) =>
      JSON.parse(
        (sqlite.prepare('select thresholds from calibration_thresholds where federation_id = ?').get(id) as { thresholds: string })
          .thresholds,
      );
    expect(th(1)).toEqual({ biasMin: 0.2, biasWindow: 40, minRatings: 25, driftEnabled: true, notifyLead: false });
    expect(th(2)).toEqual({ notifyLead: true });

    expect((await migrator.migrateTo('2026_12_04_0050_calibration_exercises')).error).toBeUndefined();
    expect(sqlite.prepare('select rule from calibration_flags order by id').pluck().all() as string[]).toEqual([
      'kappa',
      'kappa',
      'bias',
      'drift',
    ]);
    expect(th(1)).toMatchObject({ biasMax: 0.2, notifyLead: false });
    await db.destroy();
  });
});

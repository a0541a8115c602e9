import crypto from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/db/connection';
import { migrateToLatest } from '../../server/db/migrate';
import { DEMO_SCENARIO, generateScenario } from '../../server/demo/generator';
import { seedDemo } from '../../server/demo/seed';

async function seededFingerprint() {
  const { db, sqlite } = openDatabase(':memory:');
  await migrateToLatest(db);
  await seedDemo(db, sqlite);
  const counts = sqlite
    .prepare(
      'select (select count(*) from federations) f, (select count(*) from athletes) a, (select count(*) from classifiers) c, (select count(*) from events) e, (select count(*) from assessments) s, (select count(*) from ratings) r',
    )
    .get();
  const rows = sqlite
    .prepare(
      `select f.slug, s.external_id, s.assessed_on, s.kind, s.panel_class, a.code athlete, c.code classifier, r.sport_class
       from ratings r join assessments s on s.id = r.assessment_id join athletes a on a.id = s.athlete_id
       join classifiers c on c.id = r.classifier_id join federations f on f.id = s.federation_id
       order by f.slug, s.external_id, c.code`,
    )
    .all();
  const checksum = crypto.createHash('sha256').update(JSON.stringify(rows)).digest('hex');
  await db.destroy();
  return { counts, checksum };
}

describe('demo seed', () => {
  it('is deterministic: the same counts and the same checksum of all ratings on two runs', async () => {
    const first = await seededFingerprint();
    const second = await seededFingerprint();
    expect(second).toEqual(first);
  });

  it('has the scenario the demo promises', () => {
    const s = generateScenario(DEMO_SCENARIO);
    expect(s.athletes).toHaveLength(300);
    expect(s.classifiers).toHaveLength(20);
    expect(s.assessments.length).toBeGreaterThan(1800);
    expect(s.assessments.length).toBeLessThan(2200);
    const seasons = new Set(s.events.map((e) => e.code.slice(0, 5)));
    expect(seasons.size).toBeGreaterThanOrEqual(4);
    const sizes = new Set(s.assessments.map((a) => a.ratings.length));
    expect([...sizes].sort()).toEqual([2, 3]);
    expect(s.assessments.some((a) => a.kind === 'protest')).toBe(true);

    // Most splits fall at the 1.0/1.5 and 2.5/3.0 boundaries (half points 2/3 and 5/6).
    const splits = new Map<string, number>();
    for (const a of s.assessments) {
      const values = a.ratings.map((r) => r.sportClass);
      const lo = Math.min(...values);
      const hi = Math.max(...values);
      if (hi - lo === 1) splits.set(`${lo}/${hi}`, (splits.get(`${lo}/${hi}`) ?? 0) + 1);
    }
    const ranked = [...splits.entries()].sort((a, b) => b[1] - a[1]).map(([k]) => k);
    expect(ranked.slice(0, 2).sort()).toEqual(['2/3', '5/6']);

    // The drifting classifier rates higher than the panel's median after the drift date than before.
    const deviation = (code: string, after: boolean) => {
      let sum = 0;
      let n = 0;
      for (const a of s.assessments) {
        if (a.ratings.length !== 3 || a.assessedOn >= DEMO_SCENARIO.drift!.from !== after) continue;
        const mine = a.ratings.find((r) => r.classifierCode === code);
        if (!mine) continue;
        const others = a.ratings.filter((r) => r !== mine).map((r) => r.sportClass);
        sum += mine.sportClass - (others[0] + others[1]) / 2;
        n++;
      }
      return sum / n / 2;
    };
    expect(deviation('C05', true) - deviation('C05', false)).toBeGreaterThan(0.3);
    expect(deviation('C12', false)).toBeLessThan(-0.1);

    // Some athletes' panel class changes between assessments.
    const byAthlete = new Map<string, Set<number>>();
    for (const a of s.assessments) byAthlete.set(a.athleteCode, (byAthlete.get(a.athleteCode) ?? new Set()).add(a.panelClass));
    expect([...byAthlete.values()].filter((set) => set.size > 1).length).toBeGreaterThan(10);
  });
});

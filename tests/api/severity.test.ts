/**
 * Severity on the dashboards' API (decision record 0009), on the demo data: the classifiers'
 * rows and the classifier's page carry the engine's severity computed in the test on rows read
 * straight from the tables; the classifiers view carries the panel network; who sees it follows
 * the dashboards' rules (decision record 0006).
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildRatingSet, classifierSeverity, filterRatingSet, type RatingRow, type SeverityResult } from '../../server/analysis';
import { DEFAULT_SCALE } from '../../shared/scale';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';

const base = '/api/federations/kestrel-coast/analytics';

function readRows(t: TestApp): RatingRow[] {
  const rows = t.ctx.sqlite
    .prepare(
      `select a.external_id, ath.code as athlete, e.code as event, a.assessed_on, c.code as classifier, r.sport_class, a.panel_class, a.kind
         from ratings r join assessments a on a.id = r.assessment_id join athletes ath on ath.id = a.athlete_id
         join classifiers c on c.id = r.classifier_id join events e on e.id = a.event_id
         join federations f on f.id = a.federation_id
        where f.slug = 'kestrel-coast' order by a.assessed_on, a.id, r.id`,
    )
    .all() as {
    external_id: string;
    athlete: string;
    event: string;
    assessed_on: string;
    classifier: string;
    sport_class: number;
    panel_class: number | null;
    kind: 'first' | 'review' | 'protest';
  }[];
  return rows.map((r) => ({
    assessmentId: r.external_id,
    athleteCode: r.athlete,
    eventCode: r.event,
    assessedOn: r.assessed_on,
    classifierCode: r.classifier,
    sportClass: r.sport_class,
    panelClass: r.panel_class,
    kind: r.kind,
  }));
}

describe('severity on the dashboards API', () => {
  let t: TestApp;
  let fit: SeverityResult;
  let lead: Awaited<ReturnType<typeof signedInAgent>>;
  let classifier: Awaited<ReturnType<typeof signedInAgent>>;
  let researcher: Awaited<ReturnType<typeof signedInAgent>>;

  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
    fit = classifierSeverity(buildRatingSet(readRows(t), DEFAULT_SCALE));
    lead = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    classifier = await signedInAgent(t.app, 'classifier@demo.panelwise.test');
    researcher = await signedInAgent(t.app, 'researcher@demo.panelwise.test');
  });
  afterAll(() => t.close());

  it('classifiers: each row carries the engine’s severity; the view carries the model and the panel network', async () => {
    const res = await lead.get(`${base}/classifiers`);
    expect(res.status).toBe(200);
    const byCode = new Map(fit.classifiers.map((c) => [c.code, c]));
    expect(res.body.classifiers).toHaveLength(20);
    for (const row of res.body.classifiers) {
      const e = byCode.get(row.code)!;
      expect(row.severity.value).toBeCloseTo(e.value!, 10);
      expect(row.severity.se).toBeCloseTo(e.se!, 10);
      expect(row.severity.ci95[0]).toBeCloseTo(e.ci95![0], 10);
      expect(row.severity.n).toBe(e.n);
      expect(row.severity.links).toBe(e.links);
    }
    expect(res.body.network.edges).toEqual(fit.network.edges);
    expect(res.body.network.components).toEqual(fit.network.components);
    expect(res.body.severityModel).toMatchObject({ model: fit.model, ciMethod: 'analytic-cluster-robust-by-athlete', n: fit.n });
    // The demo's conservative classifier (about a quarter class lower; server/demo/generator.ts) is the most severe.
    const c12 = res.body.classifiers.find((r: { code: string }) => r.code === 'C12');
    const lowest = Math.min(...res.body.classifiers.map((r: { severity: { value: number } }) => r.severity.value));
    expect(c12.severity.value).toBe(lowest);
    expect(c12.severity.ci95[1]).toBeLessThan(0);
  });

  it('filters narrow the ratings the model is fitted on', async () => {
    const res = await lead.get(`${base}/classifiers?season=2024`);
    const season = classifierSeverity(
      filterRatingSet(buildRatingSet(readRows(t), DEFAULT_SCALE), { from: '2024-07-01', to: '2025-06-30' }),
    );
    const e = season.classifiers.find((c) => c.code === 'C03')!;
    const row = res.body.classifiers.find((r: { code: string }) => r.code === 'C03');
    expect(row.severity.value).toBeCloseTo(e.value!, 10);
    expect(res.body.severityModel.n).toBe(season.n);
  });

  it('the classifier’s page (lead) and their own page show the severity; no one else’s', async () => {
    const e = fit.classifiers.find((c) => c.code === 'C12')!;
    const detail = await lead.get(`${base}/classifiers/C12`);
    expect(detail.body.row.severity.value).toBeCloseTo(e.value!, 10);
    const me = await classifier.get(`${base}/me`);
    expect(me.body.row.severity.value).toBeCloseTo(e.value!, 10);
    expect(JSON.stringify(me.body)).not.toMatch(/"network"/);
    expect((await classifier.get(`${base}/classifiers`)).status).toBe(403);
    expect((await researcher.get(`${base}/classifiers`)).status).toBe(403);
    expect((await request(t.app).get(`${base}/classifiers`)).status).toBe(401);
  });
});

/**
 * The agreement dashboards' API on the demo data: every figure is checked against the agreement
 * engine called directly in the test on rows read from the database (the engine itself is checked
 * against published examples in tests/unit/analysis). Also: roles, filters, caching on the data
 * version, and the calibration flags' life cycle and e-mail.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  analyzeRatings,
  buildRatingSet,
  classBoundaries,
  classDistributionBySeason,
  classTransitions,
  changePointTest,
  classifierBoundarySplits,
  classifierDeviations,
  classifierPairs,
  classifiersVsPanel,
  compressPatterns,
  confusionBetween,
  confusionWithPanel,
  countTable,
  deviationByQuarter,
  evaluateCalibration,
  filterRatingSet,
  hashSeed,
  landisKochLabel,
  pointsApart,
  pointsAtStake,
  subsetRatingSet,
  twoRaterCoefficients,
  type RatingRow,
  type RatingSet,
} from '../../server/analysis';
import { generateScenario, DEMO_SCENARIO } from '../../server/demo/generator';
import { DEFAULT_FLAG_THRESHOLDS } from '../../shared/schemas/analytics';
import { DEFAULT_SCALE } from '../../shared/scale';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';

const base = '/api/federations/kestrel-coast/analytics';
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

/** The federation's ratings, read straight from the tables (not through the service under test). */
function readRows(t: TestApp, where = '', params: unknown[] = []): RatingRow[] {
  const rows = t.ctx.sqlite
    .prepare(
      `select a.external_id, ath.code as athlete, e.code as event, a.assessed_on, c.code as classifier, r.sport_class, a.panel_class, a.kind
         from ratings r join assessments a on a.id = r.assessment_id join athletes ath on ath.id = a.athlete_id
         join classifiers c on c.id = r.classifier_id join events e on e.id = a.event_id
         join federations f on f.id = a.federation_id
        where f.slug = 'kestrel-coast' ${where} order by a.assessed_on, a.id, r.id`,
    )
    .all(...params) as {
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

const close = (actual: number | null, expected: number | null) => {
  if (expected === null) expect(actual).toBeNull();
  else expect(actual).toBeCloseTo(expected, 10);
};

describe('agreement dashboards API', () => {
  let t: TestApp;
  let set: RatingSet;
  let lead: Agent;
  let classifier: Agent;
  let researcher: Agent;

  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
    set = buildRatingSet(readRows(t), DEFAULT_SCALE);
    lead = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    classifier = await signedInAgent(t.app, 'classifier@demo.panelwise.test');
    researcher = await signedInAgent(t.app, 'researcher@demo.panelwise.test');
  });
  afterAll(() => t.close());

  it('overview: ordinal alpha, Fleiss’ kappa with their bands, agreement and counts equal the engine’s report', async () => {
    const res = await lead.get(`${base}/overview`);
    expect(res.status).toBe(200);
    const report = analyzeRatings(set, { bootstrap: res.body.bootstrap.B, seed: res.body.bootstrap.seed });
    close(res.body.alpha.value, report.krippendorffAlpha.ordinal.value);
    expect(res.body.alpha.ci95[0]).toBeCloseTo(report.krippendorffAlpha.ordinal.ci95![0], 10);
    expect(res.body.alpha.ci95[1]).toBeCloseTo(report.krippendorffAlpha.ordinal.ci95![1], 10);
    // Landis & Koch's bands are for kappa; alpha carries Krippendorff's (2004) rule only.
    expect(res.body.alpha.label).toBeNull();
    expect(res.body.alpha.note).toBe(report.krippendorffAlpha.ordinal.note);
    for (const key of ['ac1', 'ac2Linear', 'ac2Quadratic'] as const) {
      close(res.body.gwet[key].value, report.gwet[key].value);
      expect(res.body.gwet[key].ci95).toEqual(report.gwet[key].ci95);
      expect(res.body.gwet[key].label).toBe(landisKochLabel(report.gwet[key].value));
    }
    close(res.body.headline.panelsUnanimous.value, report.exactAgreement.unanimous.value);
    close(res.body.headline.pairwiseSameClass.value, report.exactAgreement.pairwiseMean.value);
    expect(res.body.headline.splits.map((b: { splits: number }) => b.splits)).toEqual(report.boundaries.map((b) => b.splits));
    const stake = pointsAtStake(set).federation;
    close(res.body.headline.pointsAtStake.meanAbs.value, stake.meanAbs.value);
    close(res.body.headline.pointsAtStake.offByHalf.value, stake.offByHalf.value);
    close(res.body.headline.pointsAtStake.per100, stake.per100);
    // The coefficients table: every coefficient, with its interval method; bands only on kappa-type rows, Krippendorff's rule on alpha.
    const rows = res.body.coefficients as {
      id: string;
      value: number | null;
      ciMethod: string | null;
      interpretation: { label: string; source: string } | null;
      measures: string;
    }[];
    const byId = new Map(rows.map((r) => [r.id, r]));
    close(byId.get('fleissKappa')!.value, report.fleissKappa.value);
    close(byId.get('gwet.ac1')!.value, report.gwet.ac1.value);
    close(byId.get('gwet.ac2Linear')!.value, report.gwet.ac2Linear.value);
    close(byId.get('gwet.ac2Quadratic')!.value, report.gwet.ac2Quadratic.value);
    close(byId.get('exact.unanimous')!.value, report.exactAgreement.unanimous.value);
    close(byId.get('exact.pooledPairs')!.value, report.exactAgreement.pooledPairs.value);
    for (const m of ['nominal', 'ordinal', 'interval', 'ratio'] as const) {
      const r = byId.get(`alpha.${m}`)!;
      close(r.value, report.krippendorffAlpha[m].value);
      expect(r.interpretation?.source ?? '').toMatch(/Krippendorff \(2004\)/);
      expect(r.interpretation?.label ?? '').not.toMatch(/Poor|Slight|Fair|Moderate|Substantial|Almost Perfect/);
    }
    for (const cls of Object.keys(report.fleissKappaByClass))
      close(byId.get(`fleissKappa.${cls}`)!.value, report.fleissKappaByClass[cls].value);
    expect(byId.get('gwet.ac1')!.interpretation?.source).toMatch(/Landis & Koch/);
    expect(byId.get('exact.unanimous')!.interpretation).toBeNull();
    for (const r of rows) expect(r.measures.length).toBeGreaterThan(10);
    close(res.body.fleissKappa.value, report.fleissKappa.value);
    expect(res.body.fleissKappa.ci95).toEqual(report.fleissKappa.ci95);
    expect(res.body.fleissKappa.name).toBe(report.fleissKappa.name);
    expect(res.body.fleissKappa.label).toBe(report.fleissKappa.label);
    close(res.body.exact.value, report.exactAgreement.unanimous.value);
    close(res.body.withinHalfClass.value, report.withinHalfClassAgreement.unanimous.value);
    expect(res.body.counts).toMatchObject({ assessments: report.counts.assessments, ratings: report.counts.ratings, classifiers: 20 });
    expect(res.body.sources.landisKoch).toMatch(/Landis & Koch \(1977\)/);
    expect(res.body.trend.length).toBeGreaterThan(8);
    expect(res.body.trend.map((p: { quarter: string }) => p.quarter)).toEqual(
      [...res.body.trend.map((p: { quarter: string }) => p.quarter)].sort(),
    );
    expect(res.body.openFlags).toEqual(expect.any(Array));
  });

  it('filters: a season, an assessment kind and a category narrow the data as the engine’s filter does', async () => {
    const res = await lead.get(`${base}/overview?season=2024&kind=review&category=women`);
    expect(res.status).toBe(200);
    const women = new Set(
      (
        t.ctx.sqlite
          .prepare(
            "select code from athletes where category = 'women' and federation_id = (select id from federations where slug = 'kestrel-coast')",
          )
          .all() as { code: string }[]
      ).map((r) => r.code),
    );
    const narrowed = subsetRatingSet(filterRatingSet(set, { from: '2024-07-01', to: '2025-06-30', kinds: ['review'] }), (a, s) =>
      women.has(s.athleteCodes[s.athlete[a]]),
    );
    const report = analyzeRatings(narrowed);
    expect(res.body.counts.assessments).toBe(narrowed.assessmentCount);
    close(res.body.alpha.value, report.krippendorffAlpha.ordinal.value);
    close(res.body.fleissKappa.value, report.fleissKappa.value);

    const byEvent = await lead.get(`${base}/boundaries?event=S2324-CUP`);
    const eventSet = filterRatingSet(set, { eventCodes: ['S2324-CUP'] });
    const expected = classBoundaries(compressPatterns(countTable(eventSet), 1), DEFAULT_SCALE);
    expect(byEvent.body.boundaries.map((b: { splits: number }) => b.splits)).toEqual(expected.map((b) => b.splits));
  });

  it('refuses bad filters with the field named', async () => {
    const res = await lead.get(`${base}/overview?from=2025-01-01&to=2024-01-01&minShared=0&kind=appeal`);
    expect(res.status).toBe(400);
    expect(res.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['kind', 'minShared']);
    const dates = await lead.get(`${base}/overview?from=2025-01-01&to=2024-01-01`);
    expect(dates.status).toBe(400);
    expect(dates.body.error.details[0].path).toBe('from');
  });

  it('classifiers: agreement with the panel, bias, quadratic kappa and the trend equal classifiersVsPanel and deviationByQuarter', async () => {
    const res = await lead.get(`${base}/classifiers`);
    expect(res.status).toBe(200);
    const expected = classifiersVsPanel(set);
    expect(res.body.classifiers.map((c: { code: string }) => c.code)).toEqual(expected.map((c) => c.code));
    for (const e of expected) {
      const row = res.body.classifiers.find((c: { code: string }) => c.code === e.code);
      expect(row.n).toBe(e.n);
      close(row.bias.value, e.meanDeviation.value);
      close(row.exactWithPanel.value, e.exactWithPanel.value);
      close(row.quadraticKappa.value, e.quadraticKappaWithPanel.value);
      expect(row.quadraticKappa.ci95).toEqual(e.quadraticKappaWithPanel.ci95);
      expect(row.trend.map((q: { value: number }) => q.value)).toEqual(deviationByQuarter(set, e.code).map((q) => q.result.value));
    }
  });

  it('a classifier’s page: confusion matrix with the panel, bias by quarter, boundaries, points at stake and the change of level as the engine computes them', async () => {
    const res = await lead.get(`${base}/classifiers/C05`);
    expect(res.status).toBe(200);
    const confusion = confusionWithPanel(set, 'C05');
    expect(res.body.confusion.counts).toEqual(confusion.counts);
    expect(res.body.biasByQuarter.map((q: { value: number }) => q.value)).toEqual(
      deviationByQuarter(set, 'C05').map((q) => q.result.value),
    );
    expect(res.body.boundaries.map((b: { splitRate: number | null }) => b.splitRate)).toEqual(
      classifierBoundarySplits(confusion).map((b) => b.splitRate),
    );
    const series = classifierDeviations(set, 'C05');
    const cp = changePointTest(series.deviation, hashSeed('C05', 1))!;
    expect(res.body.drift.n).toBe(series.deviation.length);
    expect(res.body.drift.change).toMatchObject({ nBefore: cp.k, nAfter: cp.n - cp.k, direction: 'up' });
    close(res.body.drift.change.sizeAfter, cp.meanAfter);
    expect(res.body.drift.change.changeDate >= '2024-06-01' && res.body.drift.change.changeDate <= '2024-10-31').toBe(true);
    close(res.body.headline.pointsAtStake.meanAbs.value, pointsAtStake(set).classifiers.get('C05')!.meanAbs.value);
    expect(res.body.name).toBe(generateScenario(DEMO_SCENARIO).classifiers.find((c) => c.code === 'C05')!.displayName);
    expect((await lead.get(`${base}/classifiers/C99`)).status).toBe(404);
  });

  it('pairs: quadratic kappa for pairs with enough shared assessments, “too few” without a value below the minimum', async () => {
    const res = await lead.get(`${base}/pairs?minShared=35`);
    expect(res.status).toBe(200);
    const expected = classifierPairs(set, 1);
    expect(res.body.pairs).toHaveLength(expected.length);
    let tooFew = 0;
    for (const e of expected) {
      const cell = res.body.pairs.find((p: { a: string; b: string }) => p.a === e.a && p.b === e.b);
      expect(cell.n).toBe(e.n);
      if (e.n < 35) {
        tooFew++;
        expect(cell).toMatchObject({ tooFew: true, quadraticKappa: null });
      } else close(cell.quadraticKappa.value, e.quadraticKappa.value);
    }
    expect(tooFew).toBeGreaterThan(0);
    const detail = await lead.get(`${base}/pairs/C02/C01`);
    expect(detail.body.confusion.counts).toEqual(confusionBetween(set, 'C02', 'C01').counts);
    const pair = expected.find((p) => p.a === 'C01' && p.b === 'C02')!;
    close(detail.body.stats.quadraticKappa.value, pair.quadraticKappa.value);
    // The pair's headline: points apart and splits from its confusion matrix, AC1 from the same table.
    const cm = confusionBetween(set, 'C02', 'C01');
    const two = twoRaterCoefficients(cm.counts);
    close(detail.body.stats.ac1.value, two.ac1.value);
    close(detail.body.stats.kappa.value, two.kappa.value);
    close(detail.body.stats.pointsApart.meanAbs.value, pointsApart(cm.counts).meanAbs.value);
    expect(detail.body.stats.splits.map((x: { splitRate: number | null }) => x.splitRate)).toEqual(
      classifierBoundarySplits(cm).map((x) => x.splitRate),
    );
  });

  it('boundaries: split rates and the quarterly trend equal classBoundaries', async () => {
    const res = await lead.get(`${base}/boundaries`);
    const expected = classBoundaries(compressPatterns(countTable(set), 1), DEFAULT_SCALE);
    expect(res.body.boundaries.map((b: { splitRate: number }) => b.splitRate)).toEqual(expected.map((b) => b.splitRate));
    expect(res.body.trend.length).toBeGreaterThan(7 * 8);
  });

  it('drift: rater drift by quarter with the change-of-level test; class drift as transitions and the distribution by season', async () => {
    const raters = await lead.get(`${base}/drift/raters`);
    const verdicts = evaluateCalibration(set, DEFAULT_FLAG_THRESHOLDS);
    for (const c of raters.body.classifiers as { code: string; change: { met: boolean } | null }[]) {
      expect(c.change?.met ?? false).toBe(verdicts.find((v) => v.code === c.code)!.drift.met);
    }
    const c05 = raters.body.classifiers.find((c: { code: string }) => c.code === 'C05');
    expect(c05.change).toMatchObject({ met: true, direction: 'up' });
    const classes = await lead.get(`${base}/drift/classes`);
    const tr = classTransitions(set);
    expect(classes.body.transitions.counts).toEqual(tr.counts);
    close(classes.body.transitions.reviewsChanged.value, tr.reviewsChanged.value);
    close(classes.body.transitions.protestsChanged.value, tr.protestsChanged.value);
    expect(classes.body.changes).toHaveLength(tr.changes.length);
    expect(classes.body.distribution.map((d: { n: number }) => d.n)).toEqual(classDistributionBySeason(set).map((d) => d.n));
  });

  it('a classifier sees their own figures and the federation’s spread without codes; another classifier’s page is refused', async () => {
    const me = await classifier.get(`${base}/me`);
    expect(me.status).toBe(200);
    expect(me.body.code).toBe('C12');
    const mine = classifiersVsPanel(set).find((c) => c.code === 'C12')!;
    close(me.body.row.bias.value, mine.meanDeviation.value);
    expect(me.body.distribution.quadraticKappa).toHaveLength(20);
    const text = JSON.stringify(me.body).replace(/"code":"C12"|"rowsAre":"C12"|"classifierCode":"C12"/g, '');
    expect(text).not.toMatch(/\bC(0[1-9]|1[0-9]|20)\b/);
    expect(me.body.name).toBeNull();
    expect((await classifier.get(`${base}/classifiers/C12`)).status).toBe(200);
    expect((await classifier.get(`${base}/classifiers/C05`)).status).toBe(403);
    expect((await classifier.get(`${base}/classifiers/C99`)).status).toBe(403);
    for (const path of ['/classifiers', '/pairs', '/pairs/C01/C02', '/drift/raters', '/flags', '/flag-settings']) {
      expect((await classifier.get(base + path)).status).toBe(403);
    }
    const overview = await classifier.get(`${base}/overview`);
    expect(overview.body.openFlags).toBeNull();
    const classes = await classifier.get(`${base}/drift/classes`);
    expect(classes.body.changes).toBeNull();
  });

  it('a researcher gets aggregates only: no classifier or athlete code, name, assessment id or exact date', async () => {
    const names = generateScenario(DEMO_SCENARIO);
    for (const path of ['/overview', '/boundaries', '/drift/classes', '/filters']) {
      const res = await researcher.get(base + path);
      expect(res.status).toBe(200);
      const text = JSON.stringify(res.body);
      expect(text).not.toMatch(/\bC(0[1-9]|1[0-9]|20)\b/);
      expect(text).not.toMatch(/\bA\d{4}\b/);
      expect(text).not.toMatch(/KE-\d{5}/);
      for (const c of names.classifiers) expect(text).not.toContain(c.displayName);
      for (const a of names.athletes.slice(0, 50)) expect(text).not.toContain(a.displayName);
      if (path !== '/filters') expect(text).not.toMatch(/\d{4}-\d{2}-\d{2}/);
    }
    for (const path of [
      '/classifiers',
      '/classifiers/C12',
      '/me',
      '/pairs',
      '/pairs/C01/C02',
      '/drift/raters',
      '/flags',
      '/flag-settings',
    ]) {
      expect((await researcher.get(base + path)).status).toBe(403);
    }
    // No event list and no event filter for researchers (400, naming the field); no aggregate of fewer than 10 athletes for anyone but a lead.
    expect((await researcher.get(`${base}/filters`)).body.events).toEqual([]);
    const byEvent = await researcher.get(`${base}/overview?event=S2324-CUP`);
    expect(byEvent.status).toBe(400);
    expect(byEvent.body.error.details[0].path).toBe('event');
    const protests = filterRatingSet(set, { kinds: ['protest'], from: '2024-07-01', to: '2025-06-30' });
    const athletes = new Set(protests.athlete).size;
    expect(athletes).toBeLessThan(10);
    const small = await classifier.get(`${base}/boundaries?kind=protest&season=2024`);
    expect(small.status).toBe(422);
    expect(small.body.error.message).toContain(`leave ${athletes} athletes`);
    expect((await classifier.get(`${base}/drift/classes?kind=protest&season=2024`)).status).toBe(422);
    expect((await lead.get(`${base}/drift/classes?kind=protest&season=2024`)).status).toBe(200);
    // For researchers the protests' cells (fewer than k = 5 athletes each) are left out before anything: nothing to show
    // (tests/api/differencing.test.ts).
    const researcherProtests = await researcher.get(`${base}/drift/classes?kind=protest&season=2024`);
    expect(researcherProtests.status).toBe(200);
    expect(researcherProtests.body.transitions.n).toBe(0);
    const mine = await classifier.get(`${base}/me?kind=protest&season=2024`);
    expect(mine.body.distribution.quadraticKappa).toEqual([]);
  });

  it('caches per data version: a new assessment shows after the data version moves', async () => {
    const before = (await lead.get(`${base}/overview`)).body.counts.assessments;
    const fed = t.ctx.sqlite.prepare("select id from federations where slug = 'kestrel-coast'").get() as { id: number };
    const athlete = t.ctx.sqlite.prepare('select id from athletes where federation_id = ? limit 1').get(fed.id) as { id: number };
    const event = t.ctx.sqlite.prepare('select id from events where federation_id = ? limit 1').get(fed.id) as { id: number };
    const cs = t.ctx.sqlite.prepare("select id from classifiers where federation_id = ? and code in ('C01', 'C02')").all(fed.id) as {
      id: number;
    }[];
    const id = Number(
      t.ctx.sqlite
        .prepare(
          "insert into assessments (federation_id, external_id, athlete_id, event_id, assessed_on, kind, panel_class) values (?, 'KE-TEST1', ?, ?, '2026-05-01', 'review', 5)",
        )
        .run(fed.id, athlete.id, event.id).lastInsertRowid,
    );
    for (const c of cs)
      t.ctx.sqlite.prepare('insert into ratings (assessment_id, classifier_id, sport_class) values (?, ?, 5)').run(id, c.id);
    expect((await lead.get(`${base}/overview`)).body.counts.assessments).toBe(before);
    t.ctx.dataVersions.bump(fed.id);
    expect((await lead.get(`${base}/overview`)).body.counts.assessments).toBe(before + 1);
    t.ctx.sqlite.prepare('delete from ratings where assessment_id = ?').run(id);
    t.ctx.sqlite.prepare('delete from assessments where id = ?').run(id);
    t.ctx.dataVersions.bump(fed.id);
    // Let the background re-evaluation of the flags finish before the next test.
    await t.ctx.jobs.idle();
  });

  it('calibration flags: evaluated against the engine, kept with the lead’s status, e-mailed when new, not reopened on the same ratings', async () => {
    const sent: { to: string; subject: string; text: string }[] = [];
    (t.ctx as unknown as { mailer: unknown }).mailer = {
      send: async (m: { to: string; subject: string; text: string }) => void sent.push(m),
    };
    t.ctx.sqlite.prepare('delete from calibration_flags').run();

    // The default rules, evaluated by the engine directly on the rows read from the database.
    const saved = await lead.put(`${base}/flag-settings`).send(DEFAULT_FLAG_THRESHOLDS);
    expect(saved.status).toBe(200);
    const flags = (await lead.get(`${base}/flags`)).body.flags as {
      id: number;
      classifierCode: string;
      rule: string;
      status: string;
      stillMet: boolean;
      evidence: { value: number; n: number; total: number; from: string; to: string; changeDate?: string; direction: string | null };
    }[];
    const verdicts = evaluateCalibration(set, DEFAULT_FLAG_THRESHOLDS);
    for (const rule of ['bias', 'drift', 'agreement'] as const) {
      const expected = verdicts
        .filter((v) => v[rule].met)
        .map((v) => v.code)
        .sort();
      expect(
        flags
          .filter((f) => f.rule === rule)
          .map((f) => f.classifierCode)
          .sort(),
        rule,
      ).toEqual(expected);
    }
    const c12 = flags.find((f) => f.classifierCode === 'C12' && f.rule === 'bias')!;
    close(c12.evidence.value, verdicts.find((v) => v.code === 'C12')!.bias.mean);
    expect(c12.evidence.direction).toBe('down');
    expect(c12.status).toBe('open');
    expect(sent.length).toBe(1);
    expect(sent[0].to).toBe('lead@demo.panelwise.test');
    expect(sent[0].text).toContain('C12');

    expect((await lead.patch(`${base}/flags/${c12.id}`).send({ status: 'closed' })).status).toBe(400);
    expect((await lead.patch(`${base}/flags/${c12.id}`).send({ status: 'acknowledged' })).body.status).toBe('acknowledged');
    const closed = await lead
      .patch(`${base}/flags/${c12.id}`)
      .send({ status: 'closed', note: 'Talked it through at the spring calibration day.' });
    expect(closed.body).toMatchObject({ status: 'closed', note: 'Talked it through at the spring calibration day.' });

    const again = await lead.post(`${base}/flags/evaluate`);
    expect(again.body.opened).toBe(0);
    expect(sent.length).toBe(1);
    const after = (await lead.get(`${base}/flags`)).body.flags as { id: number; status: string }[];
    expect(after.find((f) => f.id === c12.id)!.status).toBe('closed');
    expect((await lead.patch(`${base}/flags/${c12.id}`).send({ status: 'open' })).status).toBe(409);
    expect((await lead.patch(`${base}/flags/999999`).send({ status: 'acknowledged' })).status).toBe(404);

    const bad = await lead.put(`${base}/flag-settings`).send({ ...DEFAULT_FLAG_THRESHOLDS, biasMin: 5 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0].path).toBe('biasMin');
    await lead.put(`${base}/flag-settings`).send(DEFAULT_FLAG_THRESHOLDS);
  });

  it('answers without a session with 401', async () => {
    expect((await request(t.app).get(`${base}/overview`)).status).toBe(401);
  });
});

/**
 * Privacy that survives differencing (docs/decisions/0007-research-export.md, "Differencing"):
 * the attacks of issue 14, each refused or empty, on the demo data.
 *
 * - the class drift view with kind=protest minus the same with to=…;
 * - a two-day from/to window (and an event) as a researcher or a read token;
 * - two exports, categories junior+men+women and men+women, whose difference is a few juniors;
 * - the same export again after one assessment was added;
 * - exact dates in the federation summary or any other response a researcher can get.
 *
 * The cells (quarter × kind × category, over the whole federation) are counted here straight
 * from the tables, not through the server's code.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiToken } from '../../server/services/api-tokens';
import { bumpDataVersion } from '../../server/services/data-version';
import type { ExportRequest, ExportView } from '../../shared/schemas/exports';
import { entries as dashboardEntries } from './access/dashboards';
import { entries as exportEntries } from './access/exports';
import { entries as foundationEntries } from './access/foundation';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';

const analytics = '/api/federations/kestrel-coast/analytics';
const exportsBase = '/api/federations/kestrel-coast/exports';
const K = 5;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
type Kind = 'first' | 'review' | 'protest';

interface Row {
  id: number;
  athlete: number;
  assessed_on: string;
  kind: Kind;
  category: string;
  level: string;
}

const quarterOf = (d: string) => `${d.slice(0, 4)}-Q${Math.ceil(Number(d.slice(5, 7)) / 3)}`;
const seasonOf = (d: string) => {
  const y = Number(d.slice(0, 4));
  const s = Number(d.slice(5, 7)) >= 7 ? y : y - 1;
  return `${s}-${String(s + 1).slice(2)}`;
};

/** The demo federation's assessments that have ratings, and which of them lie in cells of at least k athletes. */
function assessments(t: TestApp, k = K): { rows: Row[]; allowed: (r: Row) => boolean } {
  const rows = t.ctx.sqlite
    .prepare(
      `select a.id, a.athlete_id as athlete, a.assessed_on, a.kind, ath.category, e.level
         from assessments a join athletes ath on ath.id = a.athlete_id join events e on e.id = a.event_id
         join federations f on f.id = a.federation_id
        where f.slug = 'kestrel-coast' and exists (select 1 from ratings r where r.assessment_id = a.id)`,
    )
    .all() as Row[];
  const cell = (r: Row) => `${quarterOf(r.assessed_on)}|${r.kind}|${r.category}`;
  const athletes = new Map<string, Set<number>>();
  for (const r of rows) {
    if (!athletes.has(cell(r))) athletes.set(cell(r), new Set());
    athletes.get(cell(r))!.add(r.athlete);
  }
  return { rows, allowed: (r) => athletes.get(cell(r))!.size >= k };
}

describe('privacy that survives differencing', () => {
  let t: TestApp;
  let lead: Agent;
  let researcher: Agent;
  let readToken: string;

  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
    lead = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    researcher = await signedInAgent(t.app, 'researcher@demo.panelwise.test');
    const federation = t.ctx.sqlite.prepare("select id from federations where slug = 'kestrel-coast'").get() as { id: number };
    readToken = (await createApiToken(t.ctx, federation.id, { name: 'differencing read', scope: 'read' }, null)).token;
  });
  afterAll(() => t.close());

  const asToken = (path: string) => request(t.app).get(path).set('Authorization', `Bearer ${readToken}`);

  it('refuses day-level windows and events to researchers and read tokens, naming the field (400)', async () => {
    // The class drift view with kind=protest minus the same with to=…: the second half is refused.
    for (const get of [(p: string) => researcher.get(p), asToken]) {
      const window = await get(`${analytics}/drift/classes?kind=protest&to=2026-06-10`);
      expect(window.status).toBe(400);
      expect(window.body.error.details.map((d: { path: string }) => d.path)).toEqual(['to']);
      expect(window.body.error.message).toMatch(/whole seasons and quarters/);
      // A two-day window, which gave one event's figures.
      const twoDays = await get(`${analytics}/overview?from=2024-10-05&to=2024-10-06`);
      expect(twoDays.status).toBe(400);
      expect(twoDays.body.error.details.map((d: { path: string }) => d.path)).toEqual(['from', 'to']);
      const event = await get(`${analytics}/boundaries?event=S2324-CUP`);
      expect(event.status).toBe(400);
      expect(event.body.error.details.map((d: { path: string }) => d.path)).toEqual(['event']);
    }
    // Leads keep their day-level filters.
    expect((await lead.get(`${analytics}/drift/classes?kind=protest&to=2026-06-10`)).status).toBe(200);
  });

  it('leaves every cell of fewer than k athletes out of a researcher’s figures: the protests, which no cell holds k athletes of, are empty', async () => {
    const { rows, allowed } = assessments(t);
    const protests = rows.filter((r) => r.kind === 'protest');
    expect(protests.length).toBeGreaterThan(0);
    expect(protests.filter(allowed)).toEqual([]);
    const view = await researcher.get(`${analytics}/drift/classes?kind=protest`);
    expect(view.status).toBe(200);
    expect(view.body.transitions.n).toBe(0);
    expect(view.body.distribution.every((d: { n: number }) => d.n === 0)).toBe(true);
    const overview = await researcher.get(`${analytics}/overview?kind=protest`);
    expect(overview.body.counts.assessments).toBe(0);
    // The lead still sees them.
    expect((await lead.get(`${analytics}/overview?kind=protest`)).body.counts.assessments).toBe(protests.length);
  });

  it('answers every season, quarter, kind and category as the union of whole cells of at least k athletes', async () => {
    const { rows, allowed } = assessments(t);
    const seasons = [...new Set(rows.map((r) => seasonOf(r.assessed_on)))].sort();
    const total = (await researcher.get(`${analytics}/overview`)).body.counts.assessments as number;
    expect(total).toBe(rows.filter(allowed).length);
    expect(total).toBeLessThan(rows.length);
    let sum = 0;
    for (const season of seasons) {
      const res = await researcher.get(`${analytics}/overview?season=${season.slice(0, 4)}`);
      expect(res.status).toBe(200);
      const expected = rows.filter((r) => allowed(r) && seasonOf(r.assessed_on) === season).length;
      expect(res.body.counts.assessments, season).toBe(expected);
      sum += res.body.counts.assessments;
    }
    expect(sum).toBe(total);
    // A quarter and a kind within it, and a category: the same cells, counted from the tables.
    const quarter = '2024-Q4';
    for (const query of [`quarter=${quarter}`, `quarter=${quarter}&kind=review`, `quarter=${quarter}&kind=review&category=women`]) {
      const params = new URLSearchParams(query);
      const res = await researcher.get(`${analytics}/overview?${query}`);
      expect(res.status).toBe(200);
      const expected = rows.filter(
        (r) =>
          allowed(r) &&
          quarterOf(r.assessed_on) === quarter &&
          (!params.get('kind') || r.kind === params.get('kind')) &&
          (!params.get('category') || r.category === params.get('category')),
      ).length;
      expect(res.body.counts.assessments, query).toBe(expected);
    }
    expect((await researcher.get(`${analytics}/overview?quarter=2024-Q5`)).status).toBe(400);
  });

  it('refuses the second of two exports that differ by fewer than k athletes (junior+men+women after men+women)', async () => {
    // A k and a scope in which the juniors of whole allowed cells are 1 … k − 1 athletes, and men and women at least k.
    let found: { k: number; scope: ExportRequest['scope']; juniors: number } | null = null;
    search: for (const k of [5, 8, 10, 12, 15, 20]) {
      const { rows, allowed } = assessments(t, k);
      const seasons = [...new Set(rows.map((r) => seasonOf(r.assessed_on)))].sort();
      for (const season of seasons)
        for (const level of ['championship', 'national'])
          for (const kinds of [['first'], ['review'], ['first', 'review']] as Kind[][]) {
            const inScope = rows.filter(
              (r) => allowed(r) && seasonOf(r.assessed_on) === season && r.level === level && kinds.includes(r.kind),
            );
            const athletesOf = (categories: string[]) =>
              new Set(inScope.filter((r) => categories.includes(r.category)).map((r) => r.athlete)).size;
            const juniors = athletesOf(['junior']);
            if (juniors > 0 && juniors < k && athletesOf(['men', 'women']) >= k) {
              found = { k, scope: { seasons: [season], eventLevels: [level], categories: ['men', 'women'], kinds }, juniors };
              break search;
            }
          }
    }
    expect(found, 'a scope with a few juniors in the demo data').not.toBeNull();
    const { k, scope, juniors } = found!;
    const body = (categories: string[]): ExportRequest => ({
      scope: { ...scope, categories },
      fields: ['athlete', 'category', 'kind'],
      dateMode: 'month',
    });
    await lead.put(`${exportsBase}/settings`).send({ minAthletes: k }).expect(200);
    try {
      const menWomen = (
        await researcher
          .post(exportsBase)
          .send(body(['men', 'women']))
          .expect(201)
      ).body as ExportView;
      const refused = await researcher
        .post(exportsBase)
        .send(body(['junior', 'men', 'women']))
        .expect(422);
      expect(refused.body.error.message).toContain(`would differ from your export ${menWomen.id}`);
      expect(refused.body.error.message).toContain(`by ${juniors} athlete`);
      expect(refused.body.error.message).toContain(`fewer than k = ${k}`);
      expect(refused.body.error.details).toEqual([{ path: 'scope', message: expect.stringMatching(/differs from an earlier export/) }]);
      // Nothing was kept of the refused export.
      const count = t.ctx.sqlite.prepare('select count(*) as n from research_exports').get() as { n: number };
      expect(count.n).toBe(1);
      // The same export again differs by no athlete: allowed (the researcher could download the first one anyway).
      await researcher
        .post(exportsBase)
        .send(body(['men', 'women']))
        .expect(201);
      // The other order is refused the same way (the lead's exports are compared with the lead's own, not the researcher's).
      await lead
        .post(exportsBase)
        .send(body(['junior', 'men', 'women']))
        .expect(201);
      const leadAgain = await lead
        .post(exportsBase)
        .send(body(['men', 'women']))
        .expect(422);
      expect(leadAgain.body.error.message).toContain(`by ${juniors} athlete`);
    } finally {
      await lead.put(`${exportsBase}/settings`).send({ minAthletes: K }).expect(200);
    }
  });

  it('leaves out a category of fewer than k athletes altogether, so the two exports of the issue are identical', async () => {
    // Three juniors moved to a category of their own: every cell of it holds fewer than k athletes.
    const moved = t.ctx.sqlite
      .prepare(
        "select a.id from athletes a join federations f on f.id = a.federation_id where f.slug = 'kestrel-coast' and a.category = 'junior' order by a.id limit 3",
      )
      .all() as { id: number }[];
    const ids = moved.map((m) => m.id).join(',');
    t.ctx.sqlite.prepare(`update athletes set category = 'masters' where id in (${ids})`).run();
    const fed = t.ctx.sqlite.prepare("select id from federations where slug = 'kestrel-coast'").get() as { id: number };
    bumpDataVersion(t.ctx, fed.id);
    try {
      const scope = {
        seasons: ['2023-24'],
        eventLevels: ['national', 'championship'],
        categories: ['men', 'women'],
        kinds: ['review'] as Kind[],
      };
      const body = (categories: string[]): ExportRequest => ({
        scope: { ...scope, categories },
        fields: ['athlete', 'category'],
        dateMode: 'month',
      });
      const without = (
        await lead
          .post(exportsBase)
          .send(body(['men', 'women']))
          .expect(201)
      ).body as ExportView;
      const withMasters = (
        await lead
          .post(exportsBase)
          .send(body(['masters', 'men', 'women']))
          .expect(201)
      ).body as ExportView;
      expect(withMasters.counts.athletes).toBe(without.counts.athletes);
      expect(withMasters.counts.rows).toBe(without.counts.rows);
      // And the dashboards: a researcher asking for the category gets nothing.
      expect((await researcher.get(`${analytics}/overview?category=masters`)).body.counts.assessments).toBe(0);
    } finally {
      t.ctx.sqlite.prepare(`update athletes set category = 'junior' where id in (${ids})`).run();
      bumpDataVersion(t.ctx, fed.id);
    }
  });

  it('refuses the same export after one assessment was added (the difference would be that one athlete)', async () => {
    const full: ExportRequest = {
      scope: {
        seasons: ['2022-23', '2023-24', '2024-25', '2025-26'],
        eventLevels: ['national', 'championship'],
        categories: ['men', 'women', 'junior'],
        kinds: ['first', 'review', 'protest'],
      },
      fields: ['athlete', 'kind', 'season'],
      dateMode: 'month',
    };
    await researcher.post(exportsBase).send(full).expect(201);
    const fed = t.ctx.sqlite.prepare("select id from federations where slug = 'kestrel-coast'").get() as { id: number };
    const athlete = t.ctx.sqlite.prepare("select id from athletes where federation_id = ? and category = 'men' limit 1").get(fed.id) as {
      id: number;
    };
    const event = t.ctx.sqlite.prepare("select id from events where federation_id = ? and level = 'national' limit 1").get(fed.id) as {
      id: number;
    };
    const cs = t.ctx.sqlite.prepare("select id from classifiers where federation_id = ? and code in ('C01', 'C02')").all(fed.id) as {
      id: number;
    }[];
    const id = Number(
      t.ctx.sqlite
        .prepare(
          "insert into assessments (federation_id, external_id, athlete_id, event_id, assessed_on, kind, panel_class) values (?, 'KE-DIFF1', ?, ?, '2024-11-20', 'review', 5)",
        )
        .run(fed.id, athlete.id, event.id).lastInsertRowid,
    );
    for (const c of cs)
      t.ctx.sqlite.prepare('insert into ratings (assessment_id, classifier_id, sport_class) values (?, ?, 5)').run(id, c.id);
    bumpDataVersion(t.ctx, fed.id);
    try {
      const again = await researcher.post(exportsBase).send(full).expect(422);
      expect(again.body.error.message).toMatch(/by 1 athlete only, fewer than k = 5/);
    } finally {
      t.ctx.sqlite.prepare('delete from ratings where assessment_id = ?').run(id);
      t.ctx.sqlite.prepare('delete from assessments where id = ?').run(id);
      bumpDataVersion(t.ctx, fed.id);
    }
    // Back as it was: the same export is allowed again.
    await researcher.post(exportsBase).send(full).expect(201);
  });

  it('gives researchers and read tokens no exact date: the summary in months, and no assessment or event date in any response', async () => {
    const summary = await researcher.get('/api/federations/kestrel-coast/summary').expect(200);
    expect(summary.body.firstAssessment).toMatch(/^\d{4}-\d{2}$/);
    expect(summary.body.lastAssessment).toMatch(/^\d{4}-\d{2}$/);
    const { rows, allowed } = assessments(t);
    expect(summary.body.counts.assessments).toBe(rows.filter(allowed).length);
    const token = await asToken('/api/federations/kestrel-coast/summary').expect(200);
    expect(token.body.firstAssessment).toMatch(/^\d{4}-\d{2}$/);
    const forLead = await lead.get('/api/federations/kestrel-coast/summary').expect(200);
    expect(forLead.body.firstAssessment).toMatch(/^\d{4}-\d{2}-\d{2}$/);

    const dates = new Set<string>();
    for (const r of t.ctx.sqlite
      .prepare('select assessed_on as d from assessments union select starts_on from events union select ends_on from events')
      .all() as { d: string | null }[]) {
      if (r.d) dates.add(r.d);
    }
    expect(dates.size).toBeGreaterThan(20);
    const routes = [...foundationEntries, ...dashboardEntries, ...exportEntries].filter(
      (e) => e.method === 'get' && e.expect.researcher === 200,
    );
    expect(routes.length).toBeGreaterThanOrEqual(7);
    for (const entry of routes) {
      const path = entry.path.replace(':federation', 'kestrel-coast').replace(/:(\w+)/g, (_, name: string) => entry.params?.[name] ?? '');
      for (const get of [(p: string) => researcher.get(p), asToken]) {
        const res = await get(path);
        if (res.status !== 200) continue; // read tokens may not call every route
        const body = res.body as { seasons?: { from?: string; to?: string }[] };
        // The season bounds of the filter options are the calendar (1 July – 30 June), the same for every federation.
        if (entry.path.endsWith('/analytics/filters')) {
          for (const s of body.seasons ?? []) {
            delete s.from;
            delete s.to;
          }
        }
        const text = JSON.stringify(body);
        const leaked = [...dates].filter((d) => text.includes(d));
        expect(leaked, `${entry.path}`).toEqual([]);
      }
    }
  });
});

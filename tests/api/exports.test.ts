/**
 * Anonymised research exports on the demo data: no identity in the bytes of any file, the CSV
 * reads back with papaparse in the dictionary's types, agreement statistics recomputed from the
 * export (agreement engine: buildRatingSet + analyzeRatings) equal those computed from the
 * database for the same scope, small-cell suppression, studies, re-download and expiry, audit,
 * and the role × route entries of tests/api/access/exports.ts.
 */
import Papa from 'papaparse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeRatings, buildRatingSet, type AgreementReport, type RatingRow } from '../../server/analysis';
import { hashPassword } from '../../server/auth/password';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { parseSportClass, DEFAULT_SCALE } from '../../shared/scale';
import type { ExportRequest, ExportView } from '../../shared/schemas/exports';
import { entries } from './access/exports';
import type { Caller } from './access/types';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';

const base = '/api/federations/kestrel-coast/exports';
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

const ALL_SEASONS = ['2022-23', '2023-24', '2024-25', '2025-26'];
const FULL: ExportRequest = {
  scope: { seasons: ALL_SEASONS, eventLevels: ['national', 'championship'], categories: ['men', 'women', 'junior'], kinds: ['first', 'review', 'protest'] },
  fields: ['athlete', 'panel_class', 'kind', 'season', 'event', 'event_level', 'category', 'date'],
  dateMode: 'month',
};

interface Dictionary {
  columns: { name: string; type: 'string' | 'integer' | 'number' | 'month'; nullable: boolean; values?: string[]; pattern?: string }[];
  suppression: { k: number; counts: { categoryAthletes: number; categoryRows: number; combinationAssessments: number; combinationRows: number } };
  counts: { rows: number };
  cautions: string[];
  howToCite: string;
}

type Value = string | number | null;

/** Reads the CSV with papaparse (no guessing of types) and casts each cell by the dictionary's column type. */
function readCsv(csv: string, dictionary: Dictionary): Record<string, Value>[] {
  const parsed = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true });
  expect(parsed.errors).toEqual([]);
  expect(parsed.meta.fields).toEqual(dictionary.columns.map((c) => c.name));
  return parsed.data.map((raw) => {
    const row: Record<string, Value> = {};
    for (const column of dictionary.columns) {
      const text = raw[column.name]!;
      if (text === '') {
        expect(column.nullable, `${column.name} is empty but not nullable`).toBe(true);
        row[column.name] = null;
        continue;
      }
      if (column.pattern) expect(text).toMatch(new RegExp(column.pattern));
      if (column.values) expect(column.values).toContain(column.type === 'number' ? Number(text).toFixed(1) : text);
      if (column.type === 'number') {
        expect(text).toMatch(/^\d+\.\d$/);
        row[column.name] = Number(text);
      } else if (column.type === 'integer') {
        expect(text).toMatch(/^\d+$/);
        row[column.name] = Number(text);
      } else if (column.type === 'month') {
        expect(text).toMatch(/^\d{4}-(0[1-9]|1[0-2])$/);
        row[column.name] = text;
      } else row[column.name] = text;
    }
    return row;
  });
}

/** The engine's rows from exported rows: pseudonyms as codes; blank (suppressed) events and dates get placeholders. */
function engineRows(rows: Record<string, Value>[]): RatingRow[] {
  return rows.map((r) => {
    const cls = parseSportClass(String(r.sport_class), DEFAULT_SCALE);
    const panel = r.panel_class === null ? null : parseSportClass(String(r.panel_class), DEFAULT_SCALE);
    if (!cls.ok || (panel && !panel.ok)) throw new Error('class off the scale');
    return {
      assessmentId: String(r.assessment),
      athleteCode: String(r.athlete),
      eventCode: r.event === null ? 'suppressed' : String(r.event),
      assessedOn: r.assessed_month === null || r.assessed_month === undefined ? '2000-01-01' : `${r.assessed_month}-01`,
      classifierCode: String(r.classifier),
      sportClass: cls.value,
      panelClass: panel && panel.ok ? panel.value : null,
      kind: (r.kind as RatingRow['kind']) ?? null,
    };
  });
}

/** The same scope read straight from the tables (not through the export service). */
function databaseRows(t: TestApp, scope: ExportRequest['scope']): RatingRow[] {
  const rows = t.ctx.sqlite
    .prepare(
      `select a.external_id, ath.code as athlete, e.code as event, a.assessed_on, c.code as classifier, r.sport_class, a.panel_class, a.kind, ath.category, e.level
         from ratings r join assessments a on a.id = r.assessment_id join athletes ath on ath.id = a.athlete_id
         join classifiers c on c.id = r.classifier_id join events e on e.id = a.event_id join federations f on f.id = a.federation_id
        where f.slug = 'kestrel-coast' order by a.id, r.id`,
    )
    .all() as { external_id: string; athlete: string; event: string; assessed_on: string; classifier: string; sport_class: number; panel_class: number | null; kind: 'first' | 'review' | 'protest'; category: string; level: string }[];
  const season = (d: string) => {
    const y = Number(d.slice(0, 4));
    const s = Number(d.slice(5, 7)) >= 7 ? y : y - 1;
    return `${s}-${String(s + 1).slice(2)}`;
  };
  return rows
    .filter((r) => scope.seasons.includes(season(r.assessed_on)) && scope.kinds.includes(r.kind) && scope.categories.includes(r.category) && scope.eventLevels.includes(r.level))
    .map((r) => ({
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

/** The agreement statistics of a report (not the labels of classifiers, which are pseudonyms in one and codes in the other). */
function statistics(report: AgreementReport) {
  return {
    counts: { ...report.counts, events: undefined },
    exactAgreement: report.exactAgreement,
    withinHalfClassAgreement: report.withinHalfClassAgreement,
    fleissKappa: report.fleissKappa,
    fleissKappaByClass: report.fleissKappaByClass,
    krippendorffAlpha: report.krippendorffAlpha,
    gwet: report.gwet,
    boundaries: report.boundaries,
    pairs: report.pairs.map(({ a: _a, b: _b, ...rest }) => rest).sort((x, y) => JSON.stringify(x).localeCompare(JSON.stringify(y))),
    classifiers: report.classifiers.map(({ code: _c, ...rest }) => rest).sort((x, y) => JSON.stringify(x).localeCompare(JSON.stringify(y))),
  };
}

/** Deep equality with numbers compared to 10 decimals (sums run in another order). */
function expectClose(actual: unknown, expected: unknown, path = ''): void {
  if (typeof expected === 'number' && typeof actual === 'number') {
    if (Number.isNaN(expected)) expect(Number.isNaN(actual), path).toBe(true);
    else expect(actual, path).toBeCloseTo(expected, 10);
  } else if (expected !== null && typeof expected === 'object') {
    expect(typeof actual, path).toBe('object');
    const keys = new Set([...Object.keys(expected as object), ...Object.keys((actual ?? {}) as object)]);
    for (const key of keys) expectClose((actual as Record<string, unknown>)[key], (expected as Record<string, unknown>)[key], `${path}.${key}`);
  } else expect(actual, path).toEqual(expected);
}

async function download(agent: Agent, view: ExportView, file: 'csv' | 'json' | 'dictionary'): Promise<string> {
  const response = await agent.get(`/api${view.files[file]}`).buffer(true).parse((res, cb) => {
    let text = '';
    res.setEncoding('utf8');
    res.on('data', (chunk: string) => (text += chunk));
    res.on('end', () => cb(null, text));
  });
  expect(response.status).toBe(200);
  return response.body as string;
}

describe('research exports', () => {
  let t: TestApp;
  let lead: Agent;
  let researcher: Agent;
  let classifier: Agent;

  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
    lead = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    researcher = await signedInAgent(t.app, 'researcher@demo.panelwise.test');
    classifier = await signedInAgent(t.app, 'classifier@demo.panelwise.test');
  });
  afterAll(() => t.close());

  it('offers researchers seasons, levels, categories and kinds, but no individual event', async () => {
    const res = await researcher.get(`${base}/options`).expect(200);
    expect(res.body.seasons).toEqual(ALL_SEASONS);
    expect(res.body.eventLevels).toEqual(['championship', 'national']);
    expect(res.body.categories).toEqual(['junior', 'men', 'women']);
    expect(res.body.events).toEqual([]);
    expect(res.body.minAthletes).toBe(5);
    expect(JSON.stringify(res.body)).not.toMatch(/S\d{4}-|League round|Coastal Cup|championship \d/);
    const forLead = await lead.get(`${base}/options`).expect(200);
    expect(forLead.body.events.length).toBe(24);
  });

  it('writes no identity into any file: a raw substring scan for every code, name, assessment id and exact date finds none', async () => {
    // Pseudonyms are a prefix and 16 lowercase consonants (server/exports/pseudonyms.ts): no digit, no
    // capital, no vowel, so they can never contain a code (C01, A0001, S2223-R1, KE-00001), a date or a
    // name. The scan is case-sensitive because the dictionary carries SHA-256 digests in lowercase hex,
    // in which a lowercase "c01" could occur; every code in the database is written in capitals.
    const needles = new Set<string>();
    const all = (q: string) => t.ctx.sqlite.prepare(q).all() as Record<string, string | null>[];
    for (const r of all('select code, display_name from athletes')) [r.code, r.display_name].forEach((v) => v && needles.add(v));
    for (const r of all('select code, display_name from classifiers')) [r.code, r.display_name].forEach((v) => v && needles.add(v));
    for (const r of all('select code, name, starts_on, ends_on from events')) [r.code, r.name, r.starts_on, r.ends_on].forEach((v) => v && needles.add(v));
    for (const r of all('select external_id, assessed_on from assessments')) [r.external_id, r.assessed_on].forEach((v) => v && needles.add(v));
    for (const table of ['athletes', 'classifiers', 'events', 'assessments', 'imports', 'users']) {
      for (const r of all(`select distinct substr(created_at, 1, 10) as d from ${table}`)) if (r.d) needles.add(r.d);
    }
    expect(needles.size).toBeGreaterThan(2000);
    // The scan itself works: a leaky line is caught.
    const leaky = 'KE-00001,A0001,C05,2022-10-08';
    expect([...needles].filter((needle) => leaky.includes(needle)).length).toBeGreaterThanOrEqual(4);

    for (const dateMode of ['month', 'offset'] as const) {
      const created = await researcher.post(base).send({ ...FULL, dateMode }).expect(201);
      const view = created.body as ExportView;
      const bytes = [await download(researcher, view, 'csv'), await download(researcher, view, 'json'), await download(researcher, view, 'dictionary')].join('\n');
      expect(bytes.length).toBeGreaterThan(100_000);
      const found = [...needles].filter((needle) => bytes.includes(needle));
      expect(found, `identities found in the ${dateMode} export`).toEqual([]);
      // Nor anything shaped like a code or an exact date.
      expect(bytes).not.toMatch(/\b[ACS]\d{2,4}\b|\bKE-\d{5}\b|\d{4}-\d{2}-\d{2}/);
    }
  });

  it('reads back with papaparse in the dictionary’s types; the JSON holds the same rows; statistics recomputed from the export equal the database’s', async () => {
    const view = (await researcher.post(base).send(FULL).expect(201)).body as ExportView;
    const csv = await download(researcher, view, 'csv');
    const dictionary = JSON.parse(await download(researcher, view, 'dictionary')) as Dictionary;
    const json = JSON.parse(await download(researcher, view, 'json')) as { rows: Record<string, Value>[]; columns: string[] };
    expect(csv.charCodeAt(0)).not.toBe(0xfeff);
    expect(Buffer.from(csv, 'utf8').toString('utf8')).toBe(csv);
    const rows = readCsv(csv, dictionary);
    expect(rows.length).toBe(view.counts.rows);
    expect(dictionary.counts.rows).toBe(rows.length);
    // No category in the demo is below k, so the JSON and the CSV agree cell for cell.
    expect(json.columns).toEqual(dictionary.columns.map((c) => c.name));
    expect(json.rows).toEqual(rows);
    expect(dictionary.cautions.join(' ')).toMatch(/consistency|consistently/);
    expect(dictionary.cautions.join(' ')).toMatch(/licensed classifiers/);
    expect(dictionary.howToCite).toMatch(/research export \d+/);

    const fromDatabase = databaseRows(t, FULL.scope);
    expect(rows.length).toBe(fromDatabase.length);
    const exported = analyzeRatings(buildRatingSet(engineRows(rows), DEFAULT_SCALE));
    const direct = analyzeRatings(buildRatingSet(fromDatabase, DEFAULT_SCALE));
    expect(exported.counts.assessments).toBe(direct.counts.assessments);
    expect(exported.counts.athletes).toBe(direct.counts.athletes);
    expect(exported.counts.classifiers).toBe(20);
    expectClose(statistics(exported), statistics(direct));
    expect(direct.fleissKappa.value).not.toBeNull();
  });

  it('recomputes the same statistics on a narrower scope (one season, reviews, women)', async () => {
    const scope = { seasons: ['2024-25'], eventLevels: ['national'], categories: ['women'], kinds: ['review' as const] };
    const view = (await researcher.post(base).send({ ...FULL, scope }).expect(201)).body as ExportView;
    const dictionary = JSON.parse(await download(researcher, view, 'dictionary')) as Dictionary;
    const rows = readCsv(await download(researcher, view, 'csv'), dictionary);
    const direct = analyzeRatings(buildRatingSet(databaseRows(t, scope), DEFAULT_SCALE));
    const exported = analyzeRatings(buildRatingSet(engineRows(rows), DEFAULT_SCALE));
    expect(rows.length).toBeGreaterThan(100);
    expectClose(statistics(exported), statistics(direct));
  });

  it('suppresses a category held by fewer than k athletes by blanking it, keeps every row, and counts it in the dictionary', async () => {
    const small = t.ctx.sqlite.prepare("select a.id from athletes a join federations f on f.id = a.federation_id where f.slug = 'kestrel-coast' and a.category = 'junior' order by a.id limit 3").all() as { id: number }[];
    t.ctx.sqlite.prepare(`update athletes set category = 'masters' where id in (${small.map((s) => s.id).join(',')})`).run();
    try {
      const scope = { ...FULL.scope, categories: ['men', 'women', 'junior', 'masters'] };
      const view = (await researcher.post(base).send({ ...FULL, scope }).expect(201)).body as ExportView;
      const dictionary = JSON.parse(await download(researcher, view, 'dictionary')) as Dictionary;
      const rows = readCsv(await download(researcher, view, 'csv'), dictionary);
      const fromDatabase = databaseRows(t, scope);
      const mastersRows = t.ctx.sqlite
        .prepare(`select count(*) as n from ratings r join assessments a on a.id = r.assessment_id where a.athlete_id in (${small.map((s) => s.id).join(',')})`)
        .get() as { n: number };
      expect(mastersRows.n).toBeGreaterThan(0);
      expect(rows.length).toBe(fromDatabase.length); // no row dropped
      expect(rows.some((r) => r.category === 'masters')).toBe(false);
      expect(rows.filter((r) => r.category === null).length).toBe(mastersRows.n);
      expect(dictionary.suppression.k).toBe(5);
      expect(dictionary.suppression.counts.categoryAthletes).toBe(3);
      expect(dictionary.suppression.counts.categoryRows).toBe(mastersRows.n);
      expect(view.counts.suppressed.categoryAthletes).toBe(3);

      // Every combination still written is held by at least k athletes; blanked ones are counted.
      const cells = new Map<string, Set<Value>>();
      let blankedRows = 0;
      for (const r of rows) {
        if (r.kind === null) {
          blankedRows++;
          expect([r.season, r.event, r.event_level, r.assessed_month]).toEqual([null, null, null, null]);
          continue;
        }
        const key = JSON.stringify([r.category, r.season, r.event, r.event_level, r.kind, r.assessed_month]);
        if (!cells.has(key)) cells.set(key, new Set());
        cells.get(key)!.add(r.athlete);
      }
      for (const [key, athletes] of cells) expect(athletes.size, key).toBeGreaterThanOrEqual(5);
      expect(blankedRows).toBe(dictionary.suppression.counts.combinationRows);
      expect(blankedRows).toBeGreaterThan(0);

      // Still recomputable: the statistics equal the database's for the same scope.
      expectClose(statistics(analyzeRatings(buildRatingSet(engineRows(rows), DEFAULT_SCALE))), statistics(analyzeRatings(buildRatingSet(fromDatabase, DEFAULT_SCALE))));
    } finally {
      t.ctx.sqlite.prepare(`update athletes set category = 'junior' where id in (${small.map((s) => s.id).join(',')})`).run();
    }
  });

  it('gives unlinkable pseudonyms to two exports, and the same pseudonyms to two exports of one study', async () => {
    const pseudonymsOf = async (agent: Agent, body: ExportRequest) => {
      const view = (await agent.post(base).send(body).expect(201)).body as ExportView;
      const json = JSON.parse(await download(agent, view, 'json')) as { rows: Record<string, Value>[] };
      return new Set(json.rows.flatMap((r) => [r.assessment, r.athlete, r.classifier, r.event].filter((v): v is string => typeof v === 'string')));
    };
    const narrow: ExportRequest = { ...FULL, scope: { ...FULL.scope, seasons: ['2023-24'] } };
    const first = await pseudonymsOf(researcher, narrow);
    const second = await pseudonymsOf(researcher, narrow);
    expect(first.size).toBeGreaterThan(100);
    expect([...first].filter((p) => second.has(p))).toEqual([]);

    const study = await lead.post(`${base}/studies`).send({ name: 'Boundary 2.5/3.0 study', purpose: 'Consistency at the 2.5/3.0 boundary' }).expect(201);
    const inStudy = { ...narrow, studyId: study.body.id as number };
    const a = await pseudonymsOf(researcher, inStudy);
    const b = await pseudonymsOf(lead, inStudy);
    expect([...a].sort()).toEqual([...b].sort());
    expect([...a].filter((p) => first.has(p))).toEqual([]);

    await researcher.post(`${base}/studies`).send({ name: 'Own study' }).expect(403);
    await lead.post(`${base}/studies`).send({ name: 'Boundary 2.5/3.0 study' }).expect(409);
    await lead.post(`${base}/studies/${study.body.id}/close`).expect(200);
    const closed = await researcher.post(base).send(inStudy).expect(409);
    expect(closed.body.error.code).toBe('conflict');
    const options = await researcher.get(`${base}/options`).expect(200);
    expect(options.body.studies).toEqual([]);
  });

  it('lets only the maker download again, for seven days, then answers 410 Gone; records creation and downloads in the audit log', async () => {
    const view = (await researcher.post(base).send(FULL).expect(201)).body as ExportView;
    expect(Date.parse(view.expiresAt) - Date.parse(view.createdAt)).toBe(7 * 86_400_000);
    const again = await download(researcher, view, 'csv');
    expect(again).toBe(await download(researcher, view, 'csv'));
    const head = await researcher.get(`/api${view.files.csv}`).expect(200);
    expect(head.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(head.headers['content-disposition']).toBe(`attachment; filename="research-export-${view.id}.csv"`);
    const other = await lead.get(`/api${view.files.csv}`).expect(404);
    expect(other.body.error.code).toBe('not_found');
    await classifier.get(`/api${view.files.csv}`).expect(403);

    const mine = await researcher.get(base).expect(200);
    expect((mine.body as ExportView[]).map((e) => e.id)).toContain(view.id);
    expect(((await lead.get(base).expect(200)).body as ExportView[]).map((e) => e.id)).not.toContain(view.id);

    const audit = t.ctx.sqlite.prepare("select user_id, action, detail from audit_log where entity = 'research_export' and entity_id = ? order by id").all(String(view.id)) as {
      user_id: number;
      action: string;
      detail: string;
    }[];
    expect(audit[0]!.action).toBe('export.create');
    expect(JSON.parse(audit[0]!.detail)).toMatchObject({ scope: FULL.scope, rows: view.counts.rows });
    expect(audit.filter((a) => a.action === 'export.download').length).toBe(3);

    t.ctx.sqlite.prepare("update research_exports set expires_at = '2000-01-01T00:00:00.000Z' where id = ?").run(view.id);
    const gone = await researcher.get(`/api${view.files.json}`).expect(410);
    expect(gone.body).toEqual({ error: { code: 'gone', message: expect.stringMatching(/7 days/) } });
    const stored = t.ctx.sqlite.prepare('select csv, json, dictionary, counts from research_exports where id = ?').get(view.id) as Record<string, string | null>;
    expect([stored.csv, stored.json, stored.dictionary]).toEqual([null, null, null]);
    expect(JSON.parse(stored.counts!).rows).toBe(view.counts.rows);
    const listed = ((await researcher.get(base).expect(200)).body as ExportView[]).find((e) => e.id === view.id)!;
    expect(listed.expired).toBe(true);
    expect(listed.files).toEqual({});
  });

  it('keeps settings and individual events to leads, refuses a scope below k, and names the field of a bad request', async () => {
    await researcher.get(`${base}/settings`).expect(403);
    await researcher.put(`${base}/settings`).send({ minAthletes: 10 }).expect(403);
    const events = (await lead.get(`${base}/options`).expect(200)).body.events as { id: number }[];
    const refused = await researcher.post(base).send({ ...FULL, scope: { ...FULL.scope, eventIds: [events[0]!.id] } }).expect(403);
    expect(refused.body.error.details[0].path).toBe('scope.eventIds');
    const leadEvent = (await lead.post(base).send({ ...FULL, scope: { ...FULL.scope, eventIds: [events[0]!.id] } }).expect(201)).body as ExportView;
    expect(leadEvent.counts.rows).toBeGreaterThan(0);
    const dictionary = await download(lead, leadEvent, 'dictionary');
    expect(dictionary).toMatch(/"individualEventsChosen": 1/);

    const bad = await researcher.post(base).send({ ...FULL, scope: { ...FULL.scope, seasons: ['2023'] } }).expect(400);
    expect(bad.body.error.details[0]).toMatchObject({ path: 'scope.seasons.0' });

    await lead.put(`${base}/settings`).send({ minAthletes: 500 }).expect(400);
    expect((await lead.put(`${base}/settings`).send({ minAthletes: 40 }).expect(200)).body.minAthletes).toBe(40);
    try {
      const tooSmall = await researcher
        .post(base)
        .send({ ...FULL, scope: { ...FULL.scope, seasons: ['2025-26'], kinds: ['protest'] } })
        .expect(422);
      expect(tooSmall.body.error.message).toMatch(/fewer than k = 40/);
      expect((await researcher.get(`${base}/options`).expect(200)).body.minAthletes).toBe(40);
    } finally {
      await lead.put(`${base}/settings`).send({ minAthletes: 5 }).expect(200);
    }
    await classifier.post(base).send(FULL).expect(403);
  });

  it('answers every caller of every route as tests/api/access/exports.ts says (session callers)', async () => {
    // An outsider: the lead of the second federation only.
    const outsiderEmail = 'outsider-exports@demo.panelwise.test';
    const user = await t.ctx.db
      .insertInto('users')
      .values({ email: outsiderEmail, display_name: 'Outsider', password_hash: await hashPassword(DEMO_PASSWORD) })
      .returning('id')
      .executeTakeFirstOrThrow();
    const second = await t.ctx.db.selectFrom('federations').select('id').where('slug', '=', 'harbour-cities').executeTakeFirstOrThrow();
    await t.ctx.db.insertInto('memberships').values({ user_id: user.id, federation_id: second.id, role: 'lead' }).execute();
    const agents: Partial<Record<Caller, Agent | ReturnType<typeof request.agent>>> = {
      anonymous: request.agent(t.app),
      lead,
      classifier,
      researcher,
      outsider: await signedInAgent(t.app, outsiderEmail),
    };
    for (const entry of entries) {
      const params: Record<string, string> = { federation: 'kestrel-coast', ...entry.params };
      const path = entry.path.replace(/:(\w+)/g, (_, name: string) => params[name]!);
      for (const [caller, agent] of Object.entries(agents)) {
        const req = agent![entry.method](path);
        const res = entry.body === undefined ? await req : await req.send(entry.body as object);
        expect(res.status, `${caller} ${entry.method.toUpperCase()} ${entry.path}`).toBe(entry.expect[caller as Caller]);
        if (res.status >= 400) expect(res.body.error.code).toEqual(expect.any(String));
      }
    }
  });
});

/**
 * Anonymised research exports on the demo data: no identity in the bytes of any file, the CSV
 * reads back with papaparse in the dictionary's types, agreement statistics recomputed from the
 * export (agreement engine: buildRatingSet + analyzeRatings) equal those computed from the
 * database for the same scope, small-cell suppression, studies, re-download and expiry, audit,
 * and the role × route entries of tests/api/access/exports.ts.
 */
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import Papa from 'papaparse';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeRatings, buildRatingSet, type AgreementReport, type RatingRow } from '../../server/analysis';
import { hashPassword } from '../../server/auth/password';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { parseSportClass, DEFAULT_SCALE } from '../../shared/scale';
import type { ExportRequest, ExportView } from '../../shared/schemas/exports';
import { removeExpiredExports, exportsDirectory } from '../../server/exports/storage';
import { entries } from './access/exports';
import type { Caller } from './access/types';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';

const base = '/api/federations/kestrel-coast/exports';
type Agent = Awaited<ReturnType<typeof signedInAgent>>;

const ALL_SEASONS = ['2022-23', '2023-24', '2024-25', '2025-26'];
const FULL: ExportRequest = {
  scope: {
    seasons: ALL_SEASONS,
    eventLevels: ['national', 'championship'],
    categories: ['men', 'women', 'junior'],
    kinds: ['first', 'review', 'protest'],
  },
  fields: ['athlete', 'panel_class', 'kind', 'season', 'event', 'event_level', 'category', 'date'],
  dateMode: 'month',
};

interface Dictionary {
  columns: { name: string; type: 'string' | 'integer' | 'number' | 'month'; nullable: boolean; values?: string[]; pattern?: string }[];
  suppression: {
    k: number;
    counts: { categoryAthletes: number; categoryRows: number; combinationAssessments: number; combinationRows: number };
  };
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
      const text = raw[column.name];
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

/** Calendar quarter of an ISO date, written 2024-Q3 (written out here, not taken from the server). */
const quarterOf = (d: string) => `${d.slice(0, 4)}-Q${Math.ceil(Number(d.slice(5, 7)) / 3)}`;

/**
 * The same scope read straight from the tables (not through the export service), without the
 * assessments of cells (quarter × kind × category, over the whole federation) held by fewer than
 * k athletes: docs/decisions/0007-research-export.md.
 */
function databaseRows(t: TestApp, scope: ExportRequest['scope'], k = 5): RatingRow[] {
  const rows = t.ctx.sqlite
    .prepare(
      `select a.external_id, ath.code as athlete, e.code as event, a.assessed_on, c.code as classifier, r.sport_class, a.panel_class, a.kind, ath.category, e.level
         from ratings r join assessments a on a.id = r.assessment_id join athletes ath on ath.id = a.athlete_id
         join classifiers c on c.id = r.classifier_id join events e on e.id = a.event_id join federations f on f.id = a.federation_id
        where f.slug = 'kestrel-coast' order by a.id, r.id`,
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
    category: string;
    level: string;
  }[];
  const cellOf = (r: (typeof rows)[number]) => `${quarterOf(r.assessed_on)}|${r.kind}|${r.category}`;
  const cells = new Map<string, Set<string>>();
  for (const r of rows) {
    if (!cells.has(cellOf(r))) cells.set(cellOf(r), new Set());
    cells.get(cellOf(r))!.add(r.athlete);
  }
  const season = (d: string) => {
    const y = Number(d.slice(0, 4));
    const s = Number(d.slice(5, 7)) >= 7 ? y : y - 1;
    return `${s}-${String(s + 1).slice(2)}`;
  };
  return rows
    .filter((r) => cells.get(cellOf(r))!.size >= k)
    .filter(
      (r) =>
        scope.seasons.includes(season(r.assessed_on)) &&
        scope.kinds.includes(r.kind) &&
        scope.categories.includes(r.category) &&
        scope.eventLevels.includes(r.level),
    )
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
    const keys = new Set([...Object.keys(expected), ...Object.keys(actual ?? {})]);
    for (const key of keys)
      expectClose((actual as Record<string, unknown>)[key], (expected as Record<string, unknown>)[key], `${path}.${key}`);
  } else expect(actual, path).toEqual(expected);
}

/** The gzip-compressed files of an export on disk. */
function filesOf(t: TestApp, exportId: number): string[] {
  const dir = exportsDirectory(t.ctx);
  return fs
    .readdirSync(dir)
    .filter((name) => name.startsWith(`export-${exportId}-`))
    .map((name) => path.join(dir, name));
}

async function download(agent: Agent, view: ExportView, file: 'csv' | 'json' | 'dictionary'): Promise<string> {
  const response = await agent
    .get(`/api${view.files[file]}`)
    .buffer(true)
    .parse((res, cb) => {
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
    for (const r of all('select code, name, starts_on, ends_on from events'))
      [r.code, r.name, r.starts_on, r.ends_on].forEach((v) => v && needles.add(v));
    for (const r of all('select external_id, assessed_on from assessments'))
      [r.external_id, r.assessed_on].forEach((v) => v && needles.add(v));
    for (const table of ['athletes', 'classifiers', 'events', 'assessments', 'imports', 'users']) {
      for (const r of all(`select distinct substr(created_at, 1, 10) as d from ${table}`)) if (r.d) needles.add(r.d);
    }
    expect(needles.size).toBeGreaterThan(2000);
    // The scan itself works: a leaky line is caught.
    const leaky = 'KE-00001,A0001,C05,2022-10-08';
    expect([...needles].filter((needle) => leaky.includes(needle)).length).toBeGreaterThanOrEqual(4);

    for (const dateMode of ['month', 'offset'] as const) {
      const created = await researcher
        .post(base)
        .send({ ...FULL, dateMode })
        .expect(201);
      const view = created.body as ExportView;
      const bytes = [
        await download(researcher, view, 'csv'),
        await download(researcher, view, 'json'),
        await download(researcher, view, 'dictionary'),
      ].join('\n');
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
    const view = (
      await researcher
        .post(base)
        .send({ ...FULL, scope })
        .expect(201)
    ).body as ExportView;
    const dictionary = JSON.parse(await download(researcher, view, 'dictionary')) as Dictionary;
    const rows = readCsv(await download(researcher, view, 'csv'), dictionary);
    const direct = analyzeRatings(buildRatingSet(databaseRows(t, scope), DEFAULT_SCALE));
    const exported = analyzeRatings(buildRatingSet(engineRows(rows), DEFAULT_SCALE));
    expect(rows.length).toBeGreaterThan(100);
    expectClose(statistics(exported), statistics(direct));
  });

  it('leaves out the data of a cell held by fewer than k athletes before anything else, and blanks small combinations of the rest', async () => {
    const small = t.ctx.sqlite
      .prepare(
        "select a.id from athletes a join federations f on f.id = a.federation_id where f.slug = 'kestrel-coast' and a.category = 'junior' order by a.id limit 3",
      )
      .all() as { id: number }[];
    t.ctx.sqlite.prepare(`update athletes set category = 'masters' where id in (${small.map((s) => s.id).join(',')})`).run();
    try {
      const scope = { ...FULL.scope, categories: ['men', 'women', 'junior', 'masters'] };
      // The lead exports here: the researcher's earlier exports differ from this one by the three athletes (tests/api/differencing.test.ts).
      const view = (
        await lead
          .post(base)
          .send({ ...FULL, scope })
          .expect(201)
      ).body as ExportView;
      const dictionary = JSON.parse(await download(lead, view, 'dictionary')) as Dictionary;
      const rows = readCsv(await download(lead, view, 'csv'), dictionary);
      const fromDatabase = databaseRows(t, scope);
      const mastersRows = t.ctx.sqlite
        .prepare(
          `select count(*) as n from ratings r join assessments a on a.id = r.assessment_id where a.athlete_id in (${small.map((s) => s.id).join(',')})`,
        )
        .get() as { n: number };
      expect(mastersRows.n).toBeGreaterThan(0);
      // Every cell of the three 'masters' athletes holds fewer than k = 5 athletes: their data is left out, not blanked.
      expect(rows.length).toBe(fromDatabase.length);
      expect(fromDatabase.length).toBeLessThan(databaseRows(t, scope, 1).length - mastersRows.n + 1);
      expect(rows.some((r) => r.category === 'masters')).toBe(false);
      expect(dictionary.suppression.k).toBe(5);
      expect(dictionary.suppression.counts.categoryAthletes).toBe(0);
      expect(view.counts.athletes).toBe(new Set(fromDatabase.map((r) => r.athleteCode)).size);

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
      expectClose(
        statistics(analyzeRatings(buildRatingSet(engineRows(rows), DEFAULT_SCALE))),
        statistics(analyzeRatings(buildRatingSet(fromDatabase, DEFAULT_SCALE))),
      );
    } finally {
      t.ctx.sqlite.prepare(`update athletes set category = 'junior' where id in (${small.map((s) => s.id).join(',')})`).run();
    }
  });

  it('gives unlinkable pseudonyms to two exports, and the same pseudonyms to two exports of one study', async () => {
    const pseudonymsOf = async (agent: Agent, body: ExportRequest) => {
      const view = (await agent.post(base).send(body).expect(201)).body as ExportView;
      const json = JSON.parse(await download(agent, view, 'json')) as { rows: Record<string, Value>[] };
      return new Set(
        json.rows.flatMap((r) => [r.assessment, r.athlete, r.classifier, r.event].filter((v): v is string => typeof v === 'string')),
      );
    };
    const narrow: ExportRequest = { ...FULL, scope: { ...FULL.scope, seasons: ['2023-24'] } };
    const first = await pseudonymsOf(researcher, narrow);
    const second = await pseudonymsOf(researcher, narrow);
    expect(first.size).toBeGreaterThan(100);
    expect([...first].filter((p) => second.has(p))).toEqual([]);

    const study = await lead
      .post(`${base}/studies`)
      .send({ name: 'Boundary 2.5/3.0 study', purpose: 'Consistency at the 2.5/3.0 boundary' })
      .expect(201);
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

    const audit = t.ctx.sqlite
      .prepare("select user_id, action, detail from audit_log where entity = 'research_export' and entity_id = ? order by id")
      .all(String(view.id)) as {
      user_id: number;
      action: string;
      detail: string;
    }[];
    expect(audit[0].action).toBe('export.create');
    expect(JSON.parse(audit[0].detail)).toMatchObject({ scope: FULL.scope, rows: view.counts.rows });
    expect(audit.filter((a) => a.action === 'export.download').length).toBe(3);

    const files = filesOf(t, view.id);
    expect(files.length).toBe(3);
    t.ctx.sqlite.prepare("update research_exports set expires_at = '2000-01-01T00:00:00.000Z' where id = ?").run(view.id);
    const gone = await researcher.get(`/api${view.files.json}`).expect(410);
    expect(gone.body).toEqual({ error: { code: 'gone', message: expect.stringMatching(/7 days/) } });
    const stored = t.ctx.sqlite
      .prepare('select storage_key, stored_bytes, removed_at, counts from research_exports where id = ?')
      .get(view.id) as Record<string, string | null>;
    expect([stored.storage_key, stored.stored_bytes]).toEqual([null, 0]);
    expect(stored.removed_at).not.toBeNull();
    expect(JSON.parse(stored.counts!).rows).toBe(view.counts.rows);
    for (const file of files) expect(fs.existsSync(file)).toBe(false);
    const listed = ((await researcher.get(base).expect(200)).body as ExportView[]).find((e) => e.id === view.id)!;
    expect(listed.expired).toBe(true);
    expect(listed.files).toEqual({});
  });

  it('keeps settings and individual events to leads, refuses a scope below k, and names the field of a bad request', async () => {
    await researcher.get(`${base}/settings`).expect(403);
    await researcher.put(`${base}/settings`).send({ minAthletes: 10 }).expect(403);
    const events = (await lead.get(`${base}/options`).expect(200)).body.events as { id: number }[];
    const refused = await researcher
      .post(base)
      .send({ ...FULL, scope: { ...FULL.scope, eventIds: [events[0].id] } })
      .expect(403);
    expect(refused.body.error.details[0].path).toBe('scope.eventIds');
    const leadEvent = (
      await lead
        .post(base)
        .send({ ...FULL, scope: { ...FULL.scope, eventIds: [events[0].id] } })
        .expect(201)
    ).body as ExportView;
    expect(leadEvent.counts.rows).toBeGreaterThan(0);
    const dictionary = await download(lead, leadEvent, 'dictionary');
    expect(dictionary).toMatch(/"individualEventsChosen": 1/);

    const bad = await researcher
      .post(base)
      .send({ ...FULL, scope: { ...FULL.scope, seasons: ['2023'] } })
      .expect(400);
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

  it('keeps each export as three gzip-compressed files beside the database, and streams them back unchanged', async () => {
    const view = (
      await researcher
        .post(base)
        .send({ ...FULL, scope: { ...FULL.scope, seasons: ['2024-25'] } })
        .expect(201)
    ).body as ExportView;
    const files = filesOf(t, view.id);
    expect(files.map((f) => path.basename(f).replace(/-[0-9a-f]{24}-/, '-KEY-')).sort()).toEqual([
      `export-${view.id}-KEY-csv.gz`,
      `export-${view.id}-KEY-dictionary.gz`,
      `export-${view.id}-KEY-json.gz`,
    ]);
    // Nothing of the files is left in the database.
    const columns = (t.ctx.sqlite.prepare('pragma table_info(research_exports)').all() as { name: string }[]).map((c) => c.name);
    expect(columns).not.toContain('csv');
    const onDisk = files.reduce((sum, f) => sum + fs.statSync(f).size, 0);
    expect(view.storedBytes).toBe(onDisk);
    for (const file of ['csv', 'json', 'dictionary'] as const) {
      const gzipped = fs.readFileSync(files.find((f) => f.endsWith(`-${file}.gz`))!);
      const text = zlib.gunzipSync(gzipped).toString('utf8');
      // Downloaded (supertest asks for gzip and unpacks it) equals the file unpacked.
      expect(await download(researcher, view, file)).toBe(text);
      if (file !== 'dictionary') expect(gzipped.length).toBeLessThan(text.length / 4);
    }
    const gz = await researcher.get(`/api${view.files.csv}`).set('accept-encoding', 'gzip').expect(200);
    expect(gz.headers['content-encoding']).toBe('gzip');
    const plain = await researcher
      .get(`/api${view.files.csv}`)
      .set('accept-encoding', 'identity')
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => cb(null, Buffer.concat(chunks)));
      })
      .expect(200);
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect((plain.body as Buffer).toString('utf8')).toBe(
      zlib.gunzipSync(fs.readFileSync(files.find((f) => f.endsWith('-csv.gz'))!)).toString('utf8'),
    );
  });

  it('removes the files of expired exports in the scheduled job, keeping the rows; and left-over files of an interrupted build', async () => {
    const view = (
      await researcher
        .post(base)
        .send({ ...FULL, scope: { ...FULL.scope, seasons: ['2023-24', '2024-25'] } })
        .expect(201)
    ).body as ExportView;
    const files = filesOf(t, view.id);
    expect(files.length).toBe(3);
    const orphan = path.join(exportsDirectory(t.ctx), `export-999999-${'ab'.repeat(12)}-csv.gz`);
    fs.writeFileSync(orphan, zlib.gzipSync('left over'));
    // Before expiry: nothing to remove (the left-over file is younger than an hour).
    const early = await removeExpiredExports(t.ctx, new Date());
    expect(early.orphanFiles).toBe(0);
    for (const f of files) expect(fs.existsSync(f)).toBe(true);
    // At expiry.
    const removed = await removeExpiredExports(t.ctx, new Date(Date.parse(view.expiresAt)));
    expect(removed.exports).toBeGreaterThanOrEqual(1);
    expect(removed.orphanFiles).toBe(1);
    for (const f of [...files, orphan]) expect(fs.existsSync(f)).toBe(false);
    const row = t.ctx.sqlite
      .prepare('select storage_key, stored_bytes, removed_at, counts from research_exports where id = ?')
      .get(view.id) as Record<string, string | number | null>;
    expect(row.storage_key).toBeNull();
    expect(row.stored_bytes).toBe(0);
    expect(row.removed_at).toBe(view.expiresAt);
    expect(JSON.parse(String(row.counts)).rows).toBe(view.counts.rows);
    await researcher.get(`/api${view.files.csv}`).expect(410);
    // Every export made earlier in this file expired at the same time or before: their files are gone too.
    const left = t.ctx.sqlite
      .prepare('select count(*) as n from research_exports where storage_key is not null and expires_at <= ?')
      .get(view.expiresAt) as { n: number };
    expect(left.n).toBe(0);
  });

  it('holds each researcher to the lead’s quota: exports a day and megabytes kept, with a clear message', async () => {
    const settings = (await lead.get(`${base}/settings`).expect(200)).body as { maxExportsPerDay: number; maxStoredMegabytes: number };
    expect(settings).toMatchObject({ maxExportsPerDay: 20, maxStoredMegabytes: 1000 });
    await lead.put(`${base}/settings`).send({ minAthletes: 5, maxExportsPerDay: 0 }).expect(400);
    const userId = (t.ctx.sqlite.prepare("select id from users where email = 'researcher@demo.panelwise.test'").get() as { id: number }).id;
    const narrow: ExportRequest = { ...FULL, scope: { ...FULL.scope, seasons: ['2022-23'] } };
    try {
      // Megabytes kept.
      await lead.put(`${base}/settings`).send({ minAthletes: 5, maxExportsPerDay: 1000, maxStoredMegabytes: 1 }).expect(200);
      const one = (await researcher.post(base).send(narrow).expect(201)).body as ExportView;
      expect(one.storedBytes).toBeGreaterThan(0);
      const rowsBefore = (t.ctx.sqlite.prepare('select count(*) as n from research_exports').get() as { n: number }).n;
      const dirBefore = fs.readdirSync(exportsDirectory(t.ctx)).sort();
      // Nearly at the limit: the new export's files are built, found too large, and removed again.
      t.ctx.sqlite.prepare('update research_exports set stored_bytes = ? where id = ?').run(1024 * 1024 - 10, one.id);
      const tooLarge = await researcher.post(base).send(narrow).expect(429);
      expect(tooLarge.body.error.code).toBe('rate_limited');
      expect(tooLarge.body.error.message).toMatch(
        /^This export takes [\d.]+ MB compressed; with the 1\.0 MB your exports already take, it would pass the 1 MB your federation's lead allows/,
      );
      expect(fs.readdirSync(exportsDirectory(t.ctx)).sort()).toEqual(dirBefore);
      expect((t.ctx.sqlite.prepare('select count(*) as n from research_exports').get() as { n: number }).n).toBe(rowsBefore);
      // At the limit: refused before anything is built.
      t.ctx.sqlite.prepare('update research_exports set stored_bytes = ? where id = ?').run(2 * 1024 * 1024, one.id);
      const full = await researcher.post(base).send(narrow).expect(429);
      expect(full.body.error.message).toMatch(
        /^Your exports take 2\.0 MB of the 1 MB your federation's lead allows a researcher to keep\. Files are removed 7 days after/,
      );
      t.ctx.sqlite.prepare('update research_exports set stored_bytes = ? where id = ?').run(one.storedBytes, one.id);

      // Exports in 24 hours.
      const madeToday = (
        t.ctx.sqlite
          .prepare('select count(*) as n from research_exports where user_id = ? and created_at > ?')
          .get(userId, new Date(Date.now() - 86_400_000).toISOString()) as { n: number }
      ).n;
      expect(madeToday).toBeGreaterThan(3);
      await lead.put(`${base}/settings`).send({ minAthletes: 5, maxExportsPerDay: madeToday, maxStoredMegabytes: 1000 }).expect(200);
      const perDay = await researcher.post(base).send(narrow).expect(429);
      expect(perDay.body.error.code).toBe('rate_limited');
      expect(perDay.body.error.message).toMatch(
        new RegExp(
          `^You have made ${madeToday} exports in the last 24 hours, .*\\(${madeToday} a day\\)\\. The next one is possible from \\d{2}:\\d{2} UTC`,
        ),
      );
      // Leads are not held to the researchers' quota.
      await lead.post(base).send(narrow).expect(201);
    } finally {
      await lead.put(`${base}/settings`).send({ minAthletes: 5, maxExportsPerDay: 20, maxStoredMegabytes: 1000 }).expect(200);
    }
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
    const agents: Partial<Record<Caller, Agent>> = {
      anonymous: request.agent(t.app),
      lead,
      classifier,
      researcher,
      outsider: await signedInAgent(t.app, outsiderEmail),
    };
    for (const entry of entries) {
      const params: Record<string, string> = { federation: 'kestrel-coast', ...entry.params };
      const path = entry.path.replace(/:(\w+)/g, (_, name: string) => params[name]);
      for (const [caller, agent] of Object.entries(agents)) {
        const req = agent[entry.method](path);
        const res = entry.body === undefined ? await req : await req.send(entry.body as object);
        expect(res.status, `${caller} ${entry.method.toUpperCase()} ${entry.path}`).toBe(entry.expect[caller as Caller]);
        if (res.status >= 400) expect(res.body.error.code).toEqual(expect.any(String));
      }
    }
  });
});

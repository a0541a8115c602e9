/**
 * Imports through the HTTP API: dry run, commit, idempotent re-upload, revert, layouts,
 * mappings, every refused file (naming row, column and value, and writing nothing), the batch
 * API with a lead's session and with API tokens, and progress as server-sent events.
 */
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiToken } from '../../server/services/api-tokens';
import { createTestApp, signedInAgent, tableCounts, type TestApp } from '../helpers/test-app';
import { dataCounts, FEDERATION, federationId, fixture, LEAD, settled, upload } from './imports/helpers';

let t: TestApp;
let lead: Awaited<ReturnType<typeof signedInAgent>>;
let fedId: number;

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  lead = await signedInAgent(t.app, LEAD);
  fedId = federationId(t.ctx);
});
afterAll(() => t.close());

describe('a valid long CSV', () => {
  it('dry run counts without writing, commit writes it all, the same file again changes nothing, revert restores', async () => {
    const before = await settled(t.ctx, tableCounts);
    const dry = await upload(lead, { name: 'long-valid.csv' });
    expect(dry.status).toBe(200);
    expect(dry.body.outcome).toBe('ready');
    expect(dry.body.layout).toBe('long');
    expect(dry.body.counts).toMatchObject({
      assessments: { new: 6, changed: 0, unchanged: 0 },
      ratings: { new: 14, changed: 0, unchanged: 0 },
      classifiers: { new: 0, unchanged: 10 },
      athletes: { new: 0, unchanged: 6 },
      notAnalysable: 1,
      rows: 14,
    });
    expect(dry.body.warningCount).toBe(1);
    expect(dry.body.warnings[0].message).toMatch(
      /Row 14 \(line 15\), column assessment_id: value "IMP-0006" has ratings from a single classifier/,
    );
    // The dry run staged an import; the federation's data is untouched.
    const afterDry = await settled(t.ctx, tableCounts);
    expect({ ...afterDry, imports: before.imports }).toEqual(before);
    expect(afterDry.imports).toBe(before.imports + 1);

    const version = t.ctx.dataVersions.of(fedId);
    const commit = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/commit`);
    expect(commit.status).toBe(200);
    expect(commit.body).toMatchObject({
      status: 'committed',
      source: 'csv',
      fileName: 'long-valid.csv',
      by: 'Demo Lead',
      revertable: true,
    });
    expect(t.ctx.dataVersions.of(fedId)).toBe(version + 1);
    const afterCommit = tableCounts(t.ctx);
    expect(afterCommit.assessments).toBe(before.assessments + 6);
    expect(afterCommit.ratings).toBe(before.ratings + 14);
    const row = t.ctx.sqlite
      .prepare("select kind, panel_class, event_id is not null as has_event from assessments where external_id = 'IMP-0003'")
      .get();
    expect(row).toEqual({ kind: 'review', panel_class: 9, has_event: 1 });
    // "1,5" is 1.5 (3 half points); "1" is 1.0.
    const classes = t.ctx.sqlite
      .prepare(
        "select c.code, r.sport_class from ratings r join assessments a on a.id = r.assessment_id join classifiers c on c.id = r.classifier_id where a.external_id = 'IMP-0002' order by c.code",
      )
      .all();
    expect(classes).toEqual([
      { code: 'C01', sport_class: 2 },
      { code: 'C05', sport_class: 3 },
      { code: 'C13', sport_class: 2 },
    ]);

    // Again: nothing to do, nothing written at all.
    const settledAfterCommit = await settled(t.ctx, tableCounts);
    const again = await upload(lead, { name: 'long-valid.csv' });
    expect(again.body).toMatchObject({ outcome: 'nothing-to-do', importId: null, sameFileAs: { importId: dry.body.importId } });
    expect(again.body.counts.assessments).toEqual({ new: 0, changed: 0, unchanged: 6 });
    expect(tableCounts(t.ctx)).toEqual(settledAfterCommit);

    const audit = t.ctx.sqlite
      .prepare("select action from audit_log where entity = 'import' and entity_id = ?")
      .pluck()
      .all(String(dry.body.importId));
    expect(audit).toEqual(['import.commit']);

    const revert = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/revert`);
    expect(revert.status).toBe(200);
    expect(revert.body.status).toBe('reverted');
    expect(t.ctx.dataVersions.of(fedId)).toBe(version + 2);
    const afterRevert = tableCounts(t.ctx);
    for (const table of ['assessments', 'ratings', 'classifiers', 'athletes', 'events', 'import_changes'])
      expect(afterRevert[table]).toBe(before[table]);
    expect(
      t.ctx.sqlite
        .prepare("select action from audit_log where entity = 'import' and entity_id = ? order by id")
        .pluck()
        .all(String(dry.body.importId)),
    ).toEqual(['import.commit', 'import.revert']);
    const second = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/revert`);
    expect(second.status).toBe(409);
  });

  it('an import that changes existing assessments keeps before-images; revert restores them exactly', async () => {
    const existing = t.ctx.sqlite
      .prepare(
        `select a.id, a.external_id, a.assessed_on, a.kind, a.panel_class, ath.code as athlete, e.code as event
           from assessments a join athletes ath on ath.id = a.athlete_id join events e on e.id = a.event_id
          where a.federation_id = ? order by a.id limit 1`,
      )
      .get(fedId) as {
      id: number;
      external_id: string;
      assessed_on: string;
      kind: string;
      panel_class: number;
      athlete: string;
      event: string;
    };
    const ratings = t.ctx.sqlite
      .prepare(
        'select r.id, c.code, r.sport_class from ratings r join classifiers c on c.id = r.classifier_id where r.assessment_id = ? order by r.id',
      )
      .all(existing.id) as { id: number; code: string; sport_class: number }[];
    const snapshot = () => ({
      assessment: t.ctx.sqlite.prepare('select * from assessments where id = ?').get(existing.id),
      ratings: t.ctx.sqlite.prepare('select * from ratings where assessment_id = ? order by id').all(existing.id),
    });
    const original = snapshot();
    const before = dataCounts(t.ctx);
    const other = ratings[0].sport_class === 9 ? 8 : ratings[0].sport_class + 1;
    const unused = ['C01', 'C02', 'C03', 'C04', 'C05'].find((c) => !ratings.some((r) => r.code === c))!;
    const lines = [
      'assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class,panel_class,kind',
      ...ratings.map(
        (r, i) =>
          `${existing.external_id},${existing.athlete},${existing.event},${existing.assessed_on},${r.code},${((i === 0 ? other : r.sport_class) / 2).toFixed(1)},${(existing.panel_class / 2).toFixed(1)},protest`,
      ),
      `${existing.external_id},${existing.athlete},${existing.event},${existing.assessed_on},${unused},3.0,,protest`,
    ];
    const dry = await upload(lead, { name: 'changes.csv', bytes: Buffer.from(lines.join('\n')) });
    expect(dry.body.outcome).toBe('ready');
    expect(dry.body.counts.assessments).toEqual({ new: 0, changed: 1, unchanged: 0 });
    expect(dry.body.counts.ratings).toEqual({ new: 1, changed: 1, unchanged: ratings.length - 1 });
    const commit = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/commit`);
    expect(commit.status).toBe(200);
    expect((t.ctx.sqlite.prepare('select kind from assessments where id = ?').get(existing.id) as { kind: string }).kind).toBe('protest');
    expect(dataCounts(t.ctx).import_changes).toBe(before.import_changes + 2);
    const revert = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/revert`);
    expect(revert.status).toBe(200);
    expect(snapshot()).toEqual(original);
    expect(dataCounts(t.ctx)).toEqual(before);
  });
});

describe('layouts and file forms', () => {
  it.each([
    ['long-bom-crlf-quoted.csv', 'long', 2, 4],
    ['wide-classifiers.csv', 'wide', 3, 8],
    ['wide-seats.csv', 'wide', 2, 5],
  ])('%s is read as the %s layout', async (name, layout, assessments, ratings) => {
    const dry = await upload(lead, { name });
    expect(dry.status).toBe(200);
    expect(dry.body.errors).toEqual([]);
    expect(dry.body).toMatchObject({ outcome: 'ready', layout });
    expect(dry.body.counts.assessments.new).toBe(assessments);
    expect(dry.body.counts.ratings.new).toBe(ratings);
    await lead.delete(`/api/federations/${FEDERATION}/imports/${dry.body.importId}`).expect(204);
  });

  it('keeps a quoted newline of a note, with a byte-order mark and CRLF line ends', async () => {
    const dry = await upload(lead, { name: 'long-bom-crlf-quoted.csv' });
    await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/commit`).expect(200);
    const note = t.ctx.sqlite.prepare("select note from assessments where external_id = 'IMP-0101'").pluck().get();
    expect(note).toBe('seen in training,\r\nthen in a game');
    const quoted = t.ctx.sqlite.prepare("select note from assessments where external_id = 'IMP-0102'").pluck().get();
    expect(quoted).toBe('quoted "chair" note');
    await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/revert`).expect(200);
  });

  it('applies a mapping: a column the guess cannot place is refused until it is mapped or ignored', async () => {
    const refused = await upload(lead, { name: 'e2e-corrected.csv' });
    expect(refused.body.outcome).toBe('refused');
    expect(refused.body.errors[0]).toMatchObject({ row: null, column: 'Remarks' });
    const mapped = await upload(lead, { name: 'e2e-corrected.csv' }, { mapping: JSON.stringify({ Remarks: 'note' }) });
    expect(mapped.body.outcome).toBe('ready');
    await lead.delete(`/api/federations/${FEDERATION}/imports/${mapped.body.importId}`).expect(204);
    const ignored = await upload(lead, { name: 'e2e-corrected.csv' }, { mapping: JSON.stringify({ Remarks: 'ignore' }) });
    expect(ignored.body.outcome).toBe('ready');
    await lead.delete(`/api/federations/${FEDERATION}/imports/${ignored.body.importId}`).expect(204);
  });

  it('reads dates in a declared format', async () => {
    const text =
      'assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class\nIMP-0501,A0010,S2425-R1,09/10/2024,C01,3.0\nIMP-0501,A0010,S2425-R1,09/10/2024,C02,3.0\n';
    const iso = await upload(lead, { name: 'dates.csv', bytes: Buffer.from(text) });
    expect(iso.body.errors[0]).toMatchObject({ row: 1, line: 2, column: 'assessed_on', value: '09/10/2024' });
    const declared = await upload(lead, { name: 'dates.csv', bytes: Buffer.from(text) }, { dateFormat: 'DD/MM/YYYY' });
    expect(declared.body.outcome).toBe('ready');
    await lead.post(`/api/federations/${FEDERATION}/imports/${declared.body.importId}/commit`).expect(200);
    expect(t.ctx.sqlite.prepare("select assessed_on from assessments where external_id = 'IMP-0501'").pluck().get()).toBe('2024-10-09');
    await lead.post(`/api/federations/${FEDERATION}/imports/${declared.body.importId}/revert`).expect(200);
  });

  it('adds unknown classifier codes to the roster only when asked, and revert removes them', async () => {
    const refused = await upload(lead, { name: 'malformed/unknown-classifier.csv' });
    expect(refused.body.outcome).toBe('refused');
    const before = dataCounts(t.ctx);
    const dry = await upload(lead, { name: 'malformed/unknown-classifier.csv' }, { addClassifiers: 'true' });
    expect(dry.body.outcome).toBe('ready');
    expect(dry.body.counts.classifiers).toEqual({ new: 1, changed: 0, unchanged: 1 });
    await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/commit`).expect(200);
    expect(t.ctx.sqlite.prepare("select count(*) from classifiers where code = 'C99' and federation_id = ?").pluck().get(fedId)).toBe(1);
    await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/revert`).expect(200);
    expect(dataCounts(t.ctx)).toEqual(before);
  });
});

/** [fixture, expected row, column, value] of the first error; row null for the file as a whole. */
const MALFORMED: [string, number | null, string | null, string | null, RegExp][] = [
  ['not-a-csv.csv', null, null, null, /not a CSV: it looks like a ZIP archive/],
  ['empty.csv', null, null, null, /empty/],
  ['header-only.csv', null, null, null, /header but no data rows/],
  ['unknown-column.csv', null, 'shoe_size', null, /not a column of the import/],
  ['missing-column.csv', null, 'sport_class', null, /no column sport_class/],
  ['mixed-delimiters.csv', 2, null, 'IMP-0403;A0001;S2425-R1;2024-10-08;C02;3.0;3.0;first', /mixes delimiters: row 2 \(line 3\)/],
  ['duplicate-header.csv', null, 'sport_class', null, /twice/],
  ['not-utf8.csv', null, null, null, /not UTF-8/],
  ['class-quarter.csv', 2, 'sport_class', '3.25', /not a half-point class/],
  ['class-off-scale.csv', 1, 'sport_class', '5.5', /off the scale 1\.0–4\.5/],
  ['class-blank.csv', 2, 'sport_class', '', /is blank/],
  ['class-text.csv', 1, 'sport_class', 'three', /not a number/],
  ['bad-date.csv', 2, 'assessed_on', '2024-02-30', /not a date of the calendar/],
  ['unknown-classifier.csv', 2, 'classifier_code', 'C99', /not a classifier of the federation's roster/],
  ['duplicate-rating.csv', 3, 'classifier_code', 'C01', /twice: a duplicate of row 1/],
  ['two-classes.csv', 3, 'classifier_code', 'C01', /twice with different classes: 3\.0 on row 1, 3\.5 here/],
  ['panel-class-off-scale.csv', 1, 'panel_class', '0.5', /off the scale/],
  ['athlete-differs.csv', 2, 'athlete_code', 'A0009', /differs from row 1 of assessment IMP-0414/],
  ['bad-kind.csv', 1, 'kind', 'appeal', /not one of first, review, protest/],
  ['short-row.csv', 2, 'classifier_code', '', /the row has 4 fields where the header has 8/],
  ['unclosed-quote.csv', 2, null, 'IMP-0417,A0001,S2425-R1,2024-10-08,C02,3.0,,first\n', /quote/],
];

describe('refused files write nothing and say where', () => {
  it.each(MALFORMED)('%s', async (name, row, column, value, message) => {
    const before = await settled(t.ctx, tableCounts);
    const res = await upload(lead, { name: `malformed/${name}` });
    expect(res.status).toBe(200);
    expect(res.body.outcome).toBe('refused');
    expect(res.body.importId).toBeNull();
    expect(res.body.errorCount).toBeGreaterThan(0);
    const first = res.body.errors[0];
    expect(first.message).toMatch(message);
    expect(first.row).toBe(row);
    if (column !== null) expect(first.column).toBe(column);
    if (value !== null) expect(first.value).toBe(value);
    if (row !== null) {
      expect(first.message).toContain(`ow ${row} (line ${first.line})`);
      if (column !== null) expect(first.message).toContain(`column ${column}`);
      if (value !== null && value !== '' && !value.includes('\n')) expect(first.message).toContain(`"${value}"`);
    }
    expect(tableCounts(t.ctx)).toEqual(before);
  });

  it('a file over 50 MB gets a clear refusal and writes nothing', async () => {
    const before = await settled(t.ctx, tableCounts);
    const big = Buffer.alloc(50 * 1024 * 1024 + 10, 'a');
    const res = await upload(lead, { name: 'big.csv', bytes: big });
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/larger than 50 MB/);
    expect(tableCounts(t.ctx)).toEqual(before);
  });

  it('a request without a file, or with bad form fields, is a 400 and writes nothing', async () => {
    const before = await settled(t.ctx, tableCounts);
    const none = await lead.post(`/api/federations/${FEDERATION}/imports`).send({ hello: 'there' });
    expect(none.status).toBe(400);
    expect(none.body.error.message).toMatch(/multipart\/form-data/);
    const badMapping = await upload(lead, { name: 'long-valid.csv' }, { mapping: '{"assessment_id":"shoe"}' });
    expect(badMapping.status).toBe(400);
    const badFormat = await upload(lead, { name: 'long-valid.csv' }, { dateFormat: 'julian' });
    expect(badFormat.status).toBe(400);
    expect(tableCounts(t.ctx)).toEqual(before);
  });

  it('shows at most 200 errors and counts them all', async () => {
    const lines = ['assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class'];
    for (let i = 0; i < 500; i++) lines.push(`IMP-9${i},A0001,S2425-R1,2024-10-08,C01,9.5`);
    const res = await upload(lead, { name: 'many.csv', bytes: Buffer.from(lines.join('\n')) });
    expect(res.body.errorCount).toBe(500);
    expect(res.body.errors).toHaveLength(200);
    expect(res.body.errors[199].row).toBe(200);
  });
});

describe('commit and revert rules', () => {
  it('commits once; a later import must be reverted first; the demo data cannot be reverted', async () => {
    const a = await upload(lead, { name: 'wide-classifiers.csv' });
    await lead.post(`/api/federations/${FEDERATION}/imports/${a.body.importId}/commit`).expect(200);
    const twice = await lead.post(`/api/federations/${FEDERATION}/imports/${a.body.importId}/commit`);
    expect(twice.status).toBe(409);
    const b = await upload(lead, { name: 'wide-seats.csv' });
    await lead.post(`/api/federations/${FEDERATION}/imports/${b.body.importId}/commit`).expect(200);
    const blocked = await lead.post(`/api/federations/${FEDERATION}/imports/${a.body.importId}/revert`);
    expect(blocked.status).toBe(409);
    expect(blocked.body.error.message).toMatch(new RegExp(`Import #${b.body.importId} came later`));
    await lead.post(`/api/federations/${FEDERATION}/imports/${b.body.importId}/revert`).expect(200);
    await lead.post(`/api/federations/${FEDERATION}/imports/${a.body.importId}/revert`).expect(200);

    const history = await lead.get(`/api/federations/${FEDERATION}/imports`).expect(200);
    const seed = history.body.imports.find((i: { source: string }) => i.source === 'seed');
    expect(seed).toMatchObject({ revertable: false, revertBlockedBy: 'The demo data cannot be reverted' });
    const refused = await lead.post(`/api/federations/${FEDERATION}/imports/${seed.id}/revert`);
    expect(refused.status).toBe(409);
    const ids = history.body.imports.map((i: { id: number }) => i.id);
    expect(ids).toContain(a.body.importId);
    expect([...ids].sort((x: number, y: number) => y - x)).toEqual(ids);
  });

  it('an import of another federation is not found; a staged import can be discarded', async () => {
    const dry = await upload(lead, { name: 'long-valid.csv' });
    const other = await lead.post(`/api/federations/harbour-cities/imports/${dry.body.importId}/commit`);
    expect(other.status).toBe(403);
    await lead.delete(`/api/federations/${FEDERATION}/imports/${dry.body.importId}`).expect(204);
    const gone = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/commit`);
    expect(gone.status).toBe(409);
    const missing = await lead.post(`/api/federations/${FEDERATION}/imports/999999/commit`);
    expect(missing.status).toBe(404);
  });
});

describe('saved mappings', () => {
  it('saves by name, replaces by name, lists and deletes', async () => {
    const first = await lead
      .post(`/api/federations/${FEDERATION}/import-mappings`)
      .send({ name: 'Regional office', mapping: { Remarks: 'note', ID: 'assessment_id' } });
    expect(first.status).toBe(201);
    expect(first.body).toMatchObject({ name: 'Regional office', layout: 'long', dateFormat: 'iso' });
    const again = await lead
      .post(`/api/federations/${FEDERATION}/import-mappings`)
      .send({ name: 'Regional office', mapping: { Remarks: 'ignore', C05: 'classifier:C05' }, dateFormat: 'DD.MM.YYYY' });
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ id: first.body.id, layout: 'wide', dateFormat: 'DD.MM.YYYY' });
    const list = await lead.get(`/api/federations/${FEDERATION}/import-mappings`).expect(200);
    expect(list.body.mappings).toHaveLength(1);
    const bad = await lead.post(`/api/federations/${FEDERATION}/import-mappings`).send({ name: '', mapping: { a: 'nonsense' } });
    expect(bad.status).toBe(400);
    await lead.delete(`/api/federations/${FEDERATION}/import-mappings/${first.body.id}`).expect(204);
    await lead.delete(`/api/federations/${FEDERATION}/import-mappings/${first.body.id}`).expect(404);
  });
});

const ITEMS = [
  {
    assessment_id: 'API-0001',
    athlete_code: 'A0040',
    event_code: 'S2425-R2',
    assessed_on: '2024-12-03',
    kind: 'first',
    panel_class: '2.5',
    ratings: [
      { classifier_code: 'C01', sport_class: 2.5 },
      { classifier_code: 'C02', sport_class: '2,5' },
      { classifier_code: 'C03', sport_class: '3' },
    ],
  },
  {
    assessment_id: 'API-0002',
    athlete_code: 'A0041',
    event_code: 'S2425-R2',
    assessed_on: '2024-12-03',
    ratings: [{ classifier_code: 'C04', sport_class: 4 }],
  },
];

describe('batch API', () => {
  const path = `/api/v1/federations/${FEDERATION}/assessments`;

  it('a lead posts items: written once, the same items again change nothing, a dry run writes nothing', async () => {
    const before = await settled(t.ctx, tableCounts);
    const dry = await lead.post(`${path}?dryRun=true`).send(ITEMS);
    expect(dry.status).toBe(200);
    expect(dry.body).toMatchObject({
      outcome: 'dry-run',
      importId: null,
      counts: { assessments: { new: 2 }, ratings: { new: 4 }, notAnalysable: 1 },
    });
    expect(tableCounts(t.ctx)).toEqual(before);
    const res = await lead.post(path).send(ITEMS);
    expect(res.status).toBe(201);
    expect(res.body.outcome).toBe('committed');
    expect(res.body.warnings[0]).toMatchObject({ item: 1, field: 'assessment_id', value: 'API-0002' });
    expect(t.ctx.sqlite.prepare('select status, source from imports where id = ?').get(res.body.importId)).toEqual({
      status: 'committed',
      source: 'api',
    });
    const after = await settled(t.ctx, tableCounts);
    const again = await lead.post(path).send(ITEMS);
    expect(again.status).toBe(200);
    expect(again.body.outcome).toBe('nothing-to-do');
    expect(tableCounts(t.ctx)).toEqual(after);
    await lead.post(`/api/federations/${FEDERATION}/imports/${res.body.importId}/revert`).expect(200);
  });

  it('refuses a batch with any bad item: 422 naming item, field and value, nothing written', async () => {
    const before = await settled(t.ctx, tableCounts);
    const bad = structuredClone(ITEMS) as Record<string, unknown>[];
    (bad[0].ratings as { sport_class: unknown }[])[1].sport_class = 3.25;
    bad[1].assessed_on = '2024-13-01';
    const res = await lead.post(path).send(bad);
    expect(res.status).toBe(422);
    expect(res.body.error.details.errors).toEqual([
      expect.objectContaining({
        item: 0,
        field: 'ratings[1].sport_class',
        value: '3.25',
        message: expect.stringMatching(/^Item 0, field ratings\[1\]\.sport_class: value "3.25" is not a half-point class/),
      }),
      expect.objectContaining({ item: 1, field: 'assessed_on', value: '2024-13-01' }),
    ]);
    const shape = await lead.post(path).send([{ assessment_id: 'X', ratings: [] }]);
    expect(shape.status).toBe(422);
    expect(shape.body.error.details.errors.map((e: { field: string }) => e.field)).toEqual(
      expect.arrayContaining(['athlete_code', 'ratings']),
    );
    const notArray = await lead.post(path).send({ assessments: [] });
    expect(notArray.status).toBe(422);
    expect(notArray.body.error.details.errors[0]).toMatchObject({ item: null });
    const unknown = await lead.post(path).send([
      {
        ...ITEMS[0],
        ratings: [
          { classifier_code: 'C77', sport_class: 3 },
          { classifier_code: 'C01', sport_class: 3 },
        ],
      },
    ]);
    expect(unknown.status).toBe(422);
    expect(unknown.body.error.details.errors[0]).toMatchObject({ item: 0, field: 'ratings[0].classifier_code', value: 'C77' });
    expect(tableCounts(t.ctx)).toEqual(before);
  });

  it('an API token with the import scope may post; a read token may not', async () => {
    const importToken = (await createApiToken(t.ctx, fedId, { name: 'registration system', scope: 'import' }, null)).token;
    const readToken = (await createApiToken(t.ctx, fedId, { name: 'reporting', scope: 'read' }, null)).token;
    const items = [{ ...ITEMS[0], assessment_id: 'API-TOKEN-1' }];
    const read = await request(t.app).post(path).set('Authorization', `Bearer ${readToken}`).send(items);
    expect(read.status).toBe(403);
    const res = await request(t.app).post(path).set('Authorization', `Bearer ${importToken}`).send(items);
    expect(res.status).toBe(201);
    const history = await lead.get(`/api/federations/${FEDERATION}/imports`);
    expect(history.body.imports[0]).toMatchObject({ id: res.body.importId, source: 'api', by: 'API token' });
    const other = await request(t.app)
      .post('/api/v1/federations/harbour-cities/assessments')
      .set('Authorization', `Bearer ${importToken}`)
      .send(items);
    expect(other.status).toBe(403);
    await lead.post(`/api/federations/${FEDERATION}/imports/${res.body.importId}/revert`).expect(200);
  });
});

describe('progress', () => {
  it('streams the progress of a dry run as server-sent events', async () => {
    const server = http.createServer(t.app).listen(0);
    const port = (server.address() as AddressInfo).port;
    try {
      const cookie = (await request(t.app).post('/api/session').send({ email: LEAD, password: 'panelwise-demo' })).headers[
        'set-cookie'
      ] as unknown as string[];
      const job = 'job-progress-test-1';
      const events: { phase: string }[] = [];
      const ended = new Promise<void>((resolve, reject) => {
        http
          .get(
            {
              port,
              path: `/api/federations/${FEDERATION}/import-jobs/${job}/events`,
              headers: { cookie: cookie.map((c) => c.split(';')[0]).join('; ') },
            },
            (res) => {
              expect(res.headers['content-type']).toMatch(/text\/event-stream/);
              let buffer = '';
              res.on('data', (chunk: Buffer) => {
                buffer += chunk.toString('utf8');
                for (const m of buffer.matchAll(/^data: (.*)$/gm)) events.push(JSON.parse(m[1]));
                buffer = buffer.slice(buffer.lastIndexOf('\n\n') + 2);
              });
              res.on('end', () => resolve());
            },
          )
          .on('error', reject);
      });
      await new Promise((r) => setTimeout(r, 100));
      const agent = request.agent(`http://localhost:${port}`);
      await agent.post('/api/session').send({ email: LEAD, password: 'panelwise-demo' }).expect(201);
      await agent
        .post(`/api/federations/${FEDERATION}/imports?job=${job}`)
        .attach('file', fs.readFileSync(fixture('long-valid.csv')), 'long-valid.csv')
        .expect(200);
      await ended;
      expect(events[0].phase).toBe('waiting');
      expect(events.map((e) => e.phase)).toContain('reading');
      expect(events.at(-1)!.phase).toBe('done');
    } finally {
      server.close();
    }
  });
});

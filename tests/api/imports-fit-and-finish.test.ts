/**
 * Imports as a lead meets them: a workbook renamed .csv is refused before any mapping (on the
 * server, and by the same signature check the browser's preview runs), UTF-16 text is read by its
 * encoding, every kind of problem is counted in one round, a stored assessment given to another
 * athlete waits for the lead's confirmation, ISO dates are read beside a declared format, and a
 * checked file never committed expires with a note in the history. All data invented.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sniffFile } from '../../shared/file-signature';
import { expireStagedImports } from '../../server/imports/service';
import { stagingFolder } from '../../server/imports/staging';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';
import { dataCounts, FEDERATION, fixture, LEAD, upload } from './imports/helpers';

let t: TestApp;
let lead: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  lead = await signedInAgent(t.app, LEAD);
});
afterAll(() => t.close());

const HEADER = 'assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class';
const csv = (...rows: string[]) => Buffer.from([HEADER, ...rows].join('\n') + '\n');
const commit = (id: number, body?: object) => lead.post(`/api/federations/${FEDERATION}/imports/${id}/commit`).send(body ?? {});

describe('a workbook renamed .csv', () => {
  const zip = Buffer.concat([
    Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00]),
    Buffer.from('[Content_Types].xml assessment_id,athlete_code'),
  ]);
  const xls = Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(504)]);

  it.each([
    ['ratings.xlsx.csv', zip, /not a CSV: it looks like a ZIP archive \(for example a spreadsheet workbook/],
    ['ratings.xls.csv', xls, /not a CSV: it looks like an old-style spreadsheet workbook \(\.xls\)/],
  ])('%s is refused before mapping, in the preview and on the server, with the same words', async (name, bytes, message) => {
    // The browser's preview runs this check on the first bytes before it shows any column.
    const sniffed = sniffFile(bytes.subarray(0, 4096));
    expect('refused' in sniffed && sniffed.refused).toMatch(message);
    const before = dataCounts(t.ctx);
    // Even with a mapping sent, the server refuses the file before looking at columns.
    const res = await upload(lead, { name, bytes }, { mapping: JSON.stringify({ assessment_id: 'assessment_id' }) });
    expect(res.status).toBe(200);
    expect(res.body.outcome).toBe('refused');
    expect(res.body.errorCount).toBe(1);
    expect(res.body.errors[0]).toMatchObject({ row: null, column: null });
    expect(res.body.errors[0].message).toMatch(message);
    expect(res.body.errors[0].message).toBe('refused' in sniffed ? sniffed.refused : '');
    expect(res.body.errors[0].message).toMatch(/Save it as CSV/);
    expect(dataCounts(t.ctx)).toEqual(before);
  });
});

describe('UTF-16 text', () => {
  const text = fs.readFileSync(fixture('long-valid.csv'), 'utf8');
  const be = (s: string) => Buffer.from(s, 'utf16le').swap16();

  it.each([
    ['with a byte-order mark (little-endian)', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')])],
    ['without a byte-order mark (little-endian)', Buffer.from(text, 'utf16le')],
    ['with a byte-order mark (big-endian)', Buffer.concat([Buffer.from([0xfe, 0xff]), be(text)])],
  ])('%s is read by its encoding and gives the same dry run as UTF-8', async (_label, bytes) => {
    expect(sniffFile(bytes)).toEqual({ encoding: expect.stringMatching(/^utf-16/) });
    const utf8 = await upload(lead, { name: 'long-valid.csv' });
    const utf16 = await upload(lead, { name: 'long-valid-utf16.csv', bytes });
    expect(utf16.body.errors).toEqual([]);
    expect(utf16.body.outcome).toBe('ready');
    expect(utf16.body.counts).toEqual(utf8.body.counts);
    for (const id of [utf8.body.importId, utf16.body.importId])
      await lead.delete(`/api/federations/${FEDERATION}/imports/${id}`).expect(204);
  });

  it('a broken UTF-16 file is named as UTF-16, not as binary data', async () => {
    const bytes = Buffer.concat([
      Buffer.from([0xff, 0xfe]),
      Buffer.from(text.slice(0, 200), 'utf16le'),
      Buffer.from([0x00, 0xd8, 0x41, 0x00]),
    ]);
    const res = await upload(lead, { name: 'broken-utf16.csv', bytes });
    expect(res.body.outcome).toBe('refused');
    expect(res.body.errors[0].message).toMatch(/UTF-16/);
    expect(res.body.errors[0].message).not.toMatch(/binary data/);
  });
});

describe('problems are counted in full, in one round', () => {
  it('bad classes and unknown classifiers of one file are all counted, by kind, with "first N of M"', async () => {
    const rows: string[] = [];
    for (let i = 0; i < 300; i++) rows.push(`IMP-81${i},A0001,S2425-R1,2024-10-08,C01,9.5`);
    for (let i = 0; i < 215; i++) rows.push(`IMP-82${i},A0001,S2425-R1,2024-10-08,C77,3.0`, `IMP-82${i},A0001,S2425-R1,2024-10-08,C01,3.0`);
    const res = await upload(lead, { name: 'rounds.csv', bytes: csv(...rows) });
    expect(res.body.outcome).toBe('refused');
    expect(res.body.errorCount).toBe(515);
    expect(res.body.errors).toHaveLength(200);
    const kinds = res.body.errorKinds as { column: string; problem: string; count: number; shown: number }[];
    expect(kinds).toHaveLength(2);
    expect(kinds[0]).toMatchObject({ column: 'sport_class', count: 300, shown: 200 });
    expect(kinds[0].problem).toMatch(/off the scale/);
    expect(kinds[1]).toMatchObject({ column: 'classifier_code', count: 215, shown: 0 });
    expect(kinds[1].problem).toMatch(/not a classifier of the federation's roster/);
  });
});

describe('a stored assessment re-sent with another athlete', () => {
  it('is a warning the lead must confirm before the commit; revert restores the athlete', async () => {
    const first = await upload(lead, {
      name: 'athlete-1.csv',
      bytes: csv('IMP-7001,A0001,S2425-R1,2024-10-08,C01,3.0', 'IMP-7001,A0001,S2425-R1,2024-10-08,C02,3.0'),
    });
    expect(first.body.athleteChangeCount).toBe(0);
    await commit(first.body.importId).expect(200);
    const athleteOf = () =>
      t.ctx.sqlite
        .prepare(
          "select athletes.code from assessments join athletes on athletes.id = assessments.athlete_id where external_id = 'IMP-7001'",
        )
        .pluck()
        .get();
    expect(athleteOf()).toBe('A0001');

    const again = await upload(lead, {
      name: 'athlete-2.csv',
      bytes: csv('IMP-7001,A0002,S2425-R1,2024-10-08,C01,3.0', 'IMP-7001,A0002,S2425-R1,2024-10-08,C02,3.0'),
    });
    expect(again.body.outcome).toBe('ready');
    expect(again.body.athleteChangeCount).toBe(1);
    expect(again.body.athleteChanges).toEqual([
      { assessmentId: 'IMP-7001', row: 1, line: 2, column: 'athlete_code', storedAthlete: 'A0001', fileAthlete: 'A0002' },
    ]);

    const before = dataCounts(t.ctx);
    const refused = await commit(again.body.importId);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/gives 1 stored assessment to another athlete: confirm this change to commit/);
    expect(athleteOf()).toBe('A0001');
    expect(dataCounts(t.ctx)).toEqual(before);

    const view = await commit(again.body.importId, { confirmAthleteChanges: true });
    expect(view.status).toBe(200);
    expect(athleteOf()).toBe('A0002');
    await lead.post(`/api/federations/${FEDERATION}/imports/${again.body.importId}/revert`).expect(200);
    expect(athleteOf()).toBe('A0001');
    await lead.post(`/api/federations/${FEDERATION}/imports/${first.body.importId}/revert`).expect(200);
  });
});

describe('dates', () => {
  it('with a declared DD/MM/YYYY format, ISO dates in the same file are read too', async () => {
    const bytes = csv(
      'IMP-7101,A0010,S2425-R1,09/10/2024,C01,3.0',
      'IMP-7101,A0010,S2425-R1,2024-10-09,C02,3.0',
      'IMP-7102,A0011,S2425-R1,2024-10-10,C01,2.0',
      'IMP-7102,A0011,S2425-R1,10/10/2024,C02,2.0',
    );
    const res = await upload(lead, { name: 'mixed-dates.csv', bytes }, { dateFormat: 'DD/MM/YYYY' });
    expect(res.body.errors).toEqual([]);
    expect(res.body.outcome).toBe('ready');
    expect(res.body.counts.assessments.new).toBe(2);
    await commit(res.body.importId).expect(200);
    const dates = t.ctx.sqlite
      .prepare("select assessed_on from assessments where external_id in ('IMP-7101', 'IMP-7102') order by external_id")
      .pluck()
      .all();
    expect(dates).toEqual(['2024-10-09', '2024-10-10']);
    await lead.post(`/api/federations/${FEDERATION}/imports/${res.body.importId}/revert`).expect(200);
    // A date in neither form is still refused, naming both.
    const bad = await upload(
      lead,
      { name: 'bad-date.csv', bytes: csv('IMP-7103,A0010,S2425-R1,2024/10/09,C01,3.0') },
      { dateFormat: 'DD/MM/YYYY' },
    );
    expect(bad.body.errors[0].message).toMatch(/is not a date DD\/MM\/YYYY \(or an ISO date YYYY-MM-DD\)/);
  });
});

describe('checked files never committed', () => {
  it('expire after 7 days with a note in the history; their staged batch is removed', async () => {
    const res = await upload(lead, {
      name: 'waiting.csv',
      bytes: csv('IMP-7201,A0001,S2425-R1,2024-10-08,C01,3.0', 'IMP-7201,A0001,S2425-R1,2024-10-08,C02,3.0'),
    });
    const id = res.body.importId as number;
    expect(res.body.expiresAt).toMatch(/^\d{4}-\d{2}-\d{2}T/);
    const staged = `${stagingFolder(t.ctx)}/${id}.json`;
    expect(fs.existsSync(staged)).toBe(true);

    // Six days on, it still waits; eight days on, it expires.
    expect(await expireStagedImports(t.ctx, { now: new Date(Date.now() + 6 * 86_400_000) })).not.toContain(id);
    expect(await expireStagedImports(t.ctx, { now: new Date(Date.now() + 8 * 86_400_000) })).toContain(id);
    expect(fs.existsSync(staged)).toBe(false);

    const history = await lead.get(`/api/federations/${FEDERATION}/imports`).expect(200);
    const row = (history.body.imports as { id: number; status: string; note: string | null }[]).find((v) => v.id === id);
    expect(row).toMatchObject({ status: 'expired' });
    expect(row!.note).toMatch(/not committed within 7 days: it expired/);
    const late = await commit(id);
    expect(late.status).toBe(409);
    expect(late.body.error.message).toMatch(/expired/);
    const audit = t.ctx.sqlite
      .prepare("select count(*) from audit_log where action = 'import.expire' and entity_id = ?")
      .pluck()
      .get(String(id));
    expect(audit).toBe(1);
    // Running it again changes nothing.
    expect(await expireStagedImports(t.ctx, { now: new Date(Date.now() + 8 * 86_400_000) })).toEqual([]);
  });
});

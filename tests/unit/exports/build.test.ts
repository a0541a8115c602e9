import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { renderExport, seasonOf, type SourceRating } from '../../../server/exports/build';
import { suppressSmallCells, type SuppressibleAssessment } from '../../../server/exports/suppression';
import { DEFAULT_SCALE } from '../../../shared/scale';
import type { ExportRequest } from '../../../shared/schemas/exports';

const key = new Uint8Array(32).fill(3);
const request: ExportRequest = {
  scope: { seasons: ['2024-25'], eventLevels: ['national'], categories: [], kinds: ['first'] },
  fields: ['athlete', 'panel_class', 'kind', 'season', 'event', 'event_level', 'category', 'date'],
  dateMode: 'month',
};

/** Five athletes per category, each with one assessment rated by two classifiers. */
function ratingsFor(categories: string[], eventLevel = 'national'): SourceRating[] {
  const out: SourceRating[] = [];
  let n = 0;
  for (const category of categories) {
    for (let i = 0; i < 5; i++) {
      n++;
      for (const classifier of ['C01', 'C02']) {
        out.push({
          assessmentKey: `KE-${n}`,
          athleteKey: `A${n}`,
          eventKey: 'S2425-R1',
          classifierKey: classifier,
          assessedOn: '2024-10-08',
          kind: 'first',
          category,
          eventLevel,
          sportClass: 5,
          panelClass: 5,
        });
      }
    }
  }
  return out;
}

const build = (ratings: SourceRating[], k = 5) =>
  renderExport({
    federation: { name: 'Invented Federation', scale: DEFAULT_SCALE },
    exportId: 1,
    exportedAt: '2026-12-02T10:00:00Z',
    request,
    k,
    key,
    salt: 's',
    study: null,
    ratings,
  });

describe('research export files', () => {
  it('neutralise CSV cells that begin with =, +, -, @, a tab or a carriage return; the JSON keeps the text', () => {
    const dangerous = ['=HYPERLINK("http://x.invalid")', '+1+2', '-3+4', '@SUM(1)', '\tTAB', '\rCR'];
    const built = build(ratingsFor(dangerous, '=cmd|"/C calc"!A0'));
    const parsed = Papa.parse<Record<string, string>>(built.csv, { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    const categories = new Set(parsed.data.map((r) => r.category));
    expect([...categories].sort()).toEqual(dangerous.map((d) => `'${d}`).sort());
    for (const row of parsed.data) {
      for (const value of Object.values(row)) expect(value).not.toMatch(/^[=+\-@\t\r]/);
      expect(row.event_level).toBe(`'=cmd|"/C calc"!A0`);
    }
    const json = JSON.parse(built.json) as { rows: { category: string }[] };
    expect(new Set(json.rows.map((r) => r.category))).toEqual(new Set(dangerous));
  });

  it('writes UTF-8 CSV with CRLF, a header, classes with one decimal and months', () => {
    const built = build(ratingsFor(['women', 'men', 'junior']));
    expect(
      built.csv.startsWith(
        'assessment,athlete,classifier,sport_class,panel_class,kind,season,event,event_level,category,assessed_month\r\n',
      ),
    ).toBe(true);
    expect(built.csv).toContain(',2.5,2.5,first,2024-25,evt-');
    expect(built.csv).toContain(',national,women,2024-10\r\n');
    expect(built.counts).toMatchObject({ rows: 30, assessments: 15, athletes: 15, classifiers: 2 });
  });

  it('writes day offsets from each athlete’s first assessment in the export', () => {
    const ratings = ratingsFor(['men']).map((r, i) => ({
      ...r,
      assessmentKey: `KE-x${i}`,
      athleteKey: 'A1',
      assessedOn: i < 4 ? '2024-10-08' : '2024-12-03',
    }));
    const built = renderExport({
      federation: { name: 'F', scale: DEFAULT_SCALE },
      exportId: 2,
      exportedAt: '2026-12-02T00:00:00Z',
      request: { ...request, fields: ['date'], dateMode: 'offset' },
      k: 1 + 1,
      key,
      salt: 's',
      study: null,
      ratings,
    });
    const rows = Papa.parse<Record<string, string>>(built.csv, { header: true, skipEmptyLines: true }).data;
    expect(new Set(rows.map((r) => r.day_offset))).toEqual(new Set(['0', '56']));
  });

  it('names seasons from 1 July to 30 June', () => {
    expect(seasonOf('2024-06-30')).toBe('2023-24');
    expect(seasonOf('2024-07-01')).toBe('2024-25');
    expect(seasonOf('1999-12-31')).toBe('1999-00');
  });
});

describe('small-cell suppression', () => {
  const item = (athlete: string, category: string, kind: string): SuppressibleAssessment => ({
    athlete,
    rows: 3,
    category,
    attributes: { kind, season: '2024-25' },
    suppressed: false,
  });

  it('blanks a category held by fewer than k athletes on every row of those athletes', () => {
    const items = [
      ...['a', 'b', 'c', 'd', 'e'].map((a) => item(a, 'men', 'review')),
      item('f', 'masters', 'review'),
      item('f', 'masters', 'first'),
      item('g', 'masters', 'review'),
    ];
    const counts = suppressSmallCells(items, { k: 5, categoryExported: true, combinationAttributes: [] });
    expect(items.filter((i) => i.category === null).map((i) => i.athlete)).toEqual(['f', 'f', 'g']);
    expect(counts).toEqual({ categoryAthletes: 2, categoryRows: 9, combinationAssessments: 0, combinationRows: 0 });
  });

  it('blanks every assessment-level attribute of a combination held by fewer than k athletes, and keeps the rows', () => {
    const items = [
      ...['a', 'b', 'c', 'd', 'e'].map((a) => item(a, 'men', 'review')),
      item('a', 'men', 'protest'),
      item('b', 'men', 'protest'),
    ];
    const counts = suppressSmallCells(items, { k: 5, categoryExported: true, combinationAttributes: ['kind', 'season'] });
    expect(items.length).toBe(7);
    expect(items.filter((i) => i.suppressed).map((i) => i.attributes)).toEqual([
      { kind: null, season: null },
      { kind: null, season: null },
    ]);
    expect(items.filter((i) => !i.suppressed).every((i) => i.attributes.kind === 'review')).toBe(true);
    expect(counts).toEqual({ categoryAthletes: 0, categoryRows: 0, combinationAssessments: 2, combinationRows: 6 });
  });

  it('counts athletes, not assessments: one athlete assessed five times is still one', () => {
    const items = Array.from({ length: 5 }, () => item('a', 'men', 'review'));
    suppressSmallCells(items, { k: 2, categoryExported: true, combinationAttributes: ['kind'] });
    expect(items.every((i) => i.category === null && i.suppressed)).toBe(true);
  });
});

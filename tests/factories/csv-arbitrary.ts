/**
 * fast-check arbitraries of import files: mostly well-formed long-layout CSVs (so that many are
 * accepted), with random header orders, delimiters, line ends, quoting, byte-order marks and
 * blank lines, and mutations: bad values, dropped or doubled columns, cut files, stray bytes.
 */
import fc from 'fast-check';

const HEADER = [
  'assessment_id',
  'athlete_code',
  'event_code',
  'assessed_on',
  'classifier_code',
  'sport_class',
  'panel_class',
  'kind',
  'note',
];
const GOOD_CLASSES = ['1', '1.0', '1.5', '2', '2,5', '3.0', '3,5', '4', '4.5', ' 3.5 ', '2.50'];
const BAD_CLASSES = ['3.25', '5.5', '', 'three', '0.5', '-1', '3.', '1e1', '４'];
const GOOD_DATES = ['2024-10-08', '2023-02-28', '2025-06-10', '2024-02-29', '2024-10-08T10:30:00Z'];
const BAD_DATES = ['2024-02-30', '08/10/2024', '', 'yesterday', '2024-13-01', '1900-01-01'];
const CLASSIFIERS = ['C01', 'C02', 'C03', 'C04', 'C05', 'C06'];
const KINDS = ['first', 'review', 'protest', '', 'Review'];

interface Row {
  assessment: number;
  classifier: number;
  cls: string;
  kind: string;
  note: string;
  mutate: number;
}

const rowArb = fc.record({
  assessment: fc.integer({ min: 0, max: 12 }),
  classifier: fc.integer({ min: 0, max: CLASSIFIERS.length - 1 }),
  cls: fc.constantFrom(...GOOD_CLASSES),
  kind: fc.constantFrom(...KINDS),
  note: fc.oneof(
    { weight: 6, arbitrary: fc.constant('') },
    { weight: 1, arbitrary: fc.string({ maxLength: 12 }) },
    { weight: 1, arbitrary: fc.constantFrom('a, b', 'line\nbreak', 'say "hi"', '=cmd()') },
  ),
  // 0 = clean; otherwise which field to spoil.
  mutate: fc.oneof({ weight: 12, arbitrary: fc.constant(0) }, { weight: 1, arbitrary: fc.integer({ min: 1, max: 8 }) }),
});

export interface CsvCase {
  text: string;
  delimiter: string;
}

function quote(value: string, delimiter: string, always: boolean): string {
  if (always || value.includes(delimiter) || value.includes('"') || value.includes('\n') || value.includes('\r'))
    return `"${value.replace(/"/g, '""')}"`;
  return value;
}

/** A long-layout CSV as text. */
export const longCsvArb: fc.Arbitrary<CsvCase> = fc
  .record({
    rows: fc.array(rowArb, { minLength: 0, maxLength: 25 }),
    order: fc
      .shuffledSubarray(HEADER, { minLength: HEADER.length - 3, maxLength: HEADER.length })
      .chain((cols) => fc.shuffledSubarray(cols, { minLength: cols.length, maxLength: cols.length })),
    keepRequired: fc.boolean(),
    delimiter: fc.constantFrom(',', ',', ',', ';', '\t'),
    newline: fc.constantFrom('\n', '\r\n'),
    bom: fc.boolean(),
    quoteAll: fc.boolean(),
    blankLines: fc.boolean(),
    extraColumn: fc.oneof(
      { weight: 8, arbitrary: fc.constant(null) },
      { weight: 1, arbitrary: fc.constantFrom('shoe_size', 'C07', 'sport_class') },
    ),
    upper: fc.boolean(),
  })
  .map(({ rows, order, keepRequired, delimiter, newline, bom, quoteAll, blankLines, extraColumn, upper }) => {
    let columns = keepRequired
      ? [...new Set([...order, 'assessment_id', 'athlete_code', 'event_code', 'assessed_on', 'classifier_code', 'sport_class'])]
      : order;
    if (extraColumn) columns = [...columns, extraColumn];
    const lines: string[] = [columns.map((c) => quote(upper ? c.toUpperCase() : c, delimiter, quoteAll)).join(delimiter)];
    rows.forEach((r: Row, i) => {
      const id = `PX-${r.assessment}`;
      const values: Record<string, string> = {
        assessment_id: id,
        athlete_code: `A${String(10 + r.assessment).padStart(4, '0')}`,
        event_code: `S2425-R${1 + (r.assessment % 4)}`,
        assessed_on: GOOD_DATES[r.assessment % GOOD_DATES.length],
        classifier_code: CLASSIFIERS[r.classifier],
        sport_class: r.cls,
        panel_class: r.assessment % 3 === 0 ? '' : GOOD_CLASSES[r.assessment % GOOD_CLASSES.length],
        kind: KINDS[r.assessment % 3],
        note: r.note,
        shoe_size: '44',
        C07: '3.0',
      };
      switch (r.mutate) {
        case 1:
          values.sport_class = BAD_CLASSES[i % BAD_CLASSES.length]!;
          break;
        case 2:
          values.assessed_on = BAD_DATES[i % BAD_DATES.length]!;
          break;
        case 3:
          values.classifier_code = i % 2 ? 'C99' : '';
          break;
        case 4:
          values.athlete_code = 'A9999';
          break;
        case 5:
          values.panel_class = BAD_CLASSES[i % BAD_CLASSES.length]!;
          break;
        case 6:
          values.kind = 'appeal';
          break;
        case 7:
          values.assessment_id = i % 2 ? '' : 'x'.repeat(70);
          break;
        case 8:
          values.note = 'x'.repeat(2100);
          break;
      }
      if (blankLines && i % 5 === 2) lines.push('');
      lines.push(columns.map((c) => quote(values[c] ?? '', delimiter, quoteAll)).join(delimiter));
    });
    return { text: (bom ? '\uFEFF' : '') + lines.join(newline) + (rows.length % 2 ? newline : ''), delimiter };
  });

/** A CSV, then mangled: cut short, a character inserted, a line doubled or swapped, another delimiter. */
export const mutatedCsvArb: fc.Arbitrary<string> = fc
  .tuple(
    longCsvArb,
    fc.array(fc.tuple(fc.integer({ min: 0, max: 5 }), fc.nat(), fc.string({ minLength: 1, maxLength: 3 })), { maxLength: 3 }),
  )
  .map(([csv, mutations]) => {
    let text = csv.text;
    for (const [kind, at, s] of mutations) {
      const p = text.length === 0 ? 0 : at % text.length;
      const lines = text.split('\n');
      switch (kind) {
        case 0:
          text = text.slice(0, p);
          break;
        case 1:
          text = text.slice(0, p) + s + text.slice(p);
          break;
        case 2:
          text = text.slice(0, p) + '"' + text.slice(p);
          break;
        case 3:
          lines.splice(at % Math.max(1, lines.length), 0, lines[at % Math.max(1, lines.length)] ?? '');
          text = lines.join('\n');
          break;
        case 4:
          text = text.replace(csv.delimiter === ',' ? /,/ : /;|\t/, csv.delimiter === ',' ? ';' : ',');
          break;
        case 5:
          text = text.slice(0, p) + '\u0000' + text.slice(p);
          break;
      }
    }
    return text;
  });

/** Any file: a CSV, a mangled CSV, or random text or bytes. */
export const anyFileArb: fc.Arbitrary<Buffer> = fc.oneof(
  { weight: 5, arbitrary: longCsvArb.map((c) => Buffer.from(c.text)) },
  { weight: 4, arbitrary: mutatedCsvArb.map((t) => Buffer.from(t)) },
  { weight: 1, arbitrary: fc.string({ maxLength: 200 }).map((t) => Buffer.from(t)) },
  { weight: 1, arbitrary: fc.uint8Array({ maxLength: 300 }).map((b) => Buffer.from(b)) },
);

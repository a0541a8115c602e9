/**
 * The byte reader (quote-free UTF-8 files, read from their bytes into typed columns) against the
 * text reader (papaparse over decoded text) on thousands of random and mangled files: the same
 * errors, warnings, counts and batch; and the command line's RatingSet built from the typed
 * columns is the one buildRatingSet makes from row objects.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { buildRatingSet } from '../../../server/analysis';
import { parseTidyCsv, ratingSetOfCore } from '../../../server/cli/read-tidy-csv';
import { batchOfCore } from '../../../server/imports/batch';
import {
  byteReadable,
  decodeCsvBytes,
  readCsvBytes,
  readCsvCore,
  readCsvText,
  type CsvReadOptions,
} from '../../../server/imports/csv-reader';
import { anyFileArb } from '../../factories/csv-arbitrary';

function textRead(bytes: Buffer, options: CsvReadOptions = {}) {
  try {
    return readCsvText(decodeCsvBytes(bytes), options);
  } catch {
    return null;
  }
}

describe('byte reader', () => {
  it('agrees with the text reader on every file it reads (errors, warnings, counts, batch)', async () => {
    let plain = 0;
    let plainAccepted = 0;
    let plainWithErrors = 0;
    await fc.assert(
      fc.asyncProperty(anyFileArb, async (bytes) => {
        const text = textRead(bytes);
        const streamed = await readCsvBytes(bytes);
        const core = readCsvCore(bytes);
        if (text === null) {
          expect(streamed.batch).toBeNull();
          expect(core.core).toBeNull();
          return;
        }
        if (byteReadable(bytes)) {
          plain++;
          if (text.issues.errorCount === 0 && text.batch) plainAccepted++;
          else plainWithErrors++;
        }
        for (const r of [streamed, { ...core, batch: core.core ? batchOfCore(core.core) : null }]) {
          expect(r.issues.errors).toEqual(text.issues.errors);
          expect(r.issues.warnings).toEqual(text.issues.warnings);
          expect(r.issues.errorCount).toBe(text.issues.errorCount);
          expect(r.issues.warningCount).toBe(text.issues.warningCount);
          expect(r.batch).toEqual(text.batch);
          expect(r.layout).toEqual(text.layout);
        }
      }),
      { numRuns: 800, seed: 20261204 },
    );
    // The generator reaches the byte reader often, with accepted files and with problems.
    expect(plain).toBeGreaterThan(100);
    expect(plainAccepted).toBeGreaterThan(25);
    expect(plainWithErrors).toBeGreaterThan(25);
  }, 180_000);

  it('the command line’s RatingSet from typed columns equals buildRatingSet over the rows', () => {
    let compared = 0;
    const options: CsvReadOptions = { unknownColumns: 'ignore', layout: 'long' };
    fc.assert(
      fc.property(anyFileArb, (bytes) => {
        const core = readCsvCore(bytes, options);
        if (!core.core || core.issues.errorCount > 0 || core.core.ratings.assessment.length === 0) return;
        const { rows } = parseTidyCsv(decodeCsvBytes(bytes), 'file.csv');
        expect(ratingSetOfCore(core.core)).toEqual(buildRatingSet(rows, { min: 2, max: 9 }));
        compared++;
      }),
      { numRuns: 1000, seed: 41 },
    );
    expect(compared).toBeGreaterThan(100);
  }, 180_000);

  it('reads a million-row-like layout exactly: CRLF, blank lines, a byte-order mark, spaces around codes', () => {
    const text =
      '\uFEFFassessment_id;athlete_code;event_code;assessed_on;classifier_code;sport_class\r\n' +
      '\r\n' +
      'A1;ATH1;E1;2024-10-08;C01;3,5\r\n' +
      ' A1 ;ATH1;E1;2024-10-08;C02;3.5\r\n' +
      'A2;ATH2;E1;2024-10-09;C01;4\r\n' +
      'A1;ATH1;E1;2024-10-08;C03;9\r\n';
    const bytes = Buffer.from(text);
    expect(byteReadable(bytes)).toBe(true);
    const core = readCsvCore(bytes);
    const reference = textRead(bytes)!;
    expect(core.issues.errors).toEqual(reference.issues.errors);
    expect(core.issues.errors[0]).toMatchObject({ row: 4, line: 6, column: 'sport_class', value: '9' });
    expect(batchOfCore(core.core!)).toEqual(reference.batch);
    expect(core.core!.assessments.externalId).toEqual(['A1', 'A2']);
  });
});

/**
 * Properties of the import reader over thousands of random and mangled files: it never throws,
 * every error names a row or refuses the file as a whole with a reason, an accepted file holds
 * only classes on the scale and real dates, and the streamed reader agrees with the text reader.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isoDateToDay } from '../../../server/analysis';
import { decodeCsvBytes, readCsvBytes, readCsvText } from '../../../server/imports/csv-reader';
import { FileRefusal } from '../../../server/imports/issues';
import { anyFileArb } from '../../factories/csv-arbitrary';

function read(bytes: Buffer) {
  let text: string;
  try {
    text = decodeCsvBytes(bytes);
  } catch (error) {
    expect(error).toBeInstanceOf(FileRefusal);
    return null;
  }
  return readCsvText(text);
}

describe('import reader properties', () => {
  it('never throws; every error names a row, or the file is refused as a whole with a reason', () => {
    let accepted = 0;
    let refusedRows = 0;
    let refusedFiles = 0;
    fc.assert(
      fc.property(anyFileArb, (bytes) => {
        const r = read(bytes);
        if (r === null) {
          refusedFiles++;
          return;
        }
        for (const e of [...r.issues.errors, ...r.issues.warnings]) {
          expect(e.message.length).toBeGreaterThan(10);
          if (e.row !== null) {
            expect(e.message).toMatch(new RegExp(`^Row ${e.row} \\(line ${e.line}\\)|mixes delimiters: row ${e.row}`));
            if (e.column !== null && !e.message.includes('mixes delimiters')) expect(e.message).toContain(`column ${e.column}`);
            if (e.value !== null && e.value !== '' && !e.message.includes('mixes')) expect(e.message).toContain(`"${e.value}"`);
          } else {
            // Only a refusal of the whole file has no row.
            expect(r.batch).toBeNull();
          }
        }
        expect(r.issues.errors.length).toBeLessThanOrEqual(200);
        expect(r.issues.errorCount).toBeGreaterThanOrEqual(r.issues.errors.length);
        if (r.batch === null) {
          expect(r.issues.errorCount).toBeGreaterThan(0);
          refusedFiles++;
        } else if (r.issues.errorCount > 0) refusedRows++;
        else {
          accepted++;
          const { ratings, assessments } = r.batch;
          for (const c of ratings.sportClass) expect(c >= 2 && c <= 9 && Number.isInteger(c)).toBe(true);
          for (const d of assessments.assessedOn) expect(isoDateToDay(d)).not.toBeNull();
          for (const pc of assessments.panelClass) if (pc !== null) expect(pc >= 2 && pc <= 9).toBe(true);
          expect(new Set(ratings.assessment.map((a, k) => `${a}:${ratings.classifierCode[k]}`)).size).toBe(ratings.assessment.length);
        }
      }),
      { numRuns: 2000, seed: 20261202 },
    );
    // The generator reaches every outcome.
    expect(accepted).toBeGreaterThan(100);
    expect(refusedRows).toBeGreaterThan(100);
    expect(refusedFiles).toBeGreaterThan(100);
  });

  it('the streamed reader (uploads) and the text reader (command line) agree', async () => {
    await fc.assert(
      fc.asyncProperty(anyFileArb, async (bytes) => {
        const streamed = await readCsvBytes(bytes);
        const text = read(bytes);
        if (text === null) {
          expect(streamed.batch).toBeNull();
          return;
        }
        expect(streamed.issues.errors).toEqual(text.issues.errors);
        expect(streamed.batch).toEqual(text.batch);
      }),
      { numRuns: 300, seed: 7 },
    );
  });
});

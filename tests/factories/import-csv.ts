/**
 * Invented import files for tests and benchmarks: a long-layout CSV of `ratings` ratings in
 * panels of three drawn from the demo's classifiers C01–C20, on athletes and events of the demo
 * scenario's pattern, with assessment ids of a prefix of our own (so they are new to the demo).
 */
import { createWriteStream } from 'node:fs';
import { once } from 'node:events';

export const LONG_HEADER = 'assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class,panel_class,kind';
export const COMPACT_HEADER = 'assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class';

export interface LongCsvOptions {
  ratings: number;
  prefix?: string;
  classifiers?: number;
  seed?: number;
  /** Without panel_class and kind (smaller: 1,000,000 ratings stay under the 50 MB upload limit). */
  compact?: boolean;
}

function* longLines(options: LongCsvOptions): Generator<string> {
  const prefix = options.prefix ?? 'BX';
  const classifiers = options.classifiers ?? 20;
  let state = (options.seed ?? 7) >>> 0;
  const next = () => {
    state = (state * 1664525 + 1013904223) >>> 0;
    return state / 4294967296;
  };
  yield options.compact ? COMPACT_HEADER : LONG_HEADER;
  let written = 0;
  for (let a = 0; written < options.ratings; a++) {
    const truth = 2 + Math.floor(next() * 8);
    const day = 1 + Math.floor(next() * 28);
    const month = 1 + Math.floor(next() * 12);
    const date = `20${20 + (a % 5)}-${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}`;
    const athlete = `A${String(1 + (a % 300)).padStart(4, '0')}`;
    const event = `S2425-R${1 + (a % 4)}`;
    const first = Math.floor(next() * classifiers);
    const kind = a % 20 === 0 ? 'review' : 'first';
    for (let k = 0; k < 3 && written < options.ratings; k++, written++) {
      const c = `C${String(1 + ((first + k * 7) % classifiers)).padStart(2, '0')}`;
      const u = next();
      const cls = Math.min(9, Math.max(2, truth + (u < 0.15 ? -1 : u > 0.85 ? 1 : 0)));
      const line = `${prefix}${a},${athlete},${event},${date},${c},${(cls / 2).toFixed(1)}`;
      yield options.compact ? line : `${line},${(truth / 2).toFixed(1)},${kind}`;
    }
  }
}

/** The CSV as text. */
export function longCsv(options: LongCsvOptions): string {
  return [...longLines(options)].join('\n') + '\n';
}

/** Writes the CSV to a file without holding it all in memory. */
export async function writeLongCsv(path: string, options: LongCsvOptions): Promise<void> {
  const out = createWriteStream(path);
  let buffer: string[] = [];
  for (const line of longLines(options)) {
    buffer.push(line);
    if (buffer.length >= 10_000) {
      if (!out.write(buffer.join('\n') + '\n')) await once(out, 'drain');
      buffer = [];
    }
  }
  out.write(buffer.length ? buffer.join('\n') + '\n' : '');
  out.end();
  await once(out, 'finish');
}

/**
 * Count tables: for each unit (assessment), how many ratings fell in each class.
 *
 * Every multi-rater statistic of the engine (Fleiss' kappa, Krippendorff's alpha, Gwet's AC,
 * panel agreement, class boundaries) is a function of the count table alone. Identical rows
 * are merged into "patterns" with a frequency, so a table of 333,000 panels of three on eight
 * classes shrinks to at most 120 patterns; the statistics then take a weight per pattern,
 * which is also how the bootstrap resamples (weights = how often each pattern was drawn).
 */
import type { RatingSet } from './rating-set';

export interface CountTable {
  /** Number of classes (columns). */
  readonly q: number;
  /** Number of rows (units or patterns). */
  readonly rows: number;
  /** rows × q counts, row-major. */
  readonly counts: Int32Array;
  /** Row totals (ratings per unit). */
  readonly totals: Int32Array;
  /** How many units each row stands for (all 1 for an unmerged table). */
  readonly weights: Int32Array;
}

/** The assessment × class count table of a RatingSet (one row per assessment). */
export function countTable(set: RatingSet): CountTable {
  const { q, assessmentCount: A, ratingStart, ratingClass } = set;
  const counts = new Int32Array(A * q);
  const totals = new Int32Array(A);
  for (let a = 0; a < A; a++) {
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    const base = a * q;
    for (let p = s; p < e; p++) counts[base + ratingClass[p]]++;
    totals[a] = e - s;
  }
  return { q, rows: A, counts, totals, weights: new Int32Array(A).fill(1) };
}

/** A count table from rows of counts (e.g. a published table). */
export function countTableFromRows(rows: readonly (readonly number[])[], q?: number): CountTable {
  const cols = q ?? rows[0]?.length ?? 0;
  const counts = new Int32Array(rows.length * cols);
  const totals = new Int32Array(rows.length);
  rows.forEach((row, i) => {
    let t = 0;
    for (let j = 0; j < cols; j++) {
      const v = row[j] ?? 0;
      counts[i * cols + j] = v;
      t += v;
    }
    totals[i] = t;
  });
  return { q: cols, rows: rows.length, counts, totals, weights: new Int32Array(rows.length).fill(1) };
}

/** A count table from a ratings layout: one row per unit, one category index (or null) per rater. */
export function countTableFromRatings(rows: readonly (readonly (number | null)[])[], q: number): CountTable {
  return countTableFromRows(
    rows.map((r) => {
      const c = new Array<number>(q).fill(0);
      for (const v of r) if (v !== null) c[v]++;
      return c;
    }),
    q,
  );
}

export interface PatternTable extends CountTable {
  /** For each unit of the source table, the pattern (row of this table) it was merged into. */
  readonly unitPattern: Int32Array;
}

/**
 * Merges identical rows of a count table into patterns with frequencies (weights). Rows whose
 * total is below `minTotal` are dropped (unitPattern −1).
 */
export function compressPatterns(table: CountTable, minTotal = 1): PatternTable {
  const { q, rows, counts, totals, weights } = table;
  let maxTotal = 0;
  for (let i = 0; i < rows; i++) if (totals[i] > maxTotal) maxTotal = totals[i]!;
  const base = maxTotal + 1;
  const numericKey = Math.pow(base, q) < Number.MAX_SAFE_INTEGER;
  const index = new Map<number | string, number>();
  const unitPattern = new Int32Array(rows).fill(-1);
  let pCounts: Int32Array = new Int32Array(Math.max(16, q * 16));
  let pTotals: Int32Array = new Int32Array(16);
  let pWeights: Int32Array = new Int32Array(16);
  let k = 0;
  for (let i = 0; i < rows; i++) {
    if (totals[i] < minTotal) continue;
    const off = i * q;
    let key: number | string;
    if (numericKey) {
      let h = 0;
      for (let j = 0; j < q; j++) h = h * base + counts[off + j];
      key = h;
    } else {
      key = Array.prototype.join.call(counts.subarray(off, off + q), ',');
    }
    let id = index.get(key);
    if (id === undefined) {
      id = k++;
      index.set(key, id);
      if (k > pTotals.length) {
        const cap = pTotals.length * 2;
        pCounts = growInt(pCounts, cap * q);
        pTotals = growInt(pTotals, cap);
        pWeights = growInt(pWeights, cap);
      }
      pCounts.set(counts.subarray(off, off + q), id * q);
      pTotals[id] = totals[i]!;
    }
    pWeights[id] += weights[i];
    unitPattern[i] = id;
  }
  return {
    q,
    rows: k,
    counts: pCounts.slice(0, k * q),
    totals: pTotals.slice(0, k),
    weights: pWeights.slice(0, k),
    unitPattern,
  };
}

function growInt(a: Int32Array, cap: number): Int32Array {
  const out = new Int32Array(cap);
  out.set(a);
  return out;
}

/** The same table with other row weights (used by the bootstrap). */
export function withWeights<T extends CountTable>(table: T, weights: Int32Array): T {
  return { ...table, weights };
}

/**
 * Points at stake: a figure of Panelwise's own, in the trade's terms. In wheelchair basketball a
 * team's players may not exceed a total of class points on court, so a rating half a class away
 * from the panel's final class moves half a point of that budget.
 *
 * Over ratings in assessments with two or more ratings and a recorded final class:
 * - meanAbs: mean |own class − panel's final class| in points (Wald interval from the sample
 *   standard deviation), read ×100 as "points per 100 ratings";
 * - offByHalf: share of ratings at least half a class (0.5 point) from the final class (Wilson
 *   1927 interval).
 * Per classifier and pooled over the federation (every such rating of every classifier).
 *
 * Also the two-rater coefficients of a confusion matrix (a classifier against the panel, or a
 * pair): unweighted Cohen's kappa (Cohen 1960, through `kappaFromTable`) and Gwet's AC1 (Gwet
 * 2008, through `gwetAC` on a table of one unit per cell count).
 */
import { kappaFromTable, type KappaResult } from './cohen-kappa';
import type { CountTable } from './count-table';
import { gwetAC, type GwetResult } from './gwet-ac';
import type { RatingSet } from './rating-set';
import { definedStat, proportionStat, undefinedStat, type StatResult } from './result';
import { agreementWeights } from './weights';

export interface PointsAtStake {
  /** Ratings compared. */
  n: number;
  /** Mean absolute difference from the final class, in points. */
  meanAbs: StatResult;
  /** Share of ratings half a class or more from the final class. */
  offByHalf: StatResult;
  /** meanAbs × 100: points per 100 ratings. */
  per100: number | null;
}

interface Acc {
  n: number;
  sum: number;
  sumSq: number;
  off: number;
}

function finish(a: Acc): PointsAtStake {
  if (a.n === 0) {
    const none = undefinedStat(0, 'no rating in a panel of two or more with a recorded final class');
    return { n: 0, meanAbs: none, offByHalf: none, per100: null };
  }
  const mean = a.sum / a.n;
  const sd = a.n > 1 ? Math.sqrt(Math.max(0, (a.sumSq - a.n * mean * mean) / (a.n - 1))) : null;
  const meanAbs = definedStat(mean, sd === null ? null : sd / Math.sqrt(a.n), a.n);
  return { n: a.n, meanAbs, offByHalf: proportionStat(a.off, a.n), per100: 100 * mean };
}

/** Points at stake for the federation and per classifier code. */
export function pointsAtStake(set: RatingSet): { federation: PointsAtStake; classifiers: Map<string, PointsAtStake> } {
  const C = set.classifierCodes.length;
  const per: Acc[] = Array.from({ length: C }, () => ({ n: 0, sum: 0, sumSq: 0, off: 0 }));
  const all: Acc = { n: 0, sum: 0, sumSq: 0, off: 0 };
  for (let a = 0; a < set.assessmentCount; a++) {
    const s = set.ratingStart[a];
    const e = set.ratingStart[a + 1];
    const fin = set.panelClass[a];
    if (e - s < 2 || fin < 0) continue;
    for (let p = s; p < e; p++) {
      const d = Math.abs(set.ratingClass[p] - fin) / 2;
      for (const acc of [per[set.ratingClassifier[p]], all]) {
        acc.n++;
        acc.sum += d;
        acc.sumSq += d * d;
        if (d >= 0.5) acc.off++;
      }
    }
  }
  const classifiers = new Map<string, PointsAtStake>();
  per.forEach((acc, i) => {
    if (acc.n > 0) classifiers.set(set.classifierCodes[i], finish(acc));
  });
  return { federation: finish(all), classifiers };
}

/** Points apart of two ratings per cell of a confusion matrix (rows one rater, columns the other). */
export function pointsApart(counts: readonly (readonly number[])[]): PointsAtStake {
  const acc: Acc = { n: 0, sum: 0, sumSq: 0, off: 0 };
  counts.forEach((row, r) =>
    row.forEach((m, c) => {
      const d = Math.abs(r - c) / 2;
      acc.n += m;
      acc.sum += m * d;
      acc.sumSq += m * d * d;
      if (d >= 0.5) acc.off += m;
    }),
  );
  return finish(acc);
}

/** A count table of two ratings per unit from a confusion matrix (one weighted row per non-empty cell). */
export function twoRaterTable(counts: readonly (readonly number[])[]): CountTable {
  const q = counts.length;
  const cells: [number, number, number][] = [];
  counts.forEach((row, r) => row.forEach((m, c) => m > 0 && cells.push([r, c, m])));
  const table = new Int32Array(cells.length * q);
  const totals = new Int32Array(cells.length).fill(2);
  const weights = new Int32Array(cells.length);
  cells.forEach(([r, c, m], i) => {
    table[i * q + r]++;
    table[i * q + c]++;
    weights[i] = m;
  });
  return { q, rows: cells.length, counts: table, totals, weights };
}

/** Unweighted Cohen's kappa and Gwet's AC1 of a confusion matrix. */
export function twoRaterCoefficients(counts: readonly (readonly number[])[]): { kappa: KappaResult; ac1: GwetResult } {
  const q = counts.length;
  const flat = new Float64Array(q * q);
  counts.forEach((row, r) => row.forEach((m, c) => (flat[r * q + c] = m)));
  return { kappa: kappaFromTable(flat, q, agreementWeights(q, 'unweighted')), ac1: gwetAC(twoRaterTable(counts), 'unweighted') };
}

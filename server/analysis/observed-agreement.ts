/**
 * Observed (raw) agreement of panels, exact and within one half-class (|a − b| ≤ 0.5 points,
 * i.e. one step on the scale). Only assessments with ≥ 2 ratings count.
 *
 * Three forms (they coincide with Cohen's p_o for two classifiers):
 * - unanimous: share of assessments whose ratings are all equal (exact), or whose highest and
 *   lowest rating differ by at most one half-class (within);
 * - pairwiseMean: per assessment, the share of agreeing classifier pairs, averaged over
 *   assessments (= Fleiss' P̄, Fleiss 1971; = Gwet's p_a, Gwet 2014);
 * - pooledPairs: agreeing pairs over all pairs, pooled over assessments.
 * Intervals: Wilson (1927) score interval for the unanimous share; Wald from the standard
 * deviation of the per-assessment shares for the pairwise mean; none for pooled pairs
 * (use the bootstrap).
 */
import type { CountTable } from './count-table';
import { definedStat, proportionStat, undefinedStat, type StatResult } from './result';

export interface AgreementForms {
  unanimous: StatResult;
  pairwiseMean: StatResult;
  pooledPairs: StatResult;
}

export interface ObservedAgreement {
  exact: AgreementForms;
  withinHalfClass: AgreementForms;
}

/** Exact and within-half-class agreement of a count table, in the three forms. */
export function observedAgreement(t: CountTable): ObservedAgreement {
  const { q, rows, counts, totals, weights } = t;
  let units = 0;
  let unanimousExact = 0;
  let unanimousWithin = 0;
  let sumExact = 0;
  let sumWithin = 0;
  let pairsAll = 0;
  let pairsExact = 0;
  let pairsWithin = 0;
  let sqExact = 0;
  let sqWithin = 0;
  for (let i = 0; i < rows; i++) {
    const n = totals[i];
    const w = weights[i];
    if (n < 2 || w === 0) continue;
    const off = i * q;
    let lo = -1;
    let hi = -1;
    let same = 0;
    let near = 0;
    for (let j = 0; j < q; j++) {
      const c = counts[off + j];
      if (c === 0) continue;
      if (lo < 0) lo = j;
      hi = j;
      same += c * (c - 1);
      if (j + 1 < q) near += 2 * c * counts[off + j + 1];
    }
    const pairs = n * (n - 1);
    const pe = same / pairs;
    const pw = (same + near) / pairs;
    units += w;
    if (hi === lo) unanimousExact += w;
    if (hi - lo <= 1) unanimousWithin += w;
    sumExact += w * pe;
    sumWithin += w * pw;
    pairsAll += (w * pairs) / 2;
    pairsExact += (w * same) / 2;
    pairsWithin += (w * (same + near)) / 2;
    sqExact += w * pe * pe;
    sqWithin += w * pw * pw;
  }
  const meanStat = (sum: number, sq: number): StatResult => {
    if (units === 0) return undefinedStat(0, 'no assessment has two or more ratings');
    const mean = sum / units;
    // Sample variance of the per-assessment shares (weighted by frequency).
    const variance = units > 1 ? Math.max(0, (sq - units * mean * mean) / (units - 1)) : null;
    return definedStat(mean, variance === null ? null : Math.sqrt(variance / units), units);
  };
  const pooled = (k: number): StatResult =>
    pairsAll === 0 ? undefinedStat(0, 'no assessment has two or more ratings') : { value: k / pairsAll, se: null, ci95: null, n: units };
  const unanimous = (k: number): StatResult =>
    units === 0 ? undefinedStat(0, 'no assessment has two or more ratings') : proportionStat(k, units);
  return {
    exact: { unanimous: unanimous(unanimousExact), pairwiseMean: meanStat(sumExact, sqExact), pooledPairs: pooled(pairsExact) },
    withinHalfClass: {
      unanimous: unanimous(unanimousWithin),
      pairwiseMean: meanStat(sumWithin, sqWithin),
      pooledPairs: pooled(pairsWithin),
    },
  };
}

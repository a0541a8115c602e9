/**
 * Fleiss' kappa for panels (Fleiss 1971), overall and per class, with the null standard errors
 * of Fleiss, Nee & Landis (1979).
 *
 * Panels of varying size use the pooled-share generalisation (decision record 0001): over
 * assessments with n_i ≥ 2 ratings,
 *   P_i = Σ_j n_ij (n_ij − 1) / (n_i (n_i − 1)),   P̄ = mean P_i,
 *   p_j = Σ_i n_ij / Σ_i n_i,   P_e = Σ_j p_j²,   κ = (P̄ − P_e) / (1 − P_e).
 * Per class: κ_j = 1 − Σ_i n_ij (n_i − n_ij)/(n_i − 1) / (Σ_i n_i · p_j q_j)  (q_j = 1 − p_j).
 * With equal panels (n_i = n) both reduce exactly to Fleiss (1971).
 *
 * Null SE (Fleiss, Nee & Landis 1979), written for equal panels as
 *   SE0 = sqrt(2 / (N n (n − 1))) · sqrt((Σ p_j q_j)² − Σ p_j q_j (q_j − p_j)) / Σ p_j q_j,
 *   SE0_j = sqrt(2 / (N n (n − 1)));
 * for varying panels the factor 2/(N n(n − 1)) becomes Σ_i 2/(n_i(n_i − 1)) / N² (the null
 * variance of a mean of independent P_i), which is the same for equal panels.
 *
 * The SE is the null SE, meant for the test κ = 0; the Wald interval built from it is marked
 * `ciMethod: 'wald-null-se'` and is replaced by a bootstrap interval when one is requested.
 */
import type { CountTable } from './count-table';
import { finiteOrNull, undefinedStat, waldInterval, type StatResult } from './result';

export type CiMethod = 'wald' | 'wald-null-se' | 'wilson' | 'bootstrap-percentile';

export interface FleissKappaResult extends StatResult {
  se0: number | null;
  z: number | null;
  ciMethod: CiMethod | null;
  /** Mean observed agreement P̄. */
  observed: number | null;
  /** Chance agreement P_e. */
  expected: number | null;
  /** Class shares p_j (pooled over ratings). */
  shares: number[];
  /** Per-class kappa κ_j (null when p_j is 0 or 1). */
  byClass: StatResult[];
}

const EPS = 1e-12;

/** Per-table sums shared by the pooled Fleiss computations. */
interface FleissSums {
  units: number; // Σ w over units with n_i ≥ 2
  sumP: number; // Σ w P_i
  ratings: number; // Σ w n_i
  classRatings: Float64Array; // Σ w n_ij
  classDisagree: Float64Array; // Σ w n_ij (n_i − n_ij)/(n_i − 1)
  invPairs: number; // Σ w 2/(n_i(n_i − 1))
}

function fleissSums(t: CountTable): FleissSums {
  const { q, rows, counts, totals, weights } = t;
  const classRatings = new Float64Array(q);
  const classDisagree = new Float64Array(q);
  let units = 0;
  let sumP = 0;
  let ratings = 0;
  let invPairs = 0;
  for (let i = 0; i < rows; i++) {
    const n = totals[i];
    const w = weights[i];
    if (n < 2 || w === 0) continue;
    const off = i * q;
    let agree = 0;
    for (let j = 0; j < q; j++) {
      const c = counts[off + j];
      if (c === 0) continue;
      agree += c * (c - 1);
      classRatings[j] += w * c;
      classDisagree[j] += (w * c * (n - c)) / (n - 1);
    }
    const pairs = n * (n - 1);
    units += w;
    sumP += (w * agree) / pairs;
    ratings += w * n;
    invPairs += (2 * w) / pairs;
  }
  return { units, sumP, ratings, classRatings, classDisagree, invPairs };
}

/** Only the point estimate of the pooled Fleiss kappa (fast path for the bootstrap). */
export function fleissKappaValue(t: CountTable): number | null {
  const s = fleissSums(t);
  if (s.units === 0) return null;
  let pq = 0;
  for (let j = 0; j < t.q; j++) {
    const p = s.classRatings[j] / s.ratings;
    pq += p * (1 - p);
  }
  if (pq <= EPS) return null;
  const pBar = s.sumP / s.units;
  return (pBar - (1 - pq)) / pq;
}

/** Fleiss' kappa (pooled-share generalisation for panels of varying size) with per-class kappas. */
export function fleissKappa(t: CountTable): FleissKappaResult {
  const s = fleissSums(t);
  const q = t.q;
  const N = s.units;
  if (N === 0) {
    return {
      ...undefinedStat(0, 'no assessment has two or more ratings'),
      se0: null,
      z: null,
      ciMethod: null,
      observed: null,
      expected: null,
      shares: [],
      byClass: Array.from({ length: q }, () => undefinedStat(0, 'no assessment has two or more ratings')),
    };
  }
  const shares: number[] = [];
  let pq = 0;
  let pqqp = 0;
  for (let j = 0; j < q; j++) {
    const p = s.classRatings[j] / s.ratings;
    shares.push(p);
    pq += p * (1 - p);
    pqqp += p * (1 - p) * (1 - 2 * p);
  }
  const pBar = s.sumP / N;
  const factor = s.invPairs / (N * N);
  const byClass: StatResult[] = shares.map((p, j) => {
    const d = p * (1 - p);
    if (d <= EPS) return undefinedStat(N, p === 0 ? 'class not used' : 'every rating is this class');
    const k = 1 - s.classDisagree[j] / (s.ratings * d);
    const se0 = Math.sqrt(factor);
    return { value: k, se: se0, ci95: waldInterval(k, se0), n: N };
  });
  if (pq <= EPS) {
    return {
      ...undefinedStat(N, 'expected agreement is 1 (every rating is the same class)'),
      se0: null,
      z: null,
      ciMethod: null,
      observed: pBar,
      expected: 1,
      shares,
      byClass,
    };
  }
  const pe = 1 - pq;
  const kappa = (pBar - pe) / pq;
  const inner = pq * pq - pqqp;
  const se0 = inner >= 0 ? (Math.sqrt(factor) * Math.sqrt(inner)) / pq : null;
  const z = se0 !== null && se0 > 0 ? kappa / se0 : null;
  return {
    value: kappa,
    se: se0,
    ci95: waldInterval(kappa, se0),
    n: N,
    se0,
    z: z === null ? null : finiteOrNull(z),
    ciMethod: se0 === null ? null : 'wald-null-se',
    observed: pBar,
    expected: pe,
    shares,
    byClass,
  };
}

/**
 * The other generalisation of Fleiss' kappa to panels of varying size (Gwet 2014): chance
 * agreement from π_k = mean over units with ≥ 1 rating of r_ik / r_i. Kept for comparison and
 * tests; the product shows the pooled form (decision record 0001).
 */
export function fleissKappaMeanShares(t: CountTable): StatResult {
  const { q, rows, counts, totals, weights } = t;
  const s = fleissSums(t);
  if (s.units === 0) return undefinedStat(0, 'no assessment has two or more ratings');
  const pi = new Float64Array(q);
  let units1 = 0;
  for (let i = 0; i < rows; i++) {
    const n = totals[i];
    const w = weights[i];
    if (n < 1 || w === 0) continue;
    units1 += w;
    for (let j = 0; j < q; j++) pi[j] += (w * counts[i * q + j]) / n;
  }
  let pq = 0;
  for (let j = 0; j < q; j++) {
    const p = pi[j] / units1;
    pq += p * (1 - p);
  }
  if (pq <= EPS) return undefinedStat(s.units, 'expected agreement is 1 (every rating is the same class)');
  const pBar = s.sumP / s.units;
  return { value: (pBar - (1 - pq)) / pq, se: null, ci95: null, n: s.units };
}

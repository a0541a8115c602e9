/**
 * Cohen's kappa for two classifiers: unweighted (Cohen 1960) and weighted (Cohen 1968) with
 * agreement weights over the ordered classes of the full scale.
 *
 * Standard errors: the large-sample variance of Fleiss, Cohen & Everitt (1969) for the interval,
 * and their variance under κ = 0 ("null SE") for the test z = κ / SE0 (as SAS PROC FREQ does).
 * The 95% interval is Wald, κ ± 1.96·SE, not clipped to [−1, 1].
 *
 *   p_o = Σ w_ij p_ij,  p_e = Σ w_ij p_i. p_.j,  κ = (p_o − p_e) / (1 − p_e)
 *   w̄_i. = Σ_j p_.j w_ij,  w̄_.j = Σ_i p_i. w_ij
 *   Var  = [Σ p_ij (w_ij − (w̄_i. + w̄_.j)(1 − κ))² − (κ − p_e(1 − κ))²] / (N (1 − p_e)²)
 *   Var0 = [Σ p_i. p_.j (w_ij − (w̄_i. + w̄_.j))² − p_e²] / (N (1 − p_e)²)
 *
 * Undefined (value null) when 1 − p_e = 0, e.g. both classifiers gave one and the same class
 * to every athlete.
 */
import { definedStat, finiteOrNull, twoSidedP, undefinedStat, type StatResult } from './result';
import { agreementWeights, type Weighting } from './weights';

export interface KappaResult extends StatResult {
  /** Standard error under κ = 0 (Fleiss, Cohen & Everitt 1969). */
  se0: number | null;
  /** κ / SE0. */
  z: number | null;
  /** Two-sided p-value of z under the standard normal. */
  p: number | null;
  /** Observed (weighted) agreement p_o. */
  observed: number | null;
  /** Chance (weighted) agreement p_e. */
  expected: number | null;
}

const EPS = 1e-12;

/**
 * Kappa from a q × q contingency table (rows = classifier A's class, columns = B's; counts,
 * possibly fractional) and row-major agreement weights (identity for unweighted kappa).
 */
export function kappaFromTable(table: ArrayLike<number>, q: number, weights: ArrayLike<number>): KappaResult {
  let N = 0;
  for (let i = 0; i < q * q; i++) N += table[i];
  const none = (reason: string, n: number): KappaResult => ({
    ...undefinedStat(n, reason),
    se0: null,
    z: null,
    p: null,
    observed: null,
    expected: null,
  });
  if (N <= 0) return none('no shared assessments', 0);
  const row = new Float64Array(q);
  const col = new Float64Array(q);
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const p = table[i * q + j] / N;
      row[i] += p;
      col[j] += p;
    }
  }
  let po = 0;
  let pe = 0;
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const w = weights[i * q + j];
      po += (w * table[i * q + j]) / N;
      pe += w * row[i] * col[j];
    }
  }
  if (1 - pe <= EPS) {
    return { ...none('expected agreement is 1 (both classifiers used a single class and the same one)', N), observed: po, expected: pe };
  }
  const kappa = (po - pe) / (1 - pe);
  const wRow = new Float64Array(q);
  const wCol = new Float64Array(q);
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const w = weights[i * q + j];
      wRow[i] += col[j] * w;
      wCol[j] += row[i] * w;
    }
  }
  let s = 0;
  let s0 = 0;
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const w = weights[i * q + j];
      const pij = table[i * q + j] / N;
      const a = w - (wRow[i] + wCol[j]) * (1 - kappa);
      s += pij * a * a;
      const b = w - (wRow[i] + wCol[j]);
      s0 += row[i] * col[j] * b * b;
    }
  }
  const denom = N * (1 - pe) * (1 - pe);
  const t = kappa - pe * (1 - kappa);
  const v = (s - t * t) / denom;
  const v0 = (s0 - pe * pe) / denom;
  const se = sqrtNonNegative(v);
  const se0 = sqrtNonNegative(v0);
  const z = se0 !== null && se0 > 0 ? kappa / se0 : null;
  return {
    ...definedStat(kappa, se, N),
    se0,
    z: z === null ? null : finiteOrNull(z),
    p: z === null ? null : finiteOrNull(twoSidedP(z)),
    observed: po,
    expected: pe,
  };
}

/**
 * Square root of a variance computed as a difference of sums: a true variance of 0 comes out
 * as ±1e-17 or so, whose root (3e-9) would be noise, so values within rounding of 0 count as 0.
 */
function sqrtNonNegative(v: number): number | null {
  if (!Number.isFinite(v)) return null;
  if (Math.abs(v) < 1e-14) return 0;
  if (v < 0) return null;
  return Math.sqrt(v);
}

/** Cohen's kappa with one of the standard weightings over q ordered classes. */
export function cohenKappa(table: ArrayLike<number>, q: number, weighting: Weighting = 'unweighted'): KappaResult {
  return kappaFromTable(table, q, agreementWeights(q, weighting));
}

/** A q × q table from two aligned lists of class indices (null = not rated; such pairs are skipped). */
export function contingencyTable(a: readonly (number | null)[], b: readonly (number | null)[], q: number): Float64Array {
  const t = new Float64Array(q * q);
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    const y = b[i];
    if (x === null || y === null || x === undefined || y === undefined) continue;
    t[x * q + y]++;
  }
  return t;
}

/**
 * Gwet's AC1 (Gwet 2008, "Computing inter-rater reliability and its variance in the presence
 * of high agreement", Br. J. Math. Stat. Psychol. 61, 29–48) and its weighted form AC2
 * (Gwet 2014, Handbook of Inter-Rater Reliability, 4th ed., ch. 2–3), for any number of
 * classifiers per assessment and missing ratings.
 *
 * With agreement weights w (identity for AC1) and q = the number of classes of the scale
 * (used or not):
 *   r*_ik = Σ_l w_kl r_il,
 *   p_a = mean over units with r_i ≥ 2 of Σ_k r_ik (r*_ik − 1) / (r_i (r_i − 1)),
 *   π_k = mean over units with r_i ≥ 1 of r_ik / r_i,
 *   p_e = T_w / (q (q − 1)) · Σ_k π_k (1 − π_k),  T_w = Σ_kl w_kl,
 *   AC = (p_a − p_e) / (1 − p_e).
 * Variance: Gwet's linearisation (Gwet 2008, eq. for multiple raters; Gwet 2014 §5), with
 * sampling fraction 0:
 *   p_a|i = (n / n₂) Σ_k r_ik (r*_ik − 1) / (r_i (r_i − 1)) if r_i ≥ 2, else 0,
 *   ac_i = (p_a|i − p_e) / (1 − p_e),
 *   p_e|i = T_w / (q(q − 1)) · Σ_k r_ik (1 − π_k) / r_i,
 *   ac*_i = ac_i − 2 (1 − AC)(p_e|i − p_e) / (1 − p_e),
 *   Var = Σ_i (ac*_i − AC)² / (n (n − 1)).
 * The SE is advisory (a linearisation, not validated here against a printed example).
 */
import type { CountTable } from './count-table';
import { definedStat, undefinedStat, type StatResult } from './result';
import { agreementWeights, type Weighting } from './weights';

export interface GwetResult extends StatResult {
  observed: number | null;
  expected: number | null;
  /** The SE is Gwet's linearisation: advisory. */
  seAdvisory: true;
}

/** Gwet's AC1 (weights = identity) or AC2 (linear / quadratic weights) of a count table. */
export function gwetAC(t: CountTable, weighting: Weighting = 'unweighted', wMatrix?: ArrayLike<number>): GwetResult {
  const { q, rows, counts, totals, weights } = t;
  const W = wMatrix ?? agreementWeights(q, weighting);
  let Tw = 0;
  for (let i = 0; i < q * q; i++) Tw += W[i];
  const pi = new Float64Array(q);
  let n = 0;
  let n2 = 0;
  let sumPa = 0;
  const paUnit = new Float64Array(rows);
  const star = new Float64Array(q);
  for (let i = 0; i < rows; i++) {
    const r = totals[i];
    const w = weights[i];
    if (r < 1 || w === 0) continue;
    const off = i * q;
    n += w;
    for (let k = 0; k < q; k++) pi[k] += (w * counts[off + k]) / r;
    if (r < 2) continue;
    n2 += w;
    let s = 0;
    for (let k = 0; k < q; k++) {
      const rk = counts[off + k];
      if (rk === 0) continue;
      let st = 0;
      for (let l = 0; l < q; l++) st += W[k * q + l] * counts[off + l];
      star[k] = st;
      s += rk * (st - 1);
    }
    const pa = s / (r * (r - 1));
    paUnit[i] = pa;
    sumPa += w * pa;
  }
  const base = { observed: null, expected: null, seAdvisory: true as const };
  if (n2 === 0) return { ...undefinedStat(0, 'no assessment has two or more ratings'), ...base };
  for (let k = 0; k < q; k++) pi[k] = pi[k] / n;
  let spq = 0;
  for (let k = 0; k < q; k++) spq += pi[k] * (1 - pi[k]);
  const c = q > 1 ? Tw / (q * (q - 1)) : 0;
  const pe = c * spq;
  const pa = sumPa / n2;
  if (1 - pe <= 1e-12) return { ...undefinedStat(n2, 'expected agreement is 1'), ...base, observed: pa, expected: pe };
  const ac = (pa - pe) / (1 - pe);
  // Linearised variance over all rated units.
  let ss = 0;
  if (n > 1) {
    for (let i = 0; i < rows; i++) {
      const r = totals[i];
      const w = weights[i];
      if (r < 1 || w === 0) continue;
      const off = i * q;
      // p_a|i = (n / n₂) · (unit agreement) for r_i ≥ 2, else 0, so that its mean over the n units is p_a.
      const aci = ((r >= 2 ? (n / n2) * paUnit[i] : 0) - pe) / (1 - pe);
      let pei = 0;
      for (let k = 0; k < q; k++) pei += (counts[off + k] * (1 - pi[k])) / r;
      pei *= c;
      const x = aci - (2 * (1 - ac) * (pei - pe)) / (1 - pe) - ac;
      ss += w * x * x;
    }
  }
  const se = n > 1 ? Math.sqrt(ss / (n * (n - 1))) : null;
  return { ...definedStat(ac, se, n2), observed: pa, expected: pe, seAdvisory: true };
}

/** Point estimate only (bootstrap fast path). */
export function gwetACValue(t: CountTable, weighting: Weighting = 'unweighted'): number | null {
  return gwetAC(t, weighting).value;
}

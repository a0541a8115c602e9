/**
 * Krippendorff's alpha (Krippendorff 2011, "Computing Krippendorff's Alpha-Reliability",
 * Annenberg School for Communication, University of Pennsylvania), via the coincidence matrix.
 *
 * Only pairable units count (m_u ≥ 2 values; panels of one are ignored). Coincidences
 *   o_ck = Σ_u n_uc (n_uk − [c = k]) / (m_u − 1),  n_c = Σ_k o_ck,  n = Σ_c n_c,
 *   α = 1 − D_o / D_e,  D_o = (1/n) Σ o_ck δ²_ck,  D_e = (1/(n(n − 1))) Σ n_c n_k δ²_ck.
 * Metrics: nominal δ² = [c ≠ k]; ordinal δ²_ck = (Σ_{g=c..k} n_g − (n_c + n_k)/2)²;
 * interval (v_c − v_k)²; ratio ((v_c − v_k)/(v_c + v_k))², with v the class values (sport
 * class points). Undefined when D_e = 0 (a single class used, or fewer than two pairable values).
 * There is no closed-form standard error; a bootstrap interval is added when requested.
 */
import type { CountTable } from './count-table';
import { undefinedStat, type StatResult } from './result';

export type AlphaMetric = 'nominal' | 'ordinal' | 'interval' | 'ratio';

export interface AlphaResult extends StatResult {
  /** Pairable units (assessments with ≥ 2 ratings). */
  units: number;
  observedDisagreement: number | null;
  expectedDisagreement: number | null;
}

/** The q × q coincidence matrix of a count table, and its marginals. */
export function coincidenceMatrix(t: CountTable): { o: Float64Array; marginals: Float64Array; n: number; units: number } {
  const { q, rows, counts, totals, weights } = t;
  const o = new Float64Array(q * q);
  let units = 0;
  for (let i = 0; i < rows; i++) {
    const m = totals[i];
    const w = weights[i];
    if (m < 2 || w === 0) continue;
    units += w;
    const off = i * q;
    const f = w / (m - 1);
    for (let c = 0; c < q; c++) {
      const nc = counts[off + c];
      if (nc === 0) continue;
      for (let k = 0; k < q; k++) {
        const nk = counts[off + k];
        if (nk === 0) continue;
        o[c * q + k] += f * nc * (c === k ? nk - 1 : nk);
      }
    }
  }
  const marginals = new Float64Array(q);
  let n = 0;
  for (let c = 0; c < q; c++) {
    let s = 0;
    for (let k = 0; k < q; k++) s += o[c * q + k];
    marginals[c] = s;
    n += s;
  }
  return { o, marginals, n, units };
}

/** Squared distances δ²_ck for a metric, given class values and coincidence marginals. */
export function alphaDistances(metric: AlphaMetric, values: ArrayLike<number>, marginals: ArrayLike<number>): Float64Array {
  const q = marginals.length;
  const d = new Float64Array(q * q);
  for (let c = 0; c < q; c++) {
    for (let k = 0; k < q; k++) {
      let x = 0;
      if (c === k) x = 0;
      else if (metric === 'nominal') x = 1;
      else if (metric === 'interval') x = (values[c] - values[k]) ** 2;
      else if (metric === 'ratio') {
        const s = values[c] + values[k];
        x = s === 0 ? 0 : ((values[c] - values[k]) / s) ** 2;
      } else {
        const lo = Math.min(c, k);
        const hi = Math.max(c, k);
        let g = 0;
        for (let h = lo; h <= hi; h++) g += marginals[h];
        x = (g - (marginals[c] + marginals[k]) / 2) ** 2;
      }
      d[c * q + k] = x;
    }
  }
  return d;
}

/**
 * Krippendorff's alpha of a count table. `values` are the numeric class values used by the
 * interval and ratio metrics (defaults to 0 … q − 1; pass sport-class points for ratio).
 */
export function krippendorffAlpha(t: CountTable, metric: AlphaMetric, values?: ArrayLike<number>): AlphaResult {
  const q = t.q;
  const vals = values ?? Float64Array.from({ length: q }, (_, i) => i);
  const { o, marginals, n, units } = coincidenceMatrix(t);
  const none = (reason: string): AlphaResult => ({
    ...undefinedStat(n, reason),
    units,
    observedDisagreement: null,
    expectedDisagreement: null,
  });
  if (n < 2) return none('fewer than two pairable ratings');
  const d = alphaDistances(metric, vals, marginals);
  let obs = 0;
  let exp = 0;
  for (let c = 0; c < q; c++) {
    for (let k = 0; k < q; k++) {
      const x = d[c * q + k];
      if (x === 0) continue;
      obs += o[c * q + k] * x;
      exp += marginals[c] * marginals[k] * x;
    }
  }
  const Do = obs / n;
  const De = exp / (n * (n - 1));
  if (!(De > 1e-15))
    return { ...none('expected disagreement is 0 (a single class was used)'), observedDisagreement: Do, expectedDisagreement: 0 };
  return { value: 1 - Do / De, se: null, ci95: null, n, units, observedDisagreement: Do, expectedDisagreement: De };
}

/** Point estimate only (bootstrap fast path). */
export function krippendorffAlphaValue(t: CountTable, metric: AlphaMetric, values?: ArrayLike<number>): number | null {
  return krippendorffAlpha(t, metric, values).value;
}

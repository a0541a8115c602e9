/**
 * Drift detector: one-sided tabular CUSUM (Page 1954, "Continuous inspection schemes",
 * Biometrika 41:100–115; tabular form as in Montgomery, Introduction to Statistical Quality
 * Control, ch. 9) on a classifier's chronological deviations from the rest of the panel.
 *
 * With standardised deviations z_t = (x_t − target) / σ:
 *   upper  S⁺_t = max(0, S⁺_{t−1} + z_t − k)   (the classifier drifts to rating higher)
 *   lower  S⁻_t = max(0, S⁻_{t−1} − z_t − k)   (drifts to rating lower)
 * An alarm is raised when a sum exceeds h; the sum then restarts at 0. Defaults k = 0.5,
 * h = 5 (in σ units: tuned to a shift of one σ; in-control average run length ≈ 930 ratings
 * per side), target 0 (no bias), σ = the standard deviation of all deviations of the data set
 * (not the classifier's own, which a drift would inflate). See decision record 0002.
 */
import { sampleStandardDeviation } from 'simple-statistics';
import { classifierDeviations, othersMedian } from './classifier-panel';
import { dayToIsoDate, type RatingSet } from './rating-set';

export interface CusumOptions {
  /** In-control mean of the deviations (default 0). */
  target?: number;
  /** Scale of the deviations; required by `cusum`, estimated by `classifierDrift` if absent. */
  sigma?: number;
  /** Allowance in σ units (default 0.5). */
  k?: number;
  /** Decision interval in σ units (default 5). */
  h?: number;
  /** Which side(s) to watch (default both, as two one-sided charts). */
  direction?: 'up' | 'down' | 'both';
}

export interface CusumAlarm {
  /** Position in the series. */
  index: number;
  direction: 'up' | 'down';
  statistic: number;
}

export interface CusumResult {
  k: number;
  h: number;
  target: number;
  sigma: number;
  upper: Float64Array;
  lower: Float64Array;
  alarms: CusumAlarm[];
  firstAlarm: CusumAlarm | null;
}

export function cusum(values: ArrayLike<number>, options: CusumOptions & { sigma: number }): CusumResult {
  const k = options.k ?? 0.5;
  const h = options.h ?? 5;
  const target = options.target ?? 0;
  const sigma = options.sigma > 0 ? options.sigma : 1;
  const dir = options.direction ?? 'both';
  const n = values.length;
  const upper = new Float64Array(n);
  const lower = new Float64Array(n);
  const alarms: CusumAlarm[] = [];
  let sp = 0;
  let sm = 0;
  for (let t = 0; t < n; t++) {
    const z = (values[t] - target) / sigma;
    sp = Math.max(0, sp + z - k);
    sm = Math.max(0, sm - z - k);
    upper[t] = sp;
    lower[t] = sm;
    if (dir !== 'down' && sp > h) {
      alarms.push({ index: t, direction: 'up', statistic: sp });
      sp = 0;
    }
    if (dir !== 'up' && sm > h) {
      alarms.push({ index: t, direction: 'down', statistic: sm });
      sm = 0;
    }
  }
  return { k, h, target, sigma, upper, lower, alarms, firstAlarm: alarms[0] ?? null };
}

export interface DriftResult extends CusumResult {
  code: string;
  /** Ratings in the series. */
  n: number;
  /** ISO date per position of the series. */
  dates: string[];
  /** Deviations (points) in chronological order. */
  deviations: Float64Array;
  /** First alarm with its date and assessment, or null. */
  alarm: { index: number; date: string; assessmentId: string; direction: 'up' | 'down' } | null;
}

/** CUSUM of one classifier's chronological deviations from the others' median. */
export function classifierDrift(set: RatingSet, classifierCode: string, options: CusumOptions = {}): DriftResult {
  const medians = othersMedian(set);
  let sigma = options.sigma;
  if (sigma === undefined) {
    const all: number[] = [];
    for (let p = 0; p < set.ratingCount; p++) if (!Number.isNaN(medians[p])) all.push((set.ratingClass[p] - medians[p]) / 2);
    const s = all.length > 1 ? sampleStandardDeviation(all) : 0;
    sigma = s > 0 ? s : 0.25; // a quarter point when nobody ever deviates
  }
  const series = classifierDeviations(set, classifierCode, medians);
  const result = cusum(series.deviation, { ...options, sigma });
  const first = result.firstAlarm;
  return {
    ...result,
    code: classifierCode,
    n: series.deviation.length,
    dates: Array.from(series.day, (d) => dayToIsoDate(d)),
    deviations: series.deviation,
    alarm: first
      ? {
          index: first.index,
          date: dayToIsoDate(series.day[first.index]),
          assessmentId: set.assessmentIds[series.assessment[first.index]],
          direction: first.direction,
        }
      : null,
  };
}

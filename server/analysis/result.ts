/**
 * The common shape of every statistic the engine returns, and small helpers for it.
 *
 * A statistic is either defined (`value` is a finite number) or undefined (`value: null` and a
 * `reason` in plain words, e.g. "expected agreement is 1"). The engine never returns NaN or
 * an infinite value, and never replaces an undefined statistic by a made-up 0 or 1.
 */
import jstatModule from 'jstat';

const { jStat } = jstatModule;

export type Interval = [number, number];

export interface StatResult {
  /** The estimate, or null when the statistic is undefined for these data. */
  value: number | null;
  /** Large-sample standard error, when the statistic has one and it is defined. */
  se: number | null;
  /** 95% confidence interval (Wald or bootstrap percentile, as documented per statistic). */
  ci95: Interval | null;
  /** Number of units the statistic was computed over (documented per statistic). */
  n: number;
  /** Why `value` is null (present only then, or when the interval is missing for a reason). */
  reason?: string;
}

/** The standard normal quantile for a two-sided 95% interval (jstat normal.inv(0.975, 0, 1)). */
export const Z95: number = jStat.normal.inv(0.975, 0, 1);

/** Standard normal quantile (jstat `normal.inv(p, 0, 1)`). */
export function normalQuantile(p: number): number {
  return jStat.normal.inv(p, 0, 1);
}

/** Two-sided p-value of a z statistic under the standard normal (jstat `normal.cdf`). */
export function twoSidedP(z: number): number {
  return 2 * (1 - jStat.normal.cdf(Math.abs(z), 0, 1));
}

/** A finite number or null: the only way numbers leave the engine. */
export function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

export function undefinedStat(n: number, reason: string): StatResult {
  return { value: null, se: null, ci95: null, n, reason };
}

/** Wald interval value ± z·se, not clipped to [−1, 1]. */
export function waldInterval(value: number, se: number | null): Interval | null {
  if (se === null || !Number.isFinite(se)) return null;
  return [value - Z95 * se, value + Z95 * se];
}

/** A defined statistic with optional standard error and a Wald interval from it. */
export function definedStat(value: number, se: number | null, n: number): StatResult {
  const v = finiteOrNull(value);
  if (v === null) return undefinedStat(n, 'not a finite number');
  const s = se === null ? null : finiteOrNull(se);
  return { value: v, se: s, ci95: s === null ? null : waldInterval(v, s), n };
}

/** Proportion k/n with a Wilson score interval (Wilson 1927), undefined when n = 0. */
export function proportionStat(k: number, n: number): StatResult {
  if (n <= 0) return undefinedStat(0, 'no units to compare');
  const p = k / n;
  const z = Z95;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n))) / denom;
  const lo = k === 0 ? 0 : Math.max(0, centre - half);
  const hi = k === n ? 1 : Math.min(1, centre + half);
  return { value: p, se: Math.sqrt((p * (1 - p)) / n), ci95: [lo, hi], n };
}

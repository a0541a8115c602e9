/**
 * Nonparametric bootstrap over assessments (Efron & Tibshirani 1993, An Introduction to the
 * Bootstrap, ch. 6 and 13: percentile interval).
 *
 * Each replicate draws N assessments with replacement from the N assessments of the table
 * (seeded mulberry32, so the same seed gives the same interval) and recomputes the statistic.
 * No objects are rebuilt: identical count-table rows are merged into patterns once, a replicate
 * is just a vector of pattern weights (how often each pattern was drawn), and the statistic
 * reads the table with those weights. Replicates where the statistic is undefined are counted
 * and left out of the percentiles.
 */
import { quantileSorted } from 'simple-statistics';
import { compressPatterns, withWeights, type CountTable, type PatternTable } from './count-table';
import type { Interval } from './result';

export interface BootstrapOptions {
  /** Number of resamples (default 1000). */
  B?: number;
  /** Seed of the generator (default 1). */
  seed?: number;
}

export interface BootstrapResult {
  B: number;
  seed: number;
  /** Percentile 95% interval over the defined replicates; null if fewer than 2 were defined. */
  ci95: Interval | null;
  /** Standard deviation of the defined replicates. */
  se: number | null;
  /** Replicates in which the statistic was undefined. */
  undefinedReplicates: number;
}

/**
 * Bootstraps any statistic of unit "patterns": `frequency[k]` units have pattern k, and
 * `stat(weights)` evaluates the statistic when pattern k is taken `weights[k]` times.
 */
export function bootstrapPatterns(
  frequency: ArrayLike<number>,
  stat: (weights: Int32Array) => number | null,
  options: BootstrapOptions = {},
): BootstrapResult {
  const B = options.B ?? 1000;
  const seed = options.seed ?? 1;
  const K = frequency.length;
  let N = 0;
  for (let k = 0; k < K; k++) N += frequency[k];
  const unitPattern = new Int32Array(N);
  for (let k = 0, u = 0; k < K; k++) for (let f = 0; f < frequency[k]; f++) unitPattern[u++] = k;
  const values = new Float64Array(B);
  let defined = 0;
  let undefinedReplicates = 0;
  const weights = new Int32Array(K);
  // mulberry32, inlined for speed (same sequence as prng.ts); uint32 → index in [0, N).
  let state = seed >>> 0;
  const toIndex = N / 4294967296;
  for (let b = 0; b < B; b++) {
    weights.fill(0);
    for (let t = 0; t < N; t++) {
      state = (state + 0x6d2b79f5) | 0;
      let x = state;
      x = Math.imul(x ^ (x >>> 15), x | 1);
      x ^= x + Math.imul(x ^ (x >>> 7), x | 61);
      const u = (x ^ (x >>> 14)) >>> 0;
      weights[unitPattern[(u * toIndex) | 0]]++;
    }
    const v = N === 0 ? null : stat(weights);
    if (v === null || !Number.isFinite(v)) undefinedReplicates++;
    else values[defined++] = v;
  }
  const sorted = Array.from(values.subarray(0, defined)).sort((x, y) => x - y);
  let se: number | null = null;
  if (defined > 1) {
    let m = 0;
    for (const v of sorted) m += v;
    m /= defined;
    let s = 0;
    for (const v of sorted) s += (v - m) * (v - m);
    se = Math.sqrt(s / (defined - 1));
  }
  const ci95: Interval | null = defined >= 2 ? [quantileSorted(sorted, 0.025), quantileSorted(sorted, 0.975)] : null;
  return { B, seed, ci95, se, undefinedReplicates };
}

/** Bootstraps a statistic of a count table, resampling its rows (assessments). */
export function bootstrapCountTable(
  table: CountTable,
  stat: (t: CountTable) => number | null,
  options: BootstrapOptions = {},
): BootstrapResult {
  const patterns: PatternTable = compressPatterns(table, 1);
  return bootstrapPatterns(patterns.weights, (w) => stat(withWeights(patterns, w)), options);
}

/** Bootstraps several statistics of one count table with the same resamples. */
export function bootstrapCountTableMany<K extends string>(
  table: CountTable,
  stats: Record<K, (t: CountTable) => number | null>,
  options: BootstrapOptions = {},
): Record<K, BootstrapResult> {
  const patterns = compressPatterns(table, 1);
  const keys = Object.keys(stats) as K[];
  const collected = new Map<K, number[]>(keys.map((k) => [k, []]));
  const undef = new Map<K, number>(keys.map((k) => [k, 0]));
  // One pass of resamples; each statistic reads the same weights.
  bootstrapPatterns(
    patterns.weights,
    (w) => {
      const t = withWeights(patterns, w);
      for (const k of keys) {
        const v = stats[k](t);
        if (v === null || !Number.isFinite(v)) undef.set(k, undef.get(k)! + 1);
        else collected.get(k)!.push(v);
      }
      return 0;
    },
    options,
  );
  const out = {} as Record<K, BootstrapResult>;
  for (const k of keys) {
    const sorted = collected.get(k)!.sort((x, y) => x - y);
    const n = sorted.length;
    let se: number | null = null;
    if (n > 1) {
      const m = sorted.reduce((s, v) => s + v, 0) / n;
      se = Math.sqrt(sorted.reduce((s, v) => s + (v - m) * (v - m), 0) / (n - 1));
    }
    out[k] = {
      B: options.B ?? 1000,
      seed: options.seed ?? 1,
      ci95: n >= 2 ? [quantileSorted(sorted, 0.025), quantileSorted(sorted, 0.975)] : null,
      se,
      undefinedReplicates: undef.get(k)!,
    };
  }
  return out;
}

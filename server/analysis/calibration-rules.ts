/**
 * The three calibration rules (`bias`, `drift`, `agreement`) as written statistical tests, with
 * the Benjamini–Hochberg step-up procedure across the roster (Benjamini & Hochberg 1995, JRSS B
 * 57:289–300). Pure: a RatingSet and the lead's thresholds in, one verdict per classifier out.
 * Decision record 0008 gives the reasoning and the simulated false-flag rates and power.
 *
 * Every rule reads the classifier's chronological deviation series d_t = own class − median of
 * the other panel members' classes (points, + = rates higher; `classifierDeviations`).
 *
 * - bias: over the classifier's last `biasWindow` ratings, a one-sample t test of mean d = 0
 *   (two-sided, Student t with n − 1 degrees of freedom, jstat `studentt.cdf`). Met when the
 *   BH-adjusted p-value is ≤ `falseDiscoveryRate` and |mean| ≥ `biasMin` points.
 * - drift: a change in the classifier's own level, relative to their own earlier ratings. On
 *   the whole series (or the ratings after a closed drift flag), the least-squares single
 *   change-point statistic T = max over m ≤ k ≤ n − m of |S_k| / √(k(n − k)/n), with
 *   S_k = Σ_{i≤k}(d_i − d̄) (a two-segment mean-shift statistic; e.g. Csörgő & Horváth 1997,
 *   Limit Theorems in Change-Point Analysis, ch. 1), m = `DRIFT_MIN_SEGMENT`. Its null is the
 *   permutation distribution of the series (the order of the ratings carries no information
 *   when the level does not change), estimated by Monte Carlo with the sequential stopping rule
 *   of Besag & Clifford (1991, Biometrika 78:301–304): stop after `h` permutations at least as
 *   extreme, p = h / l; otherwise p = (g + 1) / (B + 1). A constant lean leaves T unchanged,
 *   so a steady lean never raises it. The argmax k estimates the change: the first rating after
 *   it, the mean before and after, n before and after. Met when the BH-adjusted p ≤
 *   `falseDiscoveryRate` and |after − before| ≥ `driftMin` points.
 * - agreement: over the classifier's last `agreementWindow` ratings, the share of the other
 *   panel members who gave the same class, per rating (a_t ∈ [0, 1]), against the same share
 *   for pairs of the other classifiers (not involving this one) on the assessments of the same
 *   dates, one value per assessment. One-sided Welch z test that the classifier's mean is lower;
 *   met when the BH-adjusted p ≤ `falseDiscoveryRate` and the shortfall ≥ `agreementGap`.
 *
 * Bias and agreement need at least `minRatings` ratings in their window; drift needs
 * 2 · DRIFT_MIN_SEGMENT ratings.
 */
import jstatModule from 'jstat';
import { classifierDeviations, othersMedian } from './classifier-panel';
import { mulberry32 } from './prng';
import { dayToIsoDate, type RatingSet } from './rating-set';
import { Z95, type Interval } from './result';

const { jStat } = jstatModule;

export interface CalibrationThresholds {
  /** Benjamini–Hochberg false-discovery rate per rule across the roster. */
  falseDiscoveryRate: number;
  biasMin: number;
  biasWindow: number;
  agreementGap: number;
  agreementWindow: number;
  driftMin: number;
  driftEnabled: boolean;
  minRatings: number;
}

/** Ratings at least on each side of an estimated change. */
export const DRIFT_MIN_SEGMENT = 10;
/** Monte Carlo permutations of the drift test at most, and the exceedances that stop it early. */
export const DRIFT_PERMUTATIONS = 1999;
export const DRIFT_STOP_AFTER = 20;

// ---------------------------------------------------------------------------------------------
// Building blocks

/**
 * Benjamini–Hochberg adjusted p-values (step-up; Benjamini & Hochberg 1995). Null entries
 * (tests not run) stay null and do not count towards m. Rejected at level q ⇔ adjusted ≤ q.
 */
export function benjaminiHochberg(p: readonly (number | null)[]): (number | null)[] {
  const idx = p.map((v, i) => [v, i] as const).filter((x): x is readonly [number, number] => x[0] !== null);
  const m = idx.length;
  const out: (number | null)[] = p.map(() => null);
  idx.sort((a, b) => a[0] - b[0]);
  let running = 1;
  for (let r = m - 1; r >= 0; r--) {
    const [v, i] = idx[r];
    running = Math.min(running, (v * m) / (r + 1));
    out[i] = running;
  }
  return out;
}

/** A one-sample t test of mean = 0: mean, standard error, 95 % interval, two-sided p. */
export function meanTest(values: ArrayLike<number>): { n: number; mean: number; se: number; ci95: Interval; p: number } | null {
  const n = values.length;
  if (n < 2) return null;
  let s = 0;
  for (let i = 0; i < n; i++) s += values[i];
  const mean = s / n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (values[i] - mean) ** 2;
  const sd = Math.sqrt(ss / (n - 1));
  const se = sd / Math.sqrt(n);
  const tq = jStat.studentt.inv(0.975, n - 1);
  if (se === 0) return { n, mean, se, ci95: [mean, mean], p: mean === 0 ? 1 : 0 };
  const t = mean / se;
  const p = 2 * (1 - jStat.studentt.cdf(Math.abs(t), n - 1));
  return { n, mean, se, ci95: [mean - tq * se, mean + tq * se], p: Math.min(1, Math.max(0, p)) };
}

/** Least-squares change-point statistic and its argmax (see the module comment). */
export function changePointStatistic(x: ArrayLike<number>, minSegment: number): { statistic: number; k: number } {
  const n = x.length;
  let total = 0;
  for (let i = 0; i < n; i++) total += x[i];
  const mean = total / n;
  let s = 0;
  let best = -1;
  let bestK = -1;
  for (let k = 1; k < n; k++) {
    s += x[k - 1] - mean;
    if (k < minSegment || n - k < minSegment) continue;
    const v = Math.abs(s) / Math.sqrt((k * (n - k)) / n);
    if (v > best + 1e-12) {
      best = v;
      bestK = k;
    }
  }
  return { statistic: best, k: bestK };
}

export interface ChangePoint {
  n: number;
  statistic: number;
  /** Monte Carlo permutation p-value (Besag & Clifford 1991). */
  p: number;
  permutations: number;
  /** Ratings before the estimated change (the change is between rating k and k + 1). */
  k: number;
  meanBefore: number;
  meanAfter: number;
}

/** Permutation test for one change in the mean of `x` (module comment). Null when too short. */
export function changePointTest(x: ArrayLike<number>, seed: number, minSegment = DRIFT_MIN_SEGMENT): ChangePoint | null {
  const n = x.length;
  if (n < 2 * minSegment) return null;
  const observed = changePointStatistic(x, minSegment);
  if (observed.k < 0) return null;
  let before = 0;
  for (let i = 0; i < observed.k; i++) before += x[i];
  let all = before;
  for (let i = observed.k; i < n; i++) all += x[i];
  const meanBefore = before / observed.k;
  const meanAfter = (all - before) / (n - observed.k);
  const base = { n, statistic: observed.statistic, k: observed.k, meanBefore, meanAfter };
  // A series with no variation cannot change.
  if (!(observed.statistic > 1e-12)) return { ...base, p: 1, permutations: 0 };
  const rng = mulberry32(seed);
  const work = Float64Array.from(x);
  let exceed = 0;
  let l = 0;
  while (l < DRIFT_PERMUTATIONS) {
    for (let i = n - 1; i > 0; i--) {
      const j = rng.nextInt(i + 1);
      const t = work[i];
      work[i] = work[j]!;
      work[j] = t;
    }
    l++;
    if (changePointStatistic(work, minSegment).statistic >= observed.statistic - 1e-12) exceed++;
    if (exceed >= DRIFT_STOP_AFTER) return { ...base, p: exceed / l, permutations: l };
  }
  return { ...base, p: (exceed + 1) / (l + 1), permutations: l };
}

/** A 32-bit hash of a text (FNV-1a), to seed a classifier's permutations by their code. */
export function hashSeed(text: string, seed = 0): number {
  let h = (0x811c9dc5 ^ seed) >>> 0;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h >>> 0;
}

// ---------------------------------------------------------------------------------------------
// The rules on a federation

export interface RuleWindow {
  /** Ratings the figure rests on, and all the classifier's panel ratings. */
  n: number;
  total: number;
  from: string | null;
  to: string | null;
}

export interface BiasVerdict extends RuleWindow {
  mean: number | null;
  ci95: Interval | null;
  p: number | null;
  pAdjusted: number | null;
  met: boolean;
  reason?: string;
}

export interface AgreementVerdict extends RuleWindow {
  /** Share of the other members giving the same class, per rating, averaged. */
  rate: number | null;
  ci95: Interval | null;
  /** The same share for pairs of the other classifiers over the same dates. */
  othersRate: number | null;
  othersN: number;
  /** othersRate − rate (positive = below the others). */
  shortfall: number | null;
  p: number | null;
  pAdjusted: number | null;
  met: boolean;
  reason?: string;
}

export interface DriftVerdict extends RuleWindow {
  statistic: number | null;
  p: number | null;
  pAdjusted: number | null;
  permutations: number;
  /** ISO date of the first rating after the estimated change. */
  changeDate: string | null;
  /** Last rating date before the estimated change. */
  lastBefore: string | null;
  direction: 'up' | 'down' | null;
  meanBefore: number | null;
  meanAfter: number | null;
  nBefore: number;
  nAfter: number;
  met: boolean;
  reason?: string;
}

export interface ClassifierCalibration {
  code: string;
  bias: BiasVerdict;
  agreement: AgreementVerdict;
  drift: DriftVerdict;
}

export interface CalibrationOptions {
  /** Seed of the drift test's permutations (mixed with each classifier's code). */
  seed?: number;
  /** Per classifier: the drift test reads only ratings after this ISO date (a closed drift flag). */
  driftSince?: ReadonlyMap<string, string>;
  /** Classifiers to evaluate (default: every classifier with a rating in the set). */
  codes?: readonly string[];
  medians?: Float64Array;
}

/** The classifier's per-rating share of other members with the same class, chronologically. */
function agreementShares(set: RatingSet, ci: number, assessments: Int32Array): Float64Array {
  const out = new Float64Array(assessments.length);
  for (let i = 0; i < assessments.length; i++) {
    const a = assessments[i];
    let own = -1;
    for (let p = set.ratingStart[a]; p < set.ratingStart[a + 1]; p++) if (set.ratingClassifier[p] === ci) own = set.ratingClass[p]!;
    let same = 0;
    let others = 0;
    for (let p = set.ratingStart[a]; p < set.ratingStart[a + 1]; p++) {
      if (set.ratingClassifier[p] === ci) continue;
      others++;
      if (set.ratingClass[p] === own) same++;
    }
    out[i] = others > 0 ? same / others : 0;
  }
  return out;
}

/** Per assessment between two days without classifier `ci`'s rating: share of agreeing pairs of the others. */
function othersPairShares(set: RatingSet, ci: number, fromDay: number, toDay: number): number[] {
  const out: number[] = [];
  for (let a = 0; a < set.assessmentCount; a++) {
    const d = set.day[a];
    if (d < fromDay || d > toDay) continue;
    const s = set.ratingStart[a];
    const e = set.ratingStart[a + 1];
    let pairs = 0;
    let same = 0;
    for (let p = s; p < e; p++) {
      if (set.ratingClassifier[p] === ci) continue;
      for (let r = p + 1; r < e; r++) {
        if (set.ratingClassifier[r] === ci) continue;
        pairs++;
        if (set.ratingClass[p] === set.ratingClass[r]) same++;
      }
    }
    if (pairs > 0) out.push(same / pairs);
  }
  return out;
}

function meanVar(values: ArrayLike<number>): { mean: number; variance: number } {
  const n = values.length;
  let s = 0;
  for (let i = 0; i < n; i++) s += values[i];
  const mean = s / n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (values[i] - mean) ** 2;
  return { mean, variance: n > 1 ? ss / (n - 1) : 0 };
}

const iso = (day: number | undefined) => (day === undefined ? null : dayToIsoDate(day));

/** Evaluates the three rules for every classifier of the set, with BH control per rule. */
export function evaluateCalibration(set: RatingSet, th: CalibrationThresholds, options: CalibrationOptions = {}): ClassifierCalibration[] {
  const medians = options.medians ?? othersMedian(set);
  const seed = options.seed ?? 1;
  let codes = options.codes;
  if (!codes) {
    const used = new Uint8Array(set.classifierCodes.length);
    for (let p = 0; p < set.ratingCount; p++) used[set.ratingClassifier[p]] = 1;
    codes = set.classifierCodes.filter((_, i) => used[i] === 1);
  }
  const out: ClassifierCalibration[] = [];
  for (const code of [...codes].sort()) {
    const ci = set.classifierCodes.indexOf(code);
    const series = classifierDeviations(set, code, medians);
    const total = series.deviation.length;
    const whole = { total, n: 0, from: null, to: null };

    // bias
    const bStart = Math.max(0, total - th.biasWindow);
    const bDev = series.deviation.subarray(bStart);
    const bias: BiasVerdict = { ...whole, mean: null, ci95: null, p: null, pAdjusted: null, met: false };
    bias.n = bDev.length;
    bias.from = iso(series.day[bStart]);
    bias.to = iso(series.day[total - 1]);
    if (bDev.length < Math.max(2, th.minRatings)) bias.reason = `fewer than ${th.minRatings} ratings in a panel`;
    else {
      const t = meanTest(bDev)!;
      bias.mean = t.mean;
      bias.ci95 = t.ci95;
      bias.p = t.p;
    }

    // agreement
    const aStart = Math.max(0, total - th.agreementWindow);
    const agreement: AgreementVerdict = {
      ...whole,
      rate: null,
      ci95: null,
      othersRate: null,
      othersN: 0,
      shortfall: null,
      p: null,
      pAdjusted: null,
      met: false,
    };
    agreement.n = total - aStart;
    agreement.from = iso(series.day[aStart]);
    agreement.to = iso(series.day[total - 1]);
    if (agreement.n < Math.max(2, th.minRatings) || ci < 0) agreement.reason = `fewer than ${th.minRatings} ratings in a panel`;
    else {
      const own = meanVar(agreementShares(set, ci, series.assessment.subarray(aStart)));
      const others = othersPairShares(set, ci, series.day[aStart], series.day[total - 1]);
      agreement.rate = own.mean;
      const se = Math.sqrt(own.variance / agreement.n);
      agreement.ci95 = [Math.max(0, own.mean - Z95 * se), Math.min(1, own.mean + Z95 * se)];
      if (others.length < 2) agreement.reason = 'too few assessments of the other classifiers over these dates';
      else {
        const o = meanVar(others);
        agreement.othersRate = o.mean;
        agreement.othersN = others.length;
        agreement.shortfall = o.mean - own.mean;
        const seDiff = Math.sqrt(own.variance / agreement.n + o.variance / others.length);
        agreement.p = seDiff > 0 ? 1 - jStat.normal.cdf((o.mean - own.mean) / seDiff, 0, 1) : own.mean < o.mean ? 0 : 1;
      }
    }

    // drift
    const since = options.driftSince?.get(code);
    let dStart = 0;
    if (since !== undefined) while (dStart < total && iso(series.day[dStart])! <= since) dStart++;
    const dDev = series.deviation.subarray(dStart);
    const drift: DriftVerdict = {
      ...whole,
      statistic: null,
      p: null,
      pAdjusted: null,
      permutations: 0,
      changeDate: null,
      lastBefore: null,
      direction: null,
      meanBefore: null,
      meanAfter: null,
      nBefore: 0,
      nAfter: 0,
      met: false,
    };
    drift.n = dDev.length;
    drift.from = iso(series.day[dStart]);
    drift.to = dDev.length > 0 ? iso(series.day[total - 1]) : null;
    if (!th.driftEnabled) drift.reason = 'the drift rule is switched off';
    else {
      const cp = changePointTest(dDev, hashSeed(code, seed));
      if (!cp) drift.reason = `fewer than ${2 * DRIFT_MIN_SEGMENT} ratings in a panel`;
      else {
        drift.statistic = cp.statistic;
        drift.p = cp.p;
        drift.permutations = cp.permutations;
        drift.nBefore = cp.k;
        drift.nAfter = cp.n - cp.k;
        drift.meanBefore = cp.meanBefore;
        drift.meanAfter = cp.meanAfter;
        drift.direction = cp.meanAfter > cp.meanBefore ? 'up' : cp.meanAfter < cp.meanBefore ? 'down' : null;
        drift.changeDate = iso(series.day[dStart + cp.k]);
        drift.lastBefore = iso(series.day[dStart + cp.k - 1]);
      }
    }
    out.push({ code, bias, agreement, drift });
  }

  const q = th.falseDiscoveryRate;
  const adjust = <T extends { p: number | null; pAdjusted: number | null }>(items: T[]) => {
    const adj = benjaminiHochberg(items.map((x) => x.p));
    items.forEach((x, i) => (x.pAdjusted = adj[i]!));
  };
  adjust(out.map((c) => c.bias));
  adjust(out.map((c) => c.agreement));
  adjust(out.map((c) => c.drift));
  for (const c of out) {
    const b = c.bias;
    b.met = b.pAdjusted !== null && b.pAdjusted <= q && b.mean !== null && Math.abs(b.mean) >= th.biasMin - 1e-12;
    const a = c.agreement;
    a.met = a.pAdjusted !== null && a.pAdjusted <= q && a.shortfall !== null && a.shortfall >= th.agreementGap - 1e-12;
    const d = c.drift;
    d.met =
      d.pAdjusted !== null &&
      d.pAdjusted <= q &&
      d.meanBefore !== null &&
      d.meanAfter !== null &&
      Math.abs(d.meanAfter - d.meanBefore) >= th.driftMin - 1e-12;
  }
  return out;
}

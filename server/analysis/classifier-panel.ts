/**
 * Each classifier against the panel.
 *
 * For every rating of the classifier in an assessment with ≥ 2 ratings, the reference is the
 * median of the other panel members' ratings (with an even number of others, the mean of the
 * two middle values, which can fall between two classes: a quarter point). Where the panel's
 * final class is recorded, the rating is also compared with it.
 *
 * - meanDeviation: mean of (rating − others' median), in sport-class points (0.5 = one class
 *   step); positive = the classifier rates higher than the rest of the panel. Wald interval
 *   from the sample standard deviation (simple-statistics).
 * - exactWithPanel / withinHalfWithPanel: share of ratings equal to the others' median /
 *   within one half-class of it (Wilson intervals).
 * - quadraticKappaWithPanel: Cohen's quadratically weighted kappa (Cohen 1968; SE Fleiss,
 *   Cohen & Everitt 1969) of the classifier's class against a reference class: the panel's
 *   final class where recorded, otherwise the others' median, and when that median falls
 *   between two classes it is rounded away from the classifier's own rating, so a tie never
 *   counts as agreement (decision record 0003).
 */
import { mean, sampleStandardDeviation } from 'simple-statistics';
import { kappaFromTable, type KappaResult } from './cohen-kappa';
import { definedStat, proportionStat, undefinedStat, type StatResult } from './result';
import type { RatingSet } from './rating-set';
import { agreementWeights } from './weights';

export interface PanelComparison {
  /** Ratings compared. */
  n: number;
  meanDeviation: StatResult;
  exact: StatResult;
  withinHalfClass: StatResult;
}

export interface ClassifierVsPanel {
  code: string;
  /** Ratings in assessments with ≥ 2 ratings. */
  n: number;
  /** All ratings by the classifier (including panels of one). */
  ratings: number;
  meanDeviation: StatResult;
  exactWithPanel: StatResult;
  withinHalfWithPanel: StatResult;
  quadraticKappaWithPanel: KappaResult;
  /** Against the panel's recorded final class (assessments where it is recorded). */
  withFinalClass: PanelComparison;
}

/** Per rating (position in the set): others' median in class-index units, NaN for panels of one. */
export function othersMedian(set: RatingSet): Float64Array {
  const out = new Float64Array(set.ratingCount).fill(Number.NaN);
  const { ratingStart, ratingClass } = set;
  let scratch = new Int32Array(16);
  for (let a = 0; a < set.assessmentCount; a++) {
    const s = ratingStart[a];
    const m = ratingStart[a + 1] - s;
    if (m < 2) continue;
    if (m > scratch.length) scratch = new Int32Array(m * 2);
    for (let i = 0; i < m; i++) {
      // insertion sort of the panel's classes
      const v = ratingClass[s + i];
      let j = i - 1;
      while (j >= 0 && scratch[j] > v) {
        scratch[j + 1] = scratch[j]!;
        j--;
      }
      scratch[j + 1] = v;
    }
    const k = m - 1; // number of others
    for (let i = 0; i < m; i++) {
      const v = ratingClass[s + i];
      let pos = 0;
      while (scratch[pos] !== v) pos++;
      const at = (idx: number): number => scratch[idx < pos ? idx : idx + 1];
      out[s + i] = k % 2 === 1 ? at((k - 1) / 2) : (at(k / 2 - 1) + at(k / 2)) / 2;
    }
  }
  return out;
}

/** Reference class for the kappa with the panel (see the module comment). */
function referenceClass(own: number, median: number, finalClass: number): number {
  if (finalClass >= 0) return finalClass;
  if (Number.isInteger(median)) return median;
  return own < median ? Math.ceil(median) : Math.floor(median);
}

interface Acc {
  ratings: number;
  devs: number[];
  exact: number;
  within: number;
  finalDevs: number[];
  finalExact: number;
  finalWithin: number;
  table: Float64Array;
}

function meanStat(values: number[]): StatResult {
  if (values.length === 0) return undefinedStat(0, 'no rating in a panel of two or more');
  const m = mean(values);
  const se = values.length > 1 ? sampleStandardDeviation(values) / Math.sqrt(values.length) : null;
  return definedStat(m, se, values.length);
}

/** Every classifier against the rest of the panel (and the final class where recorded). */
export function classifiersVsPanel(set: RatingSet, medians: Float64Array = othersMedian(set)): ClassifierVsPanel[] {
  const C = set.classifierCodes.length;
  const q = set.q;
  const acc: Acc[] = Array.from({ length: C }, () => ({
    ratings: 0,
    devs: [],
    exact: 0,
    within: 0,
    finalDevs: [],
    finalExact: 0,
    finalWithin: 0,
    table: new Float64Array(q * q),
  }));
  const { ratingAssessment, ratingClassifier, ratingClass, panelClass } = set;
  for (let p = 0; p < set.ratingCount; p++) {
    const c = acc[ratingClassifier[p]];
    c.ratings++;
    const med = medians[p];
    if (Number.isNaN(med)) continue;
    const own = ratingClass[p];
    const d = own - med;
    c.devs.push(d / 2);
    if (d === 0) c.exact++;
    if (Math.abs(d) <= 1) c.within++;
    const fin = panelClass[ratingAssessment[p]];
    if (fin >= 0) {
      const df = own - fin;
      c.finalDevs.push(df / 2);
      if (df === 0) c.finalExact++;
      if (Math.abs(df) <= 1) c.finalWithin++;
    }
    c.table[own * q + referenceClass(own, med, fin)]++;
  }
  const wq = agreementWeights(q, 'quadratic');
  const out: ClassifierVsPanel[] = [];
  for (let i = 0; i < C; i++) {
    const c = acc[i];
    if (c.ratings === 0) continue;
    const n = c.devs.length;
    out.push({
      code: set.classifierCodes[i],
      n,
      ratings: c.ratings,
      meanDeviation: meanStat(c.devs),
      exactWithPanel: n === 0 ? undefinedStat(0, 'no rating in a panel of two or more') : proportionStat(c.exact, n),
      withinHalfWithPanel: n === 0 ? undefinedStat(0, 'no rating in a panel of two or more') : proportionStat(c.within, n),
      quadraticKappaWithPanel: kappaFromTable(c.table, q, wq),
      withFinalClass: {
        n: c.finalDevs.length,
        meanDeviation: meanStat(c.finalDevs),
        exact: c.finalDevs.length === 0 ? undefinedStat(0, 'no final class recorded') : proportionStat(c.finalExact, c.finalDevs.length),
        withinHalfClass:
          c.finalDevs.length === 0 ? undefinedStat(0, 'no final class recorded') : proportionStat(c.finalWithin, c.finalDevs.length),
      },
    });
  }
  return out.sort((x, y) => (x.code < y.code ? -1 : x.code > y.code ? 1 : 0));
}

export interface DeviationSeries {
  code: string;
  /** Assessment index per deviation, in chronological order (date, then assessment order). */
  assessment: Int32Array;
  day: Int32Array;
  /** Rating − others' median, in points. */
  deviation: Float64Array;
}

/** A classifier's deviations from the others' median in chronological order. */
export function classifierDeviations(set: RatingSet, classifierCode: string, medians: Float64Array = othersMedian(set)): DeviationSeries {
  const ci = set.classifierCodes.indexOf(classifierCode);
  const items: number[] = [];
  if (ci >= 0) {
    for (let p = 0; p < set.ratingCount; p++) if (set.ratingClassifier[p] === ci && !Number.isNaN(medians[p])) items.push(p);
  }
  items.sort((x, y) => {
    const ax = set.ratingAssessment[x];
    const ay = set.ratingAssessment[y];
    return set.day[ax] - set.day[ay] || ax - ay;
  });
  return {
    code: classifierCode,
    assessment: Int32Array.from(items, (p) => set.ratingAssessment[p]),
    day: Int32Array.from(items, (p) => set.day[set.ratingAssessment[p]]),
    deviation: Float64Array.from(items, (p) => (set.ratingClass[p] - medians[p]) / 2),
  };
}

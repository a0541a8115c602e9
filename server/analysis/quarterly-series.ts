/**
 * Statistics by calendar quarter (e.g. Fleiss' kappa, Krippendorff's alpha or exact agreement
 * per quarter for the trend charts), and a classifier's mean signed deviation by quarter.
 * Quarters are calendar quarters of the assessment date (UTC), labelled "YYYY-Qn".
 */
import { mean, sampleStandardDeviation } from 'simple-statistics';
import { classifierDeviations, othersMedian } from './classifier-panel';
import { dayToQuarter, subsetRatingSet, type RatingSet } from './rating-set';
import { definedStat, undefinedStat, type StatResult } from './result';

export interface QuarterPoint<R> {
  quarter: string;
  /** Assessments in the quarter. */
  assessments: number;
  result: R;
}

/** Splits the set by quarter and evaluates `statistic` on each quarter (ascending order). */
export function seriesByQuarter<R>(set: RatingSet, statistic: (quarter: RatingSet) => R): QuarterPoint<R>[] {
  const labels = new Map<string, number>();
  const quarterOf = new Int32Array(set.assessmentCount);
  const names: string[] = [];
  for (let a = 0; a < set.assessmentCount; a++) {
    const label = dayToQuarter(set.day[a]);
    let i = labels.get(label);
    if (i === undefined) {
      i = names.length;
      labels.set(label, i);
      names.push(label);
    }
    quarterOf[a] = i;
  }
  const order = names.map((name, i) => ({ name, i })).sort((x, y) => (x.name < y.name ? -1 : x.name > y.name ? 1 : 0));
  return order.map(({ name, i }) => {
    const sub = subsetRatingSet(set, (a) => quarterOf[a] === i);
    return { quarter: name, assessments: sub.assessmentCount, result: statistic(sub) };
  });
}

/** A classifier's mean signed deviation from the others' median (points) by quarter. */
export function deviationByQuarter(set: RatingSet, classifierCode: string): QuarterPoint<StatResult>[] {
  const series = classifierDeviations(set, classifierCode, othersMedian(set));
  const groups = new Map<string, number[]>();
  for (let i = 0; i < series.day.length; i++) {
    const label = dayToQuarter(series.day[i]);
    let g = groups.get(label);
    if (!g) groups.set(label, (g = []));
    g.push(series.deviation[i]);
  }
  return [...groups.entries()]
    .sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0))
    .map(([quarter, devs]) => ({
      quarter,
      assessments: devs.length,
      result:
        devs.length === 0
          ? undefinedStat(0, 'no rating in a panel of two or more')
          : definedStat(mean(devs), devs.length > 1 ? sampleStandardDeviation(devs) / Math.sqrt(devs.length) : null, devs.length),
    }));
}

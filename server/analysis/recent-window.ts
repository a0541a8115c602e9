/**
 * A classifier against the panel over their most recent ratings only (a moving window), for
 * calibration flags that should follow what a classifier does now rather than their whole history.
 *
 * The window is the classifier's last `window` ratings in assessments with ≥ 2 ratings, in
 * chronological order (date, then assessment order, as `classifierDeviations`). The statistics
 * are those of `classifiersVsPanel` (mean signed deviation from the others' median with a Wald
 * interval; Cohen's quadratically weighted kappa against the reference class, Cohen 1968, SE
 * Fleiss, Cohen & Everitt 1969) evaluated on the window's assessments: whole assessments are kept,
 * so the others' median of every rating is the same as in the full set.
 */
import { classifierDeviations, classifiersVsPanel, othersMedian, type ClassifierVsPanel } from './classifier-panel';
import { dayToIsoDate, subsetRatingSet, type RatingSet } from './rating-set';

export interface RecentWindow {
  code: string;
  /** Requested window size. */
  window: number;
  /** Ratings in the window (fewer than `window` when the classifier has fewer). */
  n: number;
  /** First and last dates of the window (ISO), null when empty. */
  from: string | null;
  to: string | null;
  /** The classifier against the panel over the window; null when the window is empty. */
  comparison: ClassifierVsPanel | null;
}

/** The classifier's last `window` panel ratings compared with the rest of the panel. */
export function recentPanelComparison(
  set: RatingSet,
  classifierCode: string,
  window: number,
  medians: Float64Array = othersMedian(set),
): RecentWindow {
  const series = classifierDeviations(set, classifierCode, medians);
  const total = series.assessment.length;
  const start = Math.max(0, total - Math.max(0, Math.floor(window)));
  const keep = new Uint8Array(set.assessmentCount);
  for (let i = start; i < total; i++) keep[series.assessment[i]] = 1;
  const n = total - start;
  if (n === 0) return { code: classifierCode, window, n: 0, from: null, to: null, comparison: null };
  const sub = subsetRatingSet(set, (a) => keep[a] === 1);
  const comparison = classifiersVsPanel(sub).find((c) => c.code === classifierCode) ?? null;
  return {
    code: classifierCode,
    window,
    n,
    from: dayToIsoDate(series.day[start]),
    to: dayToIsoDate(series.day[total - 1]),
    comparison,
  };
}

/**
 * A classifier's figures in live panels before and after an exercise: over their last `window`
 * panel ratings before the exercise opened and their first `window` panel ratings after it closed,
 * the statistics of `classifiersVsPanel` (exact and within-half agreement with the others' median,
 * Wilson 1927 intervals; mean signed deviation in points; Cohen's quadratically weighted kappa
 * against the reference class of decision record 0003). Whole assessments are kept, so the others'
 * median of every rating is the same as in the full set (as in `recentPanelComparison`).
 *
 * Also the exact agreement and mean deviation by calendar quarter, each quarter marked before,
 * during or after the exercise, for the chart.
 *
 * A change between the two windows is a description, not evidence that the practice caused it:
 * panels, athletes and events differ between the windows.
 */
import { mean } from 'simple-statistics';
import { classifierDeviations, classifiersVsPanel, othersMedian, type ClassifierVsPanel } from './classifier-panel';
import { dayToIsoDate, dayToQuarter, isoDateToDay, subsetRatingSet, type RatingSet } from './rating-set';
import { undefinedStat, type StatResult } from './result';

export interface PanelWindowFigures {
  n: number;
  from: string | null;
  to: string | null;
  exactWithPanel: StatResult;
  withinHalfWithPanel: StatResult;
  quadraticKappaWithPanel: StatResult;
  meanDeviation: StatResult;
}

export interface QuarterFigure {
  quarter: string;
  phase: 'before' | 'during' | 'after';
  n: number;
  exact: number | null;
  meanDeviation: number | null;
}

export interface BeforeAfterResult {
  code: string;
  before: PanelWindowFigures;
  after: PanelWindowFigures;
  quarters: QuarterFigure[];
}

function emptyWindow(reason: string): PanelWindowFigures {
  const none = undefinedStat(0, reason);
  return {
    n: 0,
    from: null,
    to: null,
    exactWithPanel: none,
    withinHalfWithPanel: none,
    quadraticKappaWithPanel: none,
    meanDeviation: none,
  };
}

function windowFigures(
  set: RatingSet,
  code: string,
  assessments: readonly number[],
  days: readonly number[],
  reason: string,
): PanelWindowFigures {
  if (assessments.length === 0) return emptyWindow(reason);
  const keep = new Uint8Array(set.assessmentCount);
  for (const a of assessments) keep[a] = 1;
  const c: ClassifierVsPanel | undefined = classifiersVsPanel(subsetRatingSet(set, (a) => keep[a] === 1)).find((x) => x.code === code);
  if (!c) return emptyWindow(reason);
  return {
    n: assessments.length,
    from: dayToIsoDate(days[0]),
    to: dayToIsoDate(days[days.length - 1]),
    exactWithPanel: c.exactWithPanel,
    withinHalfWithPanel: c.withinHalfWithPanel,
    quadraticKappaWithPanel: c.quadraticKappaWithPanel,
    meanDeviation: c.meanDeviation,
  };
}

/**
 * Before: panel ratings dated before `opensOn`; after: dated after `closesOn` (ISO dates).
 */
export function panelBeforeAfter(
  set: RatingSet,
  code: string,
  opensOn: string,
  closesOn: string,
  window: number,
  medians: Float64Array = othersMedian(set),
): BeforeAfterResult {
  const open = isoDateToDay(opensOn);
  const close = isoDateToDay(closesOn);
  if (open === null || close === null) throw new Error(`not an ISO date: ${opensOn} / ${closesOn}`);
  const series = classifierDeviations(set, code, medians);
  const beforeIdx: number[] = [];
  const afterIdx: number[] = [];
  for (let i = 0; i < series.day.length; i++) {
    if (series.day[i] < open) beforeIdx.push(i);
    else if (series.day[i] > close) afterIdx.push(i);
  }
  const lastBefore = beforeIdx.slice(Math.max(0, beforeIdx.length - window));
  const firstAfter = afterIdx.slice(0, window);
  const pick = (idx: number[]) => [idx.map((i) => series.assessment[i]), idx.map((i) => series.day[i])] as const;
  const [ba, bd] = pick(lastBefore);
  const [aa, ad] = pick(firstAfter);

  const groups = new Map<string, { devs: number[]; phase: QuarterFigure['phase'] }>();
  const openQuarter = dayToQuarter(open);
  const closeQuarter = dayToQuarter(close);
  for (let i = 0; i < series.day.length; i++) {
    const day = series.day[i];
    const quarter = dayToQuarter(day);
    let g = groups.get(quarter);
    if (!g) {
      const phase = quarter < openQuarter ? 'before' : quarter > closeQuarter ? 'after' : 'during';
      groups.set(quarter, (g = { devs: [], phase }));
    }
    g.devs.push(series.deviation[i]);
  }
  const quarters = [...groups.entries()]
    .sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0))
    .map(([quarter, g]) => ({
      quarter,
      phase: g.phase,
      n: g.devs.length,
      exact: g.devs.length ? g.devs.filter((d) => d === 0).length / g.devs.length : null,
      meanDeviation: g.devs.length ? mean(g.devs) : null,
    }));

  return {
    code,
    before: windowFigures(set, code, ba, bd, 'no panel rating before the exercise'),
    after: windowFigures(set, code, aa, ad, 'no panel rating since the exercise closed yet'),
    quarters,
  };
}

/**
 * The agreement dashboards' figures. Every statistic comes from the agreement engine
 * (server/analysis); this module only chooses what each view needs, caches it per federation,
 * data version and filter set, and leaves out what a role may not see (routes call the
 * `…For` functions with the caller's role).
 */
import {
  FLEISS_KAPPA_NAME,
  INTERPRETATION_SOURCES,
  analyzeRatings,
  bootstrapCountTable,
  classBoundaries,
  classDistributionBySeason,
  classPoints,
  classTransitions,
  classifierBoundarySplits,
  classifierDrift,
  classifierPairs,
  classifiersVsPanel,
  compressPatterns,
  confusionBetween,
  confusionWithPanel,
  countTable,
  dayToQuarter,
  deviationByQuarter,
  isoDateToDay,
  krippendorffAlphaValue,
  landisKochLabel,
  othersMedian,
  seriesByQuarter,
  type RatingSet,
  type StatResult,
} from '../analysis';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import type {
  AnalyticsFilters,
  BoundariesResponse,
  ClassDrift,
  ClassifierDetail,
  ClassifierRow,
  FlagThresholds,
  MyAgreement,
  Overview,
  PairDetail,
  PairsResponse,
  QuarterStat,
  RaterDrift,
  Stat,
} from '../../shared/schemas/analytics';
import { cached, federationData, filteredSet, filterKey, minSharedOf, requireClassifier, type FederationData } from './analytics-data';
import { flagsOf } from './calibration-flags';

/** Bootstrap resamples behind the intervals of Krippendorff's alpha (overview and its trend). */
export const OVERVIEW_BOOTSTRAP = { B: 1000, seed: 1 } as const;
export const TREND_BOOTSTRAP = { B: 200, seed: 1 } as const;

export interface FederationRef {
  id: number;
  scaleMin: number;
  scaleMax: number;
}

/** The five fields of an engine statistic, nothing else. */
export function stat(r: StatResult): Stat {
  const out: Stat = { value: r.value, se: r.se, ci95: r.ci95, n: r.n };
  if (r.reason !== undefined) out.reason = r.reason;
  return out;
}

function quarterStats(points: { quarter: string; assessments: number; result: StatResult }[]): QuarterStat[] {
  return points.map((p) => ({ quarter: p.quarter, n: p.result.n, value: p.result.value, ci95: p.result.ci95 }));
}

function classPointsOf(set: RatingSet): Float64Array {
  return Float64Array.from({ length: set.q }, (_, i) => classPoints(set, i));
}

function load(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters): { data: FederationData; set: RatingSet } {
  const data = federationData(ctx, federation);
  return { data, set: filteredSet(ctx, data, federation.id, filters) };
}

// ---------------------------------------------------------------------------------------------
// Overview

type OverviewFigures = Omit<Overview, 'openFlags'>;

export function overviewFigures(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters): OverviewFigures {
  const { set } = load(ctx, federation, filters);
  return cached(ctx, federation.id, `overview|${filterKey(filters)}`, () => {
    const report = analyzeRatings(set, { bootstrap: OVERVIEW_BOOTSTRAP.B, seed: OVERVIEW_BOOTSTRAP.seed });
    const alpha = report.krippendorffAlpha.ordinal;
    const fk = report.fleissKappa;
    const points = classPointsOf(set);
    const ordinalAlpha = (t: ReturnType<typeof countTable>) => krippendorffAlphaValue(t, 'ordinal', points);
    const trend = seriesByQuarter(set, (sub): QuarterStat => {
      const table = compressPatterns(countTable(sub), 1);
      const value = ordinalAlpha(table);
      const boot = value === null ? null : bootstrapCountTable(table, ordinalAlpha, TREND_BOOTSTRAP);
      let units = 0;
      for (let i = 0; i < table.rows; i++) if (table.totals[i]! >= 2) units += table.weights[i]!;
      return { quarter: '', n: units, value, ci95: boot?.ci95 ?? null };
    }).map((p) => ({ ...p.result, quarter: p.quarter }));
    return {
      counts: {
        assessments: report.counts.assessments,
        ratings: report.counts.ratings,
        classifiers: report.counts.classifiers,
        athletes: report.counts.athletes,
        events: report.counts.events,
        analysable: report.counts.analysable,
      },
      alpha: {
        ...stat(alpha),
        name: "Krippendorff's alpha (ordinal)",
        label: landisKochLabel(alpha.value),
        ciMethod: alpha.ciMethod,
        note: alpha.note,
      },
      fleissKappa: { ...stat(fk), name: FLEISS_KAPPA_NAME, label: landisKochLabel(fk.value), ciMethod: fk.ciMethod },
      exact: stat(report.exactAgreement.unanimous),
      withinHalfClass: stat(report.withinHalfClassAgreement.unanimous),
      trend,
      bootstrap: { ...OVERVIEW_BOOTSTRAP },
      sources: { landisKoch: INTERPRETATION_SOURCES.landisKoch, krippendorff: INTERPRETATION_SOURCES.krippendorff },
    };
  });
}

// ---------------------------------------------------------------------------------------------
// Classifiers

export type ClassifierFigures = Omit<ClassifierRow, 'flags'>;

/** Every classifier's figures against the rest of the panel (no flags: they change without a data change). */
export function classifierFigures(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters): ClassifierFigures[] {
  const { data, set } = load(ctx, federation, filters);
  return cached(ctx, federation.id, `classifiers|${filterKey(filters)}`, () => {
    const medians = othersMedian(set);
    return classifiersVsPanel(set, medians).map((c) => ({
      code: c.code,
      name: data.classifiers.get(c.code)?.name ?? null,
      n: c.n,
      ratings: c.ratings,
      exactWithPanel: stat(c.exactWithPanel),
      withinHalfWithPanel: stat(c.withinHalfWithPanel),
      bias: stat(c.meanDeviation),
      quadraticKappa: stat(c.quadraticKappaWithPanel),
      trend: quarterStats(deviationByQuarter(set, c.code)),
    }));
  });
}

/** The classifiers' rows: their figures with their active flags (read now). */
export async function classifierRows(ctx: AppContext, federationId: number, figures: readonly ClassifierFigures[]): Promise<ClassifierRow[]> {
  const flags = await flagsOf(ctx, federationId, { activeOnly: true });
  return figures.map((f) => ({
    ...f,
    flags: flags.filter((g) => g.classifierCode === f.code).map((g) => ({ id: g.id, rule: g.rule, status: g.status })),
  }));
}

function emptyRow(code: string, name: string | null): ClassifierFigures {
  const none: Stat = { value: null, se: null, ci95: null, n: 0, reason: 'no rating in these filters' };
  return { code, name, n: 0, ratings: 0, exactWithPanel: none, withinHalfWithPanel: none, bias: none, quadraticKappa: none, trend: [] };
}

export type ClassifierDetailFigures = Omit<ClassifierDetail, 'flags' | 'row'> & { row: ClassifierFigures };

/** One classifier's figures (404 for a code not in the roster); flags are added by classifierDetail. */
export function classifierDetailFigures(
  ctx: AppContext,
  federation: FederationRef,
  filters: AnalyticsFilters,
  code: string,
  thresholds: FlagThresholds,
): ClassifierDetailFigures {
  const { data, set } = load(ctx, federation, filters);
  const roster = requireClassifier(data, code);
  const figures = cached(ctx, federation.id, `classifier|${code}|${thresholds.driftK}|${thresholds.driftH}|${filterKey(filters)}`, () => {
    const row = classifierFigures(ctx, federation, filters).find((c) => c.code === code) ?? emptyRow(code, roster.name);
    const confusion = confusionWithPanel(set, code);
    const drift = classifierDrift(set, code, { k: thresholds.driftK, h: thresholds.driftH });
    const quarterAt = (i: number) => {
      const day = isoDateToDay(drift.dates[i]!);
      return day === null ? '' : dayToQuarter(day);
    };
    return {
      row,
      confusion: { ...confusion, rowsAre: code, columnsAre: 'panel final class' },
      biasByQuarter: row.trend,
      boundaries: classifierBoundarySplits(confusion).map((b) => ({ ...stat(b), lower: b.lower, upper: b.upper, splitRate: b.splitRate, touching: b.touching, above: b.above, below: b.below })),
      drift: {
        n: drift.n,
        k: drift.k,
        h: drift.h,
        sigma: drift.sigma,
        points: Array.from({ length: drift.n }, (_, i) => ({ index: i + 1, upper: drift.upper[i]!, lower: drift.lower[i]!, deviation: drift.deviations[i]! })),
        alarms: drift.alarms.map((a) => ({ index: a.index + 1, direction: a.direction, quarter: quarterAt(a.index) })),
      },
    };
  });
  return { code, name: roster.name, ...figures };
}

/** One classifier's figures with their flags (read now). */
export async function classifierDetail(ctx: AppContext, federationId: number, figures: ClassifierDetailFigures): Promise<ClassifierDetail> {
  const flags = (await flagsOf(ctx, federationId, { activeOnly: false })).filter((f) => f.classifierCode === figures.code);
  const activeFlags = flags.filter((f) => f.status !== 'closed').map((f) => ({ id: f.id, rule: f.rule, status: f.status }));
  return { ...figures, row: { ...figures.row, flags: activeFlags }, flags };
}

/** The classifier's own figures, and the federation's spread without names or codes. */
export function myAgreement(detail: ClassifierDetail, all: readonly ClassifierFigures[]): MyAgreement {
  const sorted = (pick: (c: ClassifierFigures) => number | null) =>
    all
      .map(pick)
      .filter((v): v is number => v !== null)
      .sort((a, b) => a - b);
  return {
    ...detail,
    // Names are not shown to the classifier, not even their own from the roster.
    name: null,
    row: { ...detail.row, name: null },
    flags: detail.flags.map((f) => ({ ...f, classifierName: null })),
    distribution: {
      quadraticKappa: sorted((c) => c.quadraticKappa.value),
      bias: sorted((c) => c.bias.value),
      exactWithPanel: sorted((c) => c.exactWithPanel.value),
    },
  };
}

// ---------------------------------------------------------------------------------------------
// Pairs

export function pairs(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters): PairsResponse {
  const { set } = load(ctx, federation, filters);
  const minShared = minSharedOf(filters);
  const all = cached(ctx, federation.id, `pairs|${filterKey(filters)}`, () => classifierPairs(set, 1));
  const used = new Set<string>();
  for (let p = 0; p < set.ratingCount; p++) used.add(set.classifierCodes[set.ratingClassifier[p]!]!);
  return {
    minShared,
    classifiers: [...used].sort(),
    pairs: all.map((p) => {
      const tooFew = p.n < minShared;
      return { a: p.a, b: p.b, n: p.n, tooFew, quadraticKappa: tooFew ? null : stat(p.quadraticKappa), exact: tooFew ? null : stat(p.exact) };
    }),
  };
}

export function pairDetail(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters, a: string, b: string): PairDetail {
  const { data, set } = load(ctx, federation, filters);
  requireClassifier(data, a);
  requireClassifier(data, b);
  if (a === b) throw new HttpError(400, 'bad_request', 'A pair needs two different classifiers');
  const minShared = minSharedOf(filters);
  const all = cached(ctx, federation.id, `pairs|${filterKey(filters)}`, () => classifierPairs(set, 1));
  const [first, second] = a < b ? [a, b] : [b, a];
  const found = all.find((p) => p.a === first && p.b === second);
  const n = found?.n ?? 0;
  const tooFew = n < minShared;
  const confusion = confusionBetween(set, a, b);
  return {
    a,
    b,
    n,
    minShared,
    tooFew,
    stats:
      found && !tooFew
        ? {
            exact: stat(found.exact),
            withinHalfClass: stat(found.withinHalfClass),
            kappa: stat(found.kappa),
            linearKappa: stat(found.linearKappa),
            quadraticKappa: stat(found.quadraticKappa),
          }
        : null,
    confusion: { classes: confusion.classes, rowsAre: a, columnsAre: b, counts: confusion.counts, n: confusion.n },
  };
}

// ---------------------------------------------------------------------------------------------
// Class boundaries

export function boundaries(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters): BoundariesResponse {
  const { set } = load(ctx, federation, filters);
  return cached(ctx, federation.id, `boundaries|${filterKey(filters)}`, () => {
    const overall = classBoundaries(compressPatterns(countTable(set), 1), set.scale);
    const trend = seriesByQuarter(set, (sub) => classBoundaries(compressPatterns(countTable(sub), 1), sub.scale)).flatMap((p) =>
      p.result.map((b) => ({ quarter: p.quarter, boundary: `${b.lower}/${b.upper}`, n: b.n, value: b.value, ci95: b.ci95 })),
    );
    return {
      boundaries: overall.map((b) => ({ ...stat(b), lower: b.lower, upper: b.upper, splitRate: b.splitRate, splits: b.splits })),
      trend,
    };
  });
}

// ---------------------------------------------------------------------------------------------
// Drift

export function raterDrift(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters, thresholds: FlagThresholds): RaterDrift {
  const { data, set } = load(ctx, federation, filters);
  return cached(ctx, federation.id, `rater-drift|${thresholds.driftK}|${thresholds.driftH}|${filterKey(filters)}`, () => {
    let sigma = 0;
    const classifiers = classifiersVsPanel(set).map((c) => {
      const drift = classifierDrift(set, c.code, { k: thresholds.driftK, h: thresholds.driftH });
      sigma = drift.sigma;
      const last = drift.alarms[drift.alarms.length - 1];
      const lastDay = last ? isoDateToDay(drift.dates[last.index]!) : null;
      return {
        code: c.code,
        name: data.classifiers.get(c.code)?.name ?? null,
        n: drift.n,
        byQuarter: quarterStats(deviationByQuarter(set, c.code)),
        alarms: drift.alarms.length,
        lastAlarm: last && lastDay !== null ? { quarter: dayToQuarter(lastDay), direction: last.direction } : null,
      };
    });
    return { parameters: { k: thresholds.driftK, h: thresholds.driftH, sigma }, classifiers };
  });
}

export function classDrift(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters, withChanges: boolean): ClassDrift {
  const { set } = load(ctx, federation, filters);
  const figures = cached(ctx, federation.id, `class-drift|${filterKey(filters)}`, () => {
    const t = classTransitions(set);
    return {
      transitions: {
        classes: t.classes,
        counts: t.counts,
        n: t.n,
        changed: stat(t.changed),
        reviewsChanged: stat(t.reviewsChanged),
        protestsChanged: stat(t.protestsChanged),
      },
      changes: t.changes.map((c) => ({ athleteCode: c.athleteCode, from: c.from, to: c.to, on: c.on, kind: c.kind })),
      distribution: classDistributionBySeason(set).map((d) => ({ season: d.season, year: d.year, n: d.n, counts: d.counts })),
    };
  });
  return { ...figures, changes: withChanges ? figures.changes : null };
}

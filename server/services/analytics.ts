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
  changePointTest,
  classifierDeviations,
  classifierPairs,
  classifierSeverity,
  classifiersVsPanel,
  compressPatterns,
  confusionBetween,
  confusionWithPanel,
  countTable,
  dayToIsoDate,
  deviationByQuarter,
  evaluateCalibration,
  hashSeed,
  isoDateToDay,
  krippendorffAlphaValue,
  landisKochLabel,
  othersMedian,
  pointsApart,
  pointsAtStake,
  seriesByQuarter,
  twoRaterCoefficients,
  type AgreementReport,
  type PointsAtStake,
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
  PanelNetworkData,
  QuarterStat,
  RaterDrift,
  Coefficient,
  PointsAtStakeFigures,
  SeverityModel,
  SeverityStat,
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
      for (let i = 0; i < table.rows; i++) if (table.totals[i] >= 2) units += table.weights[i];
      return { quarter: '', n: units, value, ci95: boot?.ci95 ?? null };
    }).map((p) => ({ ...p.result, quarter: p.quarter }));
    const lk = (r: StatResult & { ciMethod?: string | null }) => ({
      ...stat(r),
      label: landisKochLabel(r.value),
      ciMethod: r.ci95 ? (r.ciMethod ?? null) : null,
    });
    return {
      counts: {
        assessments: report.counts.assessments,
        ratings: report.counts.ratings,
        classifiers: report.counts.classifiers,
        athletes: report.counts.athletes,
        events: report.counts.events,
        analysable: report.counts.analysable,
      },
      headline: {
        panelsUnanimous: stat(report.exactAgreement.unanimous),
        pairwiseSameClass: stat(report.exactAgreement.pairwiseMean),
        splits: report.boundaries.map((b) => ({ ...stat(b), lower: b.lower, upper: b.upper, splitRate: b.splitRate, splits: b.splits })),
        pointsAtStake: stakeFigures(pointsAtStake(set).federation),
      },
      // Alpha has its own published rule (Krippendorff 2004); Landis & Koch's bands are for kappa.
      alpha: { ...stat(alpha), name: "Krippendorff's alpha (ordinal)", label: null, ciMethod: alpha.ciMethod, note: alpha.note },
      fleissKappa: { ...stat(fk), name: FLEISS_KAPPA_NAME, label: landisKochLabel(fk.value), ciMethod: fk.ciMethod },
      gwet: { ac1: lk(report.gwet.ac1), ac2Linear: lk(report.gwet.ac2Linear), ac2Quadratic: lk(report.gwet.ac2Quadratic) },
      exact: stat(report.exactAgreement.unanimous),
      withinHalfClass: stat(report.withinHalfClassAgreement.unanimous),
      coefficients: coefficientsTable(report),
      trend,
      bootstrap: { ...OVERVIEW_BOOTSTRAP },
      sources: { landisKoch: INTERPRETATION_SOURCES.landisKoch, krippendorff: INTERPRETATION_SOURCES.krippendorff },
    };
  });
}

export function stakeFigures(p: PointsAtStake): PointsAtStakeFigures {
  return { n: p.n, meanAbs: stat(p.meanAbs), offByHalf: stat(p.offByHalf), per100: p.per100 };
}

const KRIPPENDORFF_WORDS = {
  reliable: 'α ≥ .800: rely on the data',
  tentative: '.667 ≤ α < .800: tentative conclusions only',
  unreliable: 'α < .667: do not rely on the data',
};

/**
 * Every coefficient the engine computes for the federation, in the order the overview reads
 * them: observed shares, chance-corrected unweighted coefficients, then the weighted ones with
 * what they forgive. Interpretations only where the coefficient has its own published one.
 */
export function coefficientsTable(report: AgreementReport): Coefficient[] {
  const boot = report.bootstrap?.results ?? {};
  const lkSource = INTERPRETATION_SOURCES.landisKoch;
  const kSource = INTERPRETATION_SOURCES.krippendorff;
  const row = (
    id: string,
    name: string,
    family: Coefficient['family'],
    r: StatResult,
    ciMethod: string | null,
    measures: string,
    forgives: string | null,
    reading: 'landis-koch' | 'krippendorff' | null,
  ): Coefficient => {
    let interpretation: Coefficient['interpretation'] = null;
    if (reading === 'landis-koch' && r.value !== null) interpretation = { label: landisKochLabel(r.value)!, source: lkSource };
    if (reading === 'krippendorff' && r.value !== null) {
      const note = (r as { note?: keyof typeof KRIPPENDORFF_WORDS | null }).note;
      if (note) interpretation = { label: KRIPPENDORFF_WORDS[note], source: kSource };
    }
    const out: Coefficient = {
      id,
      name,
      family,
      value: r.value,
      ci95: r.ci95,
      n: r.n,
      ciMethod: r.ci95 ? ciMethod : null,
      measures,
      forgives,
      interpretation,
    };
    if (r.reason !== undefined) out.reason = r.reason;
    return out;
  };
  const withBoot = (r: StatResult, key: string, fallback: string | null): [StatResult, string | null] => {
    const b = boot[key];
    return b && b.ci95 && r.value !== null ? [{ ...r, ci95: b.ci95 }, 'bootstrap-percentile'] : [r, fallback];
  };
  const ex = report.exactAgreement;
  const wi = report.withinHalfClassAgreement;
  const a = report.krippendorffAlpha;
  const g = report.gwet;
  const out: Coefficient[] = [
    row(
      'exact.unanimous',
      'Panels unanimous (same class)',
      'observed',
      ...withBoot(ex.unanimous, 'exactUnanimous', 'wilson'),
      'Share of assessments where every member gave the same class.',
      null,
      null,
    ),
    row(
      'exact.pairwiseMean',
      'Same class, pairwise (mean over assessments)',
      'observed',
      ex.pairwiseMean,
      'wald',
      'Share of pairs of members giving the same class, averaged over assessments (Fleiss’ P̄).',
      null,
      null,
    ),
    row(
      'exact.pooledPairs',
      'Same class, pooled pairs',
      'observed',
      ex.pooledPairs,
      null,
      'Agreeing pairs of members over all pairs, pooled over assessments (larger panels weigh more).',
      null,
      null,
    ),
    row(
      'fleissKappa',
      'Fleiss’ kappa (unweighted)',
      'chance-corrected',
      report.fleissKappa,
      report.fleissKappa.ciMethod,
      'Same-class agreement beyond what the class shares would give by chance.',
      null,
      'landis-koch',
    ),
    ...Object.entries(report.fleissKappaByClass).map(([cls, r]) =>
      row(
        `fleissKappa.${cls}`,
        `Fleiss’ kappa, class ${cls}`,
        'chance-corrected',
        r,
        'wald-null-se',
        `How well panels agree on whether an athlete is class ${cls}, beyond chance.`,
        null,
        'landis-koch',
      ),
    ),
    row(
      'gwet.ac1',
      'Gwet’s AC1',
      'chance-corrected',
      g.ac1,
      g.ac1.ciMethod,
      'Same-class agreement beyond chance, with a chance term that uneven class shares do not inflate.',
      null,
      'landis-koch',
    ),
    row(
      'withinHalfClass.unanimous',
      'Panels within half a class',
      'weighted',
      ...withBoot(wi.unanimous, 'withinHalfClassUnanimous', 'wilson'),
      'Share of assessments whose highest and lowest ratings are at most half a class apart.',
      'counts a half-class miss as agreement',
      null,
    ),
    row(
      'withinHalfClass.pairwiseMean',
      'Within half a class, pairwise',
      'weighted',
      wi.pairwiseMean,
      'wald',
      'Share of pairs at most half a class apart, averaged over assessments.',
      'counts a half-class miss as agreement',
      null,
    ),
    row(
      'gwet.ac2Linear',
      'Gwet’s AC2, linear weights',
      'weighted',
      g.ac2Linear,
      g.ac2Linear.ciMethod,
      'AC1 with partial credit falling linearly with the distance between classes.',
      'counts a half-class miss as 6/7 of an agreement',
      'landis-koch',
    ),
    row(
      'gwet.ac2Quadratic',
      'Gwet’s AC2, quadratic weights',
      'weighted',
      g.ac2Quadratic,
      g.ac2Quadratic.ciMethod,
      'AC1 with partial credit falling with the squared distance between classes.',
      'counts a half-class miss as near agreement (48/49)',
      'landis-koch',
    ),
    row(
      'alpha.nominal',
      'Krippendorff’s alpha, nominal',
      'chance-corrected',
      a.nominal,
      a.nominal.ciMethod,
      'Disagreement observed against disagreement expected by chance, any two different classes counting alike.',
      null,
      'krippendorff',
    ),
    row(
      'alpha.ordinal',
      'Krippendorff’s alpha, ordinal',
      'weighted',
      a.ordinal,
      a.ordinal.ciMethod,
      'As nominal, but a miss costs by how many ratings lie between the two classes.',
      'counts a miss between neighbouring, rarely used classes as small',
      'krippendorff',
    ),
    row(
      'alpha.interval',
      'Krippendorff’s alpha, interval',
      'weighted',
      a.interval,
      a.interval.ciMethod,
      'As nominal, but a miss costs the squared distance in points.',
      'counts a half-class miss as 1/49 of a 1.0-against-4.5 miss',
      'krippendorff',
    ),
    row(
      'alpha.ratio',
      'Krippendorff’s alpha, ratio',
      'weighted',
      a.ratio,
      a.ratio.ciMethod,
      'As interval, with distances relative to the size of the classes.',
      'counts a half-class miss among high classes as smaller still',
      'krippendorff',
    ),
  ];
  return out;
}

// ---------------------------------------------------------------------------------------------
// Classifiers

export type ClassifierFigures = Omit<ClassifierRow, 'flags'>;

interface SeverityFigures {
  byCode: Map<string, SeverityStat>;
  severityModel: SeverityModel;
  network: PanelNetworkData;
}

/** The severity model on the filtered ratings (decision record 0009), cached with them. */
function severityFigures(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters): SeverityFigures {
  const { set } = load(ctx, federation, filters);
  return cached(ctx, federation.id, `severity|${filterKey(filters)}`, () => {
    const fit = classifierSeverity(set);
    const severityModel: SeverityModel = {
      model: fit.model,
      ciMethod: fit.ciMethod,
      residualSd: fit.residualSd,
      n: fit.n,
      assessments: fit.assessments,
    };
    if (fit.reason !== undefined) severityModel.reason = fit.reason;
    return {
      byCode: new Map(fit.classifiers.map((c) => [c.code, { ...stat(c), links: c.links }])),
      severityModel,
      network: fit.network,
    };
  });
}

/** The severity model's summary and the panel network (who shared assessments with whom), for the classifiers page. */
export function severityNetwork(
  ctx: AppContext,
  federation: FederationRef,
  filters: AnalyticsFilters,
): Pick<SeverityFigures, 'severityModel' | 'network'> {
  const { severityModel, network } = severityFigures(ctx, federation, filters);
  return { severityModel, network };
}

const NO_SEVERITY: SeverityStat = { value: null, se: null, ci95: null, n: 0, links: 0, reason: 'no rating in these filters' };

/** Every classifier's figures against the rest of the panel (no flags: they change without a data change). */
export function classifierFigures(ctx: AppContext, federation: FederationRef, filters: AnalyticsFilters): ClassifierFigures[] {
  const { data, set } = load(ctx, federation, filters);
  return cached(ctx, federation.id, `classifiers|${filterKey(filters)}`, () => {
    const medians = othersMedian(set);
    const stake = pointsAtStake(set).classifiers;
    const severity = severityFigures(ctx, federation, filters).byCode;
    return classifiersVsPanel(set, medians).map((c) => ({
      code: c.code,
      name: data.classifiers.get(c.code)?.name ?? null,
      n: c.n,
      ratings: c.ratings,
      exactWithPanel: stat(c.exactWithPanel),
      withinHalfWithPanel: stat(c.withinHalfWithPanel),
      bias: stat(c.meanDeviation),
      quadraticKappa: stat(c.quadraticKappaWithPanel),
      pointsAtStake: stakeFigures(stake.get(c.code) ?? pointsApart([])),
      severity: severity.get(c.code) ?? NO_SEVERITY,
      trend: quarterStats(deviationByQuarter(set, c.code)),
    }));
  });
}

/** The classifiers' rows: their figures with their active flags (read now). */
export async function classifierRows(
  ctx: AppContext,
  federationId: number,
  figures: readonly ClassifierFigures[],
): Promise<ClassifierRow[]> {
  const flags = await flagsOf(ctx, federationId, { activeOnly: true });
  return figures.map((f) => ({
    ...f,
    flags: flags.filter((g) => g.classifierCode === f.code).map((g) => ({ id: g.id, rule: g.rule, status: g.status })),
  }));
}

function emptyRow(code: string, name: string | null): ClassifierFigures {
  const none: Stat = { value: null, se: null, ci95: null, n: 0, reason: 'no rating in these filters' };
  return {
    code,
    name,
    n: 0,
    ratings: 0,
    exactWithPanel: none,
    withinHalfWithPanel: none,
    bias: none,
    quadraticKappa: none,
    pointsAtStake: stakeFigures(pointsApart([])),
    severity: NO_SEVERITY,
    trend: [],
  };
}

export const DRIFT_METHOD =
  'Least-squares single change-point statistic on the deviations from the rest of the panel, permutation null (Besag & Clifford 1991 sequential Monte Carlo); decision record 0008';

/** A classifier's deviation series and its strongest change of level under the filters. */
export function driftSeries(set: RatingSet, code: string): ClassifierDetail['drift'] {
  const series = classifierDeviations(set, code);
  const cp = changePointTest(series.deviation, hashSeed(code, 1));
  const at = (i: number) => dayToIsoDate(series.day[i]);
  let change: ClassifierDetail['drift']['change'] = null;
  if (cp) {
    const last = series.day[cp.k - 1];
    const first = series.day[cp.k];
    change = {
      index: cp.k + 1,
      changeDate: dayToIsoDate(Math.floor((last + first) / 2)),
      between: [at(cp.k - 1), at(cp.k)],
      direction: cp.meanAfter > cp.meanBefore ? 'up' : cp.meanAfter < cp.meanBefore ? 'down' : null,
      sizeBefore: cp.meanBefore,
      sizeAfter: cp.meanAfter,
      nBefore: cp.k,
      nAfter: cp.n - cp.k,
      p: cp.p,
    };
  }
  return {
    n: series.deviation.length,
    method: DRIFT_METHOD,
    points: Array.from(series.deviation, (deviation, i) => ({ index: i + 1, date: at(i), deviation })),
    change,
  };
}

export type ClassifierDetailFigures = Omit<ClassifierDetail, 'flags' | 'row'> & { row: ClassifierFigures };

/** One classifier's figures (404 for a code not in the roster); flags are added by classifierDetail. */
export function classifierDetailFigures(
  ctx: AppContext,
  federation: FederationRef,
  filters: AnalyticsFilters,
  code: string,
  _thresholds: FlagThresholds,
): ClassifierDetailFigures {
  const { data, set } = load(ctx, federation, filters);
  const roster = requireClassifier(data, code);
  const figures = cached(ctx, federation.id, `classifier|${code}|${filterKey(filters)}`, () => {
    const row = classifierFigures(ctx, federation, filters).find((c) => c.code === code) ?? emptyRow(code, roster.name);
    const confusion = confusionWithPanel(set, code);
    const two = twoRaterCoefficients(confusion.counts);
    const lk = (r: StatResult, ciMethod: string) => ({ ...stat(r), label: landisKochLabel(r.value), ciMethod: r.ci95 ? ciMethod : null });
    return {
      row,
      headline: {
        sameAsFinal: stat(
          classifiersVsPanel(set).find((c) => c.code === code)?.withFinalClass.exact ?? {
            value: null,
            se: null,
            ci95: null,
            n: 0,
            reason: 'no rating in these filters',
          },
        ),
        sameAsOthers: row.exactWithPanel,
        pointsAtStake: row.pointsAtStake,
        kappa: lk(two.kappa, 'wald'),
        ac1: lk(two.ac1, 'wald'),
        quadraticKappa: {
          ...row.quadraticKappa,
          label: landisKochLabel(row.quadraticKappa.value),
          ciMethod: row.quadraticKappa.ci95 ? 'wald' : null,
        },
      },
      confusion: { ...confusion, rowsAre: code, columnsAre: 'panel final class' },
      biasByQuarter: row.trend,
      boundaries: classifierBoundarySplits(confusion).map((b) => ({
        ...stat(b),
        lower: b.lower,
        upper: b.upper,
        splitRate: b.splitRate,
        touching: b.touching,
        above: b.above,
        below: b.below,
      })),
      drift: driftSeries(set, code),
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
  for (let p = 0; p < set.ratingCount; p++) used.add(set.classifierCodes[set.ratingClassifier[p]]);
  return {
    minShared,
    classifiers: [...used].sort(),
    pairs: all.map((p) => {
      const tooFew = p.n < minShared;
      return {
        a: p.a,
        b: p.b,
        n: p.n,
        tooFew,
        quadraticKappa: tooFew ? null : stat(p.quadraticKappa),
        exact: tooFew ? null : stat(p.exact),
      };
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
  const two = twoRaterCoefficients(confusion.counts);
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
            pointsApart: stakeFigures(pointsApart(confusion.counts)),
            splits: classifierBoundarySplits(confusion).map((s) => ({
              ...stat(s),
              lower: s.lower,
              upper: s.upper,
              splitRate: s.splitRate,
              touching: s.touching,
              above: s.above,
              below: s.below,
            })),
            kappa: stat(found.kappa),
            ac1: stat(two.ac1),
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
  return cached(ctx, federation.id, `rater-drift|${thresholds.falseDiscoveryRate}|${thresholds.driftMin}|${filterKey(filters)}`, () => {
    const verdicts = new Map(evaluateCalibration(set, thresholds).map((v) => [v.code, v.drift]));
    const classifiers = classifiersVsPanel(set).map((c) => {
      const d = verdicts.get(c.code);
      const has = d && d.meanBefore !== null && d.meanAfter !== null && d.changeDate !== null && d.lastBefore !== null;
      const mid = has ? Math.floor((isoDateToDay(d.lastBefore!)! + isoDateToDay(d.changeDate!)!) / 2) : null;
      return {
        code: c.code,
        name: data.classifiers.get(c.code)?.name ?? null,
        n: c.n,
        byQuarter: quarterStats(deviationByQuarter(set, c.code)),
        change:
          has && mid !== null
            ? {
                changeDate: dayToIsoDate(mid),
                direction: d.direction,
                size: d.meanAfter! - d.meanBefore!,
                pAdjusted: d.pAdjusted,
                met: d.met,
              }
            : null,
      };
    });
    return {
      parameters: { method: DRIFT_METHOD, falseDiscoveryRate: thresholds.falseDiscoveryRate, driftMin: thresholds.driftMin },
      classifiers,
    };
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

/**
 * The full agreement report of a RatingSet as plain JSON (camelCase; undefined statistics are
 * null with a reason, never NaN). The format is documented in docs/report-format.md.
 */
import { bootstrapCountTableMany, type BootstrapResult } from './bootstrap';
import { classBoundaries, type BoundarySplit } from './class-boundaries';
import { classifierPairs, type PairAgreement } from './classifier-pairs';
import { classifiersVsPanel, type ClassifierVsPanel } from './classifier-panel';
import { compressPatterns, countTable, type CountTable } from './count-table';
import { fleissKappa, fleissKappaValue, type CiMethod, type FleissKappaResult } from './fleiss-kappa';
import { gwetAC, gwetACValue, type GwetResult } from './gwet-ac';
import { INTERPRETATION_SOURCES, krippendorffNote, landisKochLabel, type KrippendorffNote, type LandisKochLabel } from './interpretation';
import { krippendorffAlpha, krippendorffAlphaValue, type AlphaResult } from './krippendorff-alpha';
import { observedAgreement, type AgreementForms } from './observed-agreement';
import { classLabel, classPoints, type RatingSet } from './rating-set';
import type { StatResult } from './result';
import { classifierSeverity, type SeverityResult } from './severity';
import { formatClass } from '../../shared/scale';

export const REPORT_FORMAT = 'panelwise.agreement-report/1';
export const FLEISS_KAPPA_NAME = "Fleiss' kappa (pooled-share generalisation for panels of varying size)";

export interface AnalyzeOptions {
  /** Bootstrap resamples over assessments (0 = none, the default). */
  bootstrap?: number;
  /** Seed of the bootstrap generator (default 1). */
  seed?: number;
  /** Minimum shared assessments for a pair of classifiers to be listed (default 2). */
  minSharedAssessments?: number;
}

export type Labelled<T> = T & { label: LandisKochLabel | null; ciMethod: CiMethod | null };
export type AlphaReport = AlphaResult & { note: KrippendorffNote | null; ciMethod: CiMethod | null };

/** A classifier's severity in the report (points; + = rates higher than the federation's average classifier). */
export interface SeverityStat extends StatResult {
  /** Other classifiers they shared at least one assessment with. */
  links: number;
}

export type ClassifierReport = ClassifierVsPanel & { severity: SeverityStat };

/** The severity model's summary in the report (decision record 0009). */
export interface SeverityReport {
  model: SeverityResult['model'];
  ciMethod: SeverityResult['ciMethod'];
  residualSd: number | null;
  df: number;
  /** Ratings and assessments the fit used (main component, panels of two or more, not clipped at one end). */
  n: number;
  assessments: number;
  /** Components of the panel network, largest (the one estimated) first. */
  components: { classifiers: string[]; ratings: number; assessments: number }[];
  reason?: string;
}

export interface AgreementReport {
  format: typeof REPORT_FORMAT;
  scale: { min: string; max: string; classes: number };
  counts: {
    assessments: number;
    ratings: number;
    classifiers: number;
    athletes: number;
    events: number;
    /** Assessments with two or more ratings (used by the panel statistics). */
    analysable: number;
    /** Assessments with a single rating (panels of one), ignored by the panel statistics. */
    notAnalysable: number;
  };
  exactAgreement: AgreementForms;
  withinHalfClassAgreement: AgreementForms;
  fleissKappa: Labelled<Omit<FleissKappaResult, 'byClass' | 'shares'>> & { name: string; shares: Record<string, number> };
  fleissKappaByClass: Record<string, StatResult>;
  krippendorffAlpha: { nominal: AlphaReport; ordinal: AlphaReport; interval: AlphaReport; ratio: AlphaReport };
  gwet: { ac1: Labelled<GwetResult>; ac2Linear: Labelled<GwetResult>; ac2Quadratic: Labelled<GwetResult> };
  pairs: PairAgreement[];
  classifiers: ClassifierReport[];
  severity: SeverityReport;
  boundaries: BoundarySplit[];
  bootstrap: { B: number; seed: number; results: Record<string, BootstrapResult> } | null;
  interpretation: typeof INTERPRETATION_SOURCES;
}

function labelled<T extends StatResult>(r: T, ciMethod: CiMethod | null): Labelled<T> {
  return { ...r, label: landisKochLabel(r.value), ciMethod: r.ci95 ? ciMethod : null };
}

/** Computes the whole report. Linear in the number of ratings (plus classifier pairs). */
export function analyzeRatings(set: RatingSet, options: AnalyzeOptions = {}): AgreementReport {
  const q = set.q;
  const table = countTable(set);
  // Identical panels merged once; every count-table statistic reads the patterns.
  const patterns: CountTable = compressPatterns(table, 1);
  let analysable = 0;
  for (let a = 0; a < table.rows; a++) if (table.totals[a] >= 2) analysable++;
  const points = Float64Array.from({ length: q }, (_, i) => classPoints(set, i));

  const agreement = observedAgreement(patterns);
  const fk = fleissKappa(patterns);
  const { byClass, shares, ...fkRest } = fk;
  const alpha = (metric: 'nominal' | 'ordinal' | 'interval' | 'ratio'): AlphaReport => {
    const r = krippendorffAlpha(patterns, metric, points);
    return { ...r, note: krippendorffNote(r.value), ciMethod: null };
  };
  const severity = classifierSeverity(set);
  const report: AgreementReport = {
    format: REPORT_FORMAT,
    scale: { min: formatClass(set.scale.min), max: formatClass(set.scale.max), classes: q },
    counts: {
      assessments: set.assessmentCount,
      ratings: set.ratingCount,
      classifiers: countUsed(set.ratingClassifier, set.classifierCodes.length),
      athletes: countUsed(set.athlete, set.athleteCodes.length),
      events: countUsed(set.event, set.eventCodes.length),
      analysable,
      notAnalysable: set.assessmentCount - analysable,
    },
    exactAgreement: agreement.exact,
    withinHalfClassAgreement: agreement.withinHalfClass,
    fleissKappa: {
      ...labelled(fkRest, fk.ciMethod),
      name: FLEISS_KAPPA_NAME,
      shares: Object.fromEntries(shares.map((p, j) => [classLabel(set, j), p])),
    },
    fleissKappaByClass: Object.fromEntries(byClass.map((r, j) => [classLabel(set, j), r])),
    krippendorffAlpha: { nominal: alpha('nominal'), ordinal: alpha('ordinal'), interval: alpha('interval'), ratio: alpha('ratio') },
    gwet: {
      ac1: labelled(gwetAC(patterns, 'unweighted'), 'wald'),
      ac2Linear: labelled(gwetAC(patterns, 'linear'), 'wald'),
      ac2Quadratic: labelled(gwetAC(patterns, 'quadratic'), 'wald'),
    },
    pairs: classifierPairs(set, options.minSharedAssessments ?? 2),
    classifiers: withSeverity(classifiersVsPanel(set), severity),
    severity: severitySummary(severity),
    boundaries: classBoundaries(patterns, set.scale),
    bootstrap: null,
    interpretation: INTERPRETATION_SOURCES,
  };

  const B = options.bootstrap ?? 0;
  if (B > 0) {
    const seed = options.seed ?? 1;
    const results = bootstrapCountTableMany(
      patterns,
      {
        fleissKappa: fleissKappaValue,
        krippendorffAlphaNominal: (t) => krippendorffAlphaValue(t, 'nominal', points),
        krippendorffAlphaOrdinal: (t) => krippendorffAlphaValue(t, 'ordinal', points),
        krippendorffAlphaInterval: (t) => krippendorffAlphaValue(t, 'interval', points),
        krippendorffAlphaRatio: (t) => krippendorffAlphaValue(t, 'ratio', points),
        gwetAc1: (t) => gwetACValue(t, 'unweighted'),
        gwetAc2Linear: (t) => gwetACValue(t, 'linear'),
        gwetAc2Quadratic: (t) => gwetACValue(t, 'quadratic'),
        exactUnanimous: (t) => observedAgreement(t).exact.unanimous.value,
        withinHalfClassUnanimous: (t) => observedAgreement(t).withinHalfClass.unanimous.value,
      },
      { B, seed },
    );
    const apply = <T extends { value: number | null; ci95: StatResult['ci95']; ciMethod: CiMethod | null }>(
      r: T,
      b: BootstrapResult,
    ): void => {
      if (r.value !== null && b.ci95) {
        r.ci95 = b.ci95;
        r.ciMethod = 'bootstrap-percentile';
      }
    };
    apply(report.fleissKappa, results.fleissKappa);
    apply(report.krippendorffAlpha.nominal, results.krippendorffAlphaNominal);
    apply(report.krippendorffAlpha.ordinal, results.krippendorffAlphaOrdinal);
    apply(report.krippendorffAlpha.interval, results.krippendorffAlphaInterval);
    apply(report.krippendorffAlpha.ratio, results.krippendorffAlphaRatio);
    apply(report.gwet.ac1, results.gwetAc1);
    apply(report.gwet.ac2Linear, results.gwetAc2Linear);
    apply(report.gwet.ac2Quadratic, results.gwetAc2Quadratic);
    report.bootstrap = { B, seed, results };
  }
  return report;
}

function countUsed(indices: Int32Array, size: number): number {
  const seen = new Uint8Array(size);
  let n = 0;
  for (let i = 0; i < indices.length; i++) {
    const v = indices[i];
    if (!seen[v]) {
      seen[v] = 1;
      n++;
    }
  }
  return n;
}

function withSeverity(rows: ClassifierVsPanel[], severity: SeverityResult): ClassifierReport[] {
  const byCode = new Map(severity.classifiers.map((c) => [c.code, c]));
  return rows.map((row) => {
    const s = byCode.get(row.code);
    const stat: SeverityStat = s
      ? { value: s.value, se: s.se, ci95: s.ci95, n: s.n, links: s.links }
      : { value: null, se: null, ci95: null, n: 0, links: 0, reason: 'no rating' };
    if (s?.reason !== undefined) stat.reason = s.reason;
    return { ...row, severity: stat };
  });
}

function severitySummary(r: SeverityResult): SeverityReport {
  const out: SeverityReport = {
    model: r.model,
    ciMethod: r.ciMethod,
    residualSd: r.residualSd,
    df: r.df,
    n: r.n,
    assessments: r.assessments,
    components: r.network.components,
  };
  if (r.reason !== undefined) out.reason = r.reason;
  return out;
}

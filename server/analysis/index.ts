/**
 * Panelwise agreement engine: public API. Pure TypeScript, no I/O.
 */
export type { Interval, StatResult } from './result';
export { Z95, normalQuantile } from './result';
export {
  ASSESSMENT_KINDS,
  RatingInputError,
  buildRatingSet,
  classLabel,
  classPoints,
  dayToIsoDate,
  dayToQuarter,
  filterRatingSet,
  isoDateToDay,
  subsetRatingSet,
} from './rating-set';
export type { AssessmentFilter, AssessmentKind, RatingRow, RatingSet } from './rating-set';
export { compressPatterns, countTable, countTableFromRatings, countTableFromRows } from './count-table';
export type { CountTable, PatternTable } from './count-table';
export { agreementWeights, weightsFromDisagreement, weightsFromMatrix } from './weights';
export type { Weighting } from './weights';
export { observedAgreement } from './observed-agreement';
export type { AgreementForms, ObservedAgreement } from './observed-agreement';
export { cohenKappa, contingencyTable, kappaFromTable } from './cohen-kappa';
export type { KappaResult } from './cohen-kappa';
export { fleissKappa, fleissKappaMeanShares, fleissKappaValue } from './fleiss-kappa';
export type { CiMethod, FleissKappaResult } from './fleiss-kappa';
export { alphaDistances, coincidenceMatrix, krippendorffAlpha, krippendorffAlphaValue } from './krippendorff-alpha';
export type { AlphaMetric, AlphaResult } from './krippendorff-alpha';
export { gwetAC, gwetACValue } from './gwet-ac';
export type { GwetResult } from './gwet-ac';
export { mulberry32 } from './prng';
export type { Prng } from './prng';
export { bootstrapCountTable, bootstrapCountTableMany, bootstrapPatterns } from './bootstrap';
export type { BootstrapOptions, BootstrapResult } from './bootstrap';
export { INTERPRETATION_SOURCES, krippendorffNote, landisKochLabel } from './interpretation';
export type { KrippendorffNote, LandisKochLabel } from './interpretation';
export { classifierPairs, pairAgreementFromTable, pairTable, pairTables } from './classifier-pairs';
export type { PairAgreement, PairTables } from './classifier-pairs';
export { classifierDeviations, classifiersVsPanel, othersMedian } from './classifier-panel';
export type { ClassifierVsPanel, DeviationSeries, PanelComparison } from './classifier-panel';
export { classBoundaries } from './class-boundaries';
export type { BoundarySplit } from './class-boundaries';
export { deviationByQuarter, seriesByQuarter } from './quarterly-series';
export type { QuarterPoint } from './quarterly-series';
export { classifierDrift, cusum } from './drift-detector';
export type { CusumAlarm, CusumOptions, CusumResult, DriftResult } from './drift-detector';
export { confusionBetween, confusionWithPanel } from './confusion-matrix';
export type { ConfusionMatrix } from './confusion-matrix';
export { assessmentOutcomes, classTransitions } from './class-transitions';
export type { ClassTransitions } from './class-transitions';
export { FLEISS_KAPPA_NAME, REPORT_FORMAT, analyzeRatings } from './report';
export type { AgreementReport, AlphaReport, AnalyzeOptions, ClassifierReport, Labelled, SeverityReport, SeverityStat } from './report';
export { recentPanelComparison } from './recent-window';
export type { RecentWindow } from './recent-window';
export { SEASON_START_MONTH, classDistributionBySeason, dayToSeasonYear, isoDateToSeasonYear, seasonLabel, seasonRange } from './seasons';
export type { SeasonDistribution } from './seasons';
export { classifierBoundarySplits } from './classifier-boundaries';
export type { ClassifierBoundarySplit } from './classifier-boundaries';
export { caseSpreads, raterScores } from './exercise-scores';
export type { CaseSpreadResult, RaterScore, ScoredAnswer, ScoredCase, SideSkills } from './exercise-scores';
export { panelBeforeAfter } from './panel-before-after';
export type { BeforeAfterResult, PanelWindowFigures, QuarterFigure } from './panel-before-after';
export {
  DRIFT_MIN_SEGMENT,
  DRIFT_PERMUTATIONS,
  DRIFT_STOP_AFTER,
  benjaminiHochberg,
  changePointStatistic,
  changePointTest,
  evaluateCalibration,
  hashSeed,
  meanTest,
} from './calibration-rules';
export type {
  AgreementVerdict,
  BiasVerdict,
  CalibrationOptions,
  CalibrationThresholds,
  ChangePoint,
  ClassifierCalibration,
  DriftVerdict,
} from './calibration-rules';
export { pointsApart, pointsAtStake, twoRaterCoefficients, twoRaterTable } from './points-at-stake';
export type { PointsAtStake } from './points-at-stake';
export { MAX_SEVERITY_CLASSIFIERS, SEVERITY_CI_METHOD, SEVERITY_MODEL, classifierSeverity } from './severity';
export type { ClassifierSeverity, PanelNetwork, PanelNetworkEdge, SeverityResult } from './severity';

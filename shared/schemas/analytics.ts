import { z } from 'zod';
import { assessmentKindSchema, isoDateSchema } from './common';

/**
 * The agreement dashboards: the filters every view takes (as URL search params, on the client
 * and the API alike), and the payloads of the analytics routes
 * (/api/federations/:federation/analytics/...).
 */

export const DEFAULT_MIN_SHARED = 10;

const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max)
    .transform((v) => (v === '' ? undefined : v))
    .optional();

/** Filters of every dashboard view. All optional; empty strings count as absent. */
export const analyticsFiltersSchema = z
  .object({
    /** Season by its starting year: 2024 is the season 2024–25 (1 July to 30 June). */
    season: z
      .string()
      .trim()
      .regex(/^(19|20)\d{2}$/, { message: 'Season must be a starting year such as 2024' })
      .optional()
      .or(z.literal('').transform(() => undefined)),
    /** Calendar quarter, written 2024-Q3 (July to September 2024). */
    quarter: z
      .string()
      .trim()
      .regex(/^(19|20)\d{2}-Q[1-4]$/, { message: 'Quarter must be written like 2024-Q3' })
      .optional()
      .or(z.literal('').transform(() => undefined)),
    /** Dates and events: leads and classifiers only (researchers and read tokens are refused, 400). */
    from: isoDateSchema.optional().or(z.literal('').transform(() => undefined)),
    to: isoDateSchema.optional().or(z.literal('').transform(() => undefined)),
    /** Event code. */
    event: optionalText(64),
    /** Competition category of the athlete (athletes.category). */
    category: optionalText(64),
    kind: assessmentKindSchema.optional().or(z.literal('').transform(() => undefined)),
    /** Minimum shared assessments for a pair of classifiers to be shown with a value. */
    minShared: z.coerce
      .number({ message: 'Minimum shared assessments must be a whole number' })
      .int({ message: 'Minimum shared assessments must be a whole number' })
      .min(1, { message: 'Minimum shared assessments must be at least 1' })
      .max(1000, { message: 'Minimum shared assessments must be at most 1000' })
      .optional(),
  })
  .refine((f) => !f.from || !f.to || f.from <= f.to, { message: 'The start date must not be after the end date', path: ['from'] });
export type AnalyticsFilters = z.infer<typeof analyticsFiltersSchema>;
export const ANALYTICS_FILTER_KEYS = ['season', 'quarter', 'from', 'to', 'event', 'category', 'kind', 'minShared'] as const;

/** Filters as query-string pairs (absent ones left out), in a fixed order. */
export function filtersToSearch(filters: AnalyticsFilters): string {
  const params = new URLSearchParams();
  for (const key of ANALYTICS_FILTER_KEYS) {
    const value = filters[key];
    if (value !== undefined && value !== '') params.set(key, String(value));
  }
  const text = params.toString();
  return text ? `?${text}` : '';
}

// ---------------------------------------------------------------------------------------------
// Building blocks

export const intervalSchema = z.tuple([z.number(), z.number()]);

/** A statistic as the engine returns it (value null with a reason when undefined). */
export const statSchema = z.object({
  value: z.number().nullable(),
  se: z.number().nullable(),
  ci95: intervalSchema.nullable(),
  n: z.number(),
  reason: z.string().optional(),
});
export type Stat = z.infer<typeof statSchema>;

export const bandLabelSchema = z.enum(['Poor', 'Slight', 'Fair', 'Moderate', 'Substantial', 'Almost Perfect']);

export const filterOptionsSchema = z.object({
  seasons: z.array(z.object({ year: z.number(), label: z.string(), from: z.string(), to: z.string() })),
  events: z.array(z.object({ code: z.string(), name: z.string(), season: z.string().nullable() })),
  categories: z.array(z.string()),
  kinds: z.array(assessmentKindSchema),
  defaultMinShared: z.number(),
});
export type FilterOptions = z.infer<typeof filterOptionsSchema>;

export const quarterStatSchema = z.object({
  quarter: z.string(),
  n: z.number(),
  value: z.number().nullable(),
  ci95: intervalSchema.nullable(),
});
export type QuarterStat = z.infer<typeof quarterStatSchema>;

export const confusionSchema = z.object({
  classes: z.array(z.string()),
  rowsAre: z.string(),
  columnsAre: z.string(),
  counts: z.array(z.array(z.number())),
  n: z.number(),
});
export type Confusion = z.infer<typeof confusionSchema>;

// ---------------------------------------------------------------------------------------------
// Flags

export const FLAG_RULES = ['bias', 'drift', 'agreement'] as const;
export const flagRuleSchema = z.enum(FLAG_RULES);
export type FlagRule = z.infer<typeof flagRuleSchema>;
export const FLAG_RULE_LABELS: Record<FlagRule, string> = {
  bias: 'Persistent lean away from the panel',
  drift: 'Change in own level (drift)',
  agreement: 'Same-class agreement below the federation',
};

/** Our own status names: a flag is open, then acknowledged (being looked at), then closed with a note. */
export const flagStatusSchema = z.enum(['open', 'acknowledged', 'closed']);
export type FlagStatus = z.infer<typeof flagStatusSchema>;
export const FLAG_STATUS_LABELS: Record<FlagStatus, string> = { open: 'Open', acknowledged: 'Acknowledged', closed: 'Closed' };

export const flagEvidenceSchema = z.object({
  /** What was measured, in words (for leads). */
  summary: z.string(),
  /** The same in plain words, for the classifier's own page. */
  plain: z.string().optional(),
  /** Bias: mean deviation (points); agreement: the classifier's same-class rate; drift: after − before (points). */
  value: z.number().nullable(),
  ci95: intervalSchema.nullable(),
  /** The lead's minimum size for the rule (points, or a share for agreement). */
  threshold: z.number(),
  /** Ratings the figure rests on, and the first and last of their dates. */
  n: z.number(),
  from: z.string().nullable(),
  to: z.string().nullable(),
  direction: z.enum(['up', 'down']).nullable(),
  /** The classifier's ratings in panels of two or more at the evaluation (all dates). */
  total: z.number().optional(),
  /** The test's p-value and its Benjamini–Hochberg adjustment across the roster. */
  p: z.number().nullable().optional(),
  pAdjusted: z.number().nullable().optional(),
  falseDiscoveryRate: z.number().optional(),
  /** Drift: estimated start of the change (midway between the last rating before it and the first after). */
  changeDate: z.string().nullable().optional(),
  /** Drift: the last rating date before and the first after the estimated change. */
  changeBetween: z.tuple([z.string(), z.string()]).nullable().optional(),
  /** Drift: mean deviation (points) before and after the change, and ratings on each side. */
  sizeBefore: z.number().nullable().optional(),
  sizeAfter: z.number().nullable().optional(),
  nBefore: z.number().optional(),
  nAfter: z.number().optional(),
  /** Agreement: the other classifiers' pooled same-class rate over the same dates. */
  othersRate: z.number().nullable().optional(),
});
export type FlagEvidence = z.infer<typeof flagEvidenceSchema>;

export const flagSchema = z.object({
  id: z.number(),
  classifierCode: z.string(),
  classifierName: z.string().nullable(),
  rule: flagRuleSchema,
  status: flagStatusSchema,
  note: z.string().nullable(),
  /** The latest evaluation's figures (when the condition no longer holds: today's figures, not the old ones). */
  evidence: flagEvidenceSchema,
  /** Whether the last evaluation still found the condition. */
  stillMet: z.boolean(),
  /** When and why the condition stopped holding (null while it holds). */
  lapsedAt: z.string().nullable(),
  lapseReason: z.string().nullable(),
  openedAt: z.string(),
  updatedAt: z.string(),
  evaluatedAt: z.string(),
});
export type CalibrationFlag = z.infer<typeof flagSchema>;

export const flagsResponseSchema = z.object({ flags: z.array(flagSchema), evaluatedAt: z.string().nullable() });
export type FlagsResponse = z.infer<typeof flagsResponseSchema>;

export const flagUpdateSchema = z
  .object({
    status: flagStatusSchema,
    note: z.string().trim().max(2000, { message: 'The note is at most 2,000 characters' }).optional(),
  })
  .refine((v) => v.status !== 'closed' || (v.note !== undefined && v.note.length > 0), {
    message: 'Closing a flag needs a note saying what was done',
    path: ['note'],
  });
export type FlagUpdate = z.infer<typeof flagUpdateSchema>;

export const evaluateResponseSchema = z.object({ opened: z.number(), updated: z.number(), lapsed: z.number(), evaluatedAt: z.string() });
export type EvaluateResponse = z.infer<typeof evaluateResponseSchema>;

/** Thresholds of the calibration flags, set by the lead. Defaults and their simulated rates: decision record 0008. */
const whole = (min: number, max: number, unit: string) =>
  z.coerce
    .number({ message: 'Enter a whole number' })
    .int({ message: 'Enter a whole number' })
    .min(min, { message: `At least ${min} ${unit}` })
    .max(max, { message: `At most ${max.toLocaleString('en')} ${unit}` });
const number = (min: number, max: number, unit: string) =>
  z.coerce
    .number({ message: 'Enter a number' })
    .min(min, { message: `At least ${min} ${unit}` })
    .max(max, { message: `At most ${max} ${unit}` });

export const flagThresholdsSchema = z.object({
  /** Benjamini–Hochberg false-discovery rate per rule across the roster. */
  falseDiscoveryRate: number(0.001, 0.2, '(a share)'),
  /** bias: smallest lean (points) worth a flag. */
  biasMin: number(0.05, 2, 'points'),
  biasWindow: whole(20, 10000, 'ratings'),
  /** agreement: smallest shortfall of the same-class rate below the other classifiers'. */
  agreementGap: number(0.01, 1, '(a share)'),
  agreementWindow: whole(20, 10000, 'ratings'),
  /** drift: smallest change of level (points) worth a flag. */
  driftMin: number(0.05, 2, 'points'),
  driftEnabled: z.boolean(),
  minRatings: whole(10, 10000, 'ratings'),
  notifyLead: z.boolean(),
});
export type FlagThresholds = z.infer<typeof flagThresholdsSchema>;
export type FlagThresholdsInput = z.input<typeof flagThresholdsSchema>;

export const DEFAULT_FLAG_THRESHOLDS: FlagThresholds = {
  falseDiscoveryRate: 0.05,
  biasMin: 0.15,
  biasWindow: 150,
  agreementGap: 0.1,
  agreementWindow: 150,
  driftMin: 0.2,
  driftEnabled: true,
  minRatings: 30,
  notifyLead: true,
};

// ---------------------------------------------------------------------------------------------
// Views

const labelledStatSchema = statSchema.extend({
  label: bandLabelSchema.nullable(),
  ciMethod: z.string().nullable(),
});

/** Points at stake (our own figure): distance from the panel's final class, in points. */
export const pointsAtStakeSchema = z.object({
  n: z.number(),
  /** Mean |own class − final class| in points. */
  meanAbs: statSchema,
  /** Share of ratings half a class or more from the final class. */
  offByHalf: statSchema,
  /** meanAbs × 100. */
  per100: z.number().nullable(),
});
export type PointsAtStakeFigures = z.infer<typeof pointsAtStakeSchema>;

/** One row of the coefficients table: every coefficient the engine computes for the federation. */
export const coefficientSchema = z.object({
  id: z.string(),
  name: z.string(),
  /** observed: raw shares; chance-corrected: unweighted coefficients; weighted: partial credit for near misses. */
  family: z.enum(['observed', 'chance-corrected', 'weighted']),
  value: z.number().nullable(),
  ci95: intervalSchema.nullable(),
  n: z.number(),
  /** How the interval was computed (bootstrap-percentile, wilson, wald, wald-null-se), null without one. */
  ciMethod: z.string().nullable(),
  /** What it measures, in one line. */
  measures: z.string(),
  /** For weighted figures: what they forgive. */
  forgives: z.string().nullable(),
  /** The coefficient's own published reading, only where one exists. */
  interpretation: z.object({ label: z.string(), source: z.string() }).nullable(),
  reason: z.string().optional(),
});
export type Coefficient = z.infer<typeof coefficientSchema>;

export const splitSchema = statSchema.extend({
  lower: z.string(),
  upper: z.string(),
  splitRate: z.number().nullable(),
  splits: z.number(),
});

export const overviewSchema = z.object({
  counts: z.object({
    assessments: z.number(),
    ratings: z.number(),
    classifiers: z.number(),
    athletes: z.number(),
    events: z.number(),
    analysable: z.number(),
  }),
  /** The headline, in the trade's terms: same class, half-point splits, points at stake. */
  headline: z.object({
    panelsUnanimous: statSchema,
    pairwiseSameClass: statSchema,
    splits: z.array(splitSchema),
    pointsAtStake: pointsAtStakeSchema,
  }),
  /** Ordinal alpha with Krippendorff's (2004) rule; no kappa bands (label is always null). */
  alpha: labelledStatSchema.extend({ name: z.string(), note: z.enum(['reliable', 'tentative', 'unreliable']).nullable() }),
  /** Unweighted Fleiss' kappa with Landis & Koch's bands. */
  fleissKappa: labelledStatSchema.extend({ name: z.string() }),
  gwet: z.object({ ac1: labelledStatSchema, ac2Linear: labelledStatSchema, ac2Quadratic: labelledStatSchema }),
  exact: statSchema,
  withinHalfClass: statSchema,
  coefficients: z.array(coefficientSchema),
  trend: z.array(quarterStatSchema),
  bootstrap: z.object({ B: z.number(), seed: z.number() }),
  sources: z.object({ landisKoch: z.string(), krippendorff: z.string() }),
  /** Open and acknowledged flags (leads only; null for other roles). */
  openFlags: z.array(flagSchema).nullable(),
});
export type Overview = z.infer<typeof overviewSchema>;

/**
 * A classifier's severity from the two-way model (decision record 0009): points, + = rates higher
 * than the federation's average classifier would for the same athlete; null with a reason when
 * the panel network does not link them to the others.
 */
export const severityStatSchema = statSchema.extend({
  /** Other classifiers they shared at least one assessment with. */
  links: z.number(),
});
export type SeverityStat = z.infer<typeof severityStatSchema>;

/** Who shared assessments with whom: the panel network behind the severities (leads only). */
export const panelNetworkSchema = z.object({
  /** Connected components, largest first; severities are estimated on the first one. */
  components: z.array(z.object({ classifiers: z.array(z.string()), ratings: z.number(), assessments: z.number() })),
  /** Pairs that shared at least one assessment, sorted by codes. */
  edges: z.array(z.object({ a: z.string(), b: z.string(), shared: z.number() })),
});
export type PanelNetworkData = z.infer<typeof panelNetworkSchema>;

export const severityModelSchema = z.object({
  model: z.string(),
  ciMethod: z.string(),
  /** Residual standard deviation in points. */
  residualSd: z.number().nullable(),
  /** Ratings and assessments the fit used. */
  n: z.number(),
  assessments: z.number(),
  reason: z.string().optional(),
});
export type SeverityModel = z.infer<typeof severityModelSchema>;

export const classifierRowSchema = z.object({
  code: z.string(),
  name: z.string().nullable(),
  n: z.number(),
  ratings: z.number(),
  exactWithPanel: statSchema,
  withinHalfWithPanel: statSchema,
  /** Mean signed deviation from the other panel members, in points (0.5 = one class). */
  bias: statSchema,
  quadraticKappa: statSchema,
  /** Distance from the panel's final class, in points. */
  pointsAtStake: pointsAtStakeSchema,
  /** Severity on the federation's common scale (two-way model), points. */
  severity: severityStatSchema,
  /** Mean signed deviation by quarter (the sparkline). */
  trend: z.array(quarterStatSchema),
  flags: z.array(z.object({ id: z.number(), rule: flagRuleSchema, status: flagStatusSchema })),
});
export type ClassifierRow = z.infer<typeof classifierRowSchema>;
export const classifiersResponseSchema = z.object({
  classifiers: z.array(classifierRowSchema),
  /** The severity model's summary and the panel network behind it. */
  severityModel: severityModelSchema,
  network: panelNetworkSchema,
});
export type ClassifiersResponse = z.infer<typeof classifiersResponseSchema>;

export const boundarySplitSchema = statSchema.extend({
  lower: z.string(),
  upper: z.string(),
  splitRate: z.number().nullable(),
  touching: z.number(),
  above: z.number(),
  below: z.number(),
});

/** The classifier's deviation series and its strongest change of level (decision record 0008). */
export const driftSeriesSchema = z.object({
  n: z.number(),
  method: z.string(),
  /** Chronological deviations from the rest of the panel (points), one per rating. */
  points: z.array(z.object({ index: z.number(), date: z.string(), deviation: z.number() })),
  /** The strongest change under these filters (raw permutation p; flags use the roster-wide adjustment). */
  change: z
    .object({
      index: z.number(),
      changeDate: z.string(),
      between: z.tuple([z.string(), z.string()]),
      direction: z.enum(['up', 'down']).nullable(),
      sizeBefore: z.number(),
      sizeAfter: z.number(),
      nBefore: z.number(),
      nAfter: z.number(),
      p: z.number(),
    })
    .nullable(),
});

/** The headline of a classifier's page: same class, points at stake, then the coefficients. */
export const classifierHeadlineSchema = z.object({
  /** Same class as the panel's final class. */
  sameAsFinal: statSchema,
  /** Same class as the median of the other members. */
  sameAsOthers: statSchema,
  pointsAtStake: pointsAtStakeSchema,
  /** Against the panel's final class: unweighted Cohen's kappa and Gwet's AC1, then the weighted kappa. */
  kappa: labelledStatSchema,
  ac1: labelledStatSchema,
  quadraticKappa: labelledStatSchema,
});

export const classifierDetailSchema = z.object({
  code: z.string(),
  name: z.string().nullable(),
  row: classifierRowSchema,
  headline: classifierHeadlineSchema,
  confusion: confusionSchema,
  biasByQuarter: z.array(quarterStatSchema),
  boundaries: z.array(boundarySplitSchema),
  drift: driftSeriesSchema,
  flags: z.array(flagSchema),
});
export type ClassifierDetail = z.infer<typeof classifierDetailSchema>;

export const myAgreementSchema = classifierDetailSchema.extend({
  /** The federation's classifiers' figures without names or codes, sorted ascending. */
  distribution: z.object({ quadraticKappa: z.array(z.number()), bias: z.array(z.number()), exactWithPanel: z.array(z.number()) }),
});
export type MyAgreement = z.infer<typeof myAgreementSchema>;

export const pairCellSchema = z.object({
  a: z.string(),
  b: z.string(),
  n: z.number(),
  tooFew: z.boolean(),
  /** Quadratically weighted kappa; null when the pair has too few shared assessments. */
  quadraticKappa: statSchema.nullable(),
  exact: statSchema.nullable(),
});
export type PairCell = z.infer<typeof pairCellSchema>;
export const pairsResponseSchema = z.object({ minShared: z.number(), classifiers: z.array(z.string()), pairs: z.array(pairCellSchema) });
export type PairsResponse = z.infer<typeof pairsResponseSchema>;

export const pairDetailSchema = z.object({
  a: z.string(),
  b: z.string(),
  n: z.number(),
  minShared: z.number(),
  tooFew: z.boolean(),
  stats: z
    .object({
      exact: statSchema,
      withinHalfClass: statSchema,
      /** Points apart on shared assessments (mean |a − b| in points, share half a class or more apart). */
      pointsApart: pointsAtStakeSchema,
      splits: z.array(boundarySplitSchema),
      kappa: statSchema,
      ac1: statSchema,
      linearKappa: statSchema,
      quadraticKappa: statSchema,
    })
    .nullable(),
  confusion: confusionSchema,
});
export type PairDetail = z.infer<typeof pairDetailSchema>;

export const boundariesResponseSchema = z.object({
  boundaries: z.array(statSchema.extend({ lower: z.string(), upper: z.string(), splitRate: z.number().nullable(), splits: z.number() })),
  trend: z.array(
    z.object({ quarter: z.string(), boundary: z.string(), n: z.number(), value: z.number().nullable(), ci95: intervalSchema.nullable() }),
  ),
});
export type BoundariesResponse = z.infer<typeof boundariesResponseSchema>;

export const raterDriftSchema = z.object({
  parameters: z.object({ method: z.string(), falseDiscoveryRate: z.number(), driftMin: z.number() }),
  classifiers: z.array(
    z.object({
      code: z.string(),
      name: z.string().nullable(),
      n: z.number(),
      byQuarter: z.array(quarterStatSchema),
      /** The strongest change of level under these filters, and whether it passes the drift rule. */
      change: z
        .object({
          changeDate: z.string(),
          direction: z.enum(['up', 'down']).nullable(),
          size: z.number(),
          pAdjusted: z.number().nullable(),
          met: z.boolean(),
        })
        .nullable(),
    }),
  ),
});
export type RaterDrift = z.infer<typeof raterDriftSchema>;

export const classDriftSchema = z.object({
  transitions: z.object({
    classes: z.array(z.string()),
    counts: z.array(z.array(z.number())),
    n: z.number(),
    changed: statSchema,
    reviewsChanged: statSchema,
    protestsChanged: statSchema,
  }),
  /** Each change with athlete and date: leads only (null for other roles). */
  changes: z.array(z.object({ athleteCode: z.string(), from: z.string(), to: z.string(), on: z.string(), kind: z.string() })).nullable(),
  distribution: z.array(z.object({ season: z.string(), year: z.number(), n: z.number(), counts: z.record(z.string(), z.number()) })),
});
export type ClassDrift = z.infer<typeof classDriftSchema>;

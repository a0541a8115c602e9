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
export const ANALYTICS_FILTER_KEYS = ['season', 'from', 'to', 'event', 'category', 'kind', 'minShared'] as const;

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

export const quarterStatSchema = z.object({ quarter: z.string(), n: z.number(), value: z.number().nullable(), ci95: intervalSchema.nullable() });
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

export const flagRuleSchema = z.enum(['kappa', 'bias', 'drift']);
export type FlagRule = z.infer<typeof flagRuleSchema>;
export const FLAG_RULE_LABELS: Record<FlagRule, string> = {
  kappa: 'Low weighted kappa with the panel',
  bias: 'Leaning away from the panel',
  drift: 'Drift alarm',
};

/** Our own status names: a flag is open, then acknowledged (being looked at), then closed with a note. */
export const flagStatusSchema = z.enum(['open', 'acknowledged', 'closed']);
export type FlagStatus = z.infer<typeof flagStatusSchema>;
export const FLAG_STATUS_LABELS: Record<FlagStatus, string> = { open: 'Open', acknowledged: 'Acknowledged', closed: 'Closed' };

export const flagEvidenceSchema = z.object({
  /** What was measured, in words. */
  summary: z.string(),
  value: z.number().nullable(),
  ci95: intervalSchema.nullable(),
  threshold: z.number(),
  /** Ratings the figure rests on. */
  n: z.number(),
  from: z.string().nullable(),
  to: z.string().nullable(),
  direction: z.enum(['up', 'down']).nullable(),
});
export type FlagEvidence = z.infer<typeof flagEvidenceSchema>;

export const flagSchema = z.object({
  id: z.number(),
  classifierCode: z.string(),
  classifierName: z.string().nullable(),
  rule: flagRuleSchema,
  status: flagStatusSchema,
  note: z.string().nullable(),
  evidence: flagEvidenceSchema,
  /** Whether the last evaluation still found the condition. */
  stillMet: z.boolean(),
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

export const evaluateResponseSchema = z.object({ opened: z.number(), updated: z.number(), evaluatedAt: z.string() });
export type EvaluateResponse = z.infer<typeof evaluateResponseSchema>;

/** Thresholds of the calibration flags, set by the lead. Defaults in docs/dashboards.md. */
export const flagThresholdsSchema = z.object({
  kappaMin: z.coerce.number({ message: 'Enter a number' }).min(0, { message: 'At least 0' }).max(1, { message: 'At most 1' }),
  kappaWindow: z.coerce.number({ message: 'Enter a whole number' }).int({ message: 'Enter a whole number' }).min(10, { message: 'At least 10 ratings' }).max(10000, { message: 'At most 10,000 ratings' }),
  biasMax: z.coerce.number({ message: 'Enter a number' }).min(0.05, { message: 'At least 0.05 points' }).max(2, { message: 'At most 2 points' }),
  biasWindow: z.coerce.number({ message: 'Enter a whole number' }).int({ message: 'Enter a whole number' }).min(5, { message: 'At least 5 ratings' }).max(10000, { message: 'At most 10,000 ratings' }),
  minRatings: z.coerce.number({ message: 'Enter a whole number' }).int({ message: 'Enter a whole number' }).min(1, { message: 'At least 1' }).max(10000, { message: 'At most 10,000' }),
  driftEnabled: z.boolean(),
  driftK: z.coerce.number({ message: 'Enter a number' }).min(0, { message: 'At least 0' }).max(5, { message: 'At most 5' }),
  driftH: z.coerce.number({ message: 'Enter a number' }).min(1, { message: 'At least 1' }).max(50, { message: 'At most 50' }),
  driftWindow: z.coerce.number({ message: 'Enter a whole number' }).int({ message: 'Enter a whole number' }).min(5, { message: 'At least 5 ratings' }).max(10000, { message: 'At most 10,000 ratings' }),
  notifyLead: z.boolean(),
});
export type FlagThresholds = z.infer<typeof flagThresholdsSchema>;
export type FlagThresholdsInput = z.input<typeof flagThresholdsSchema>;

export const DEFAULT_FLAG_THRESHOLDS: FlagThresholds = {
  kappaMin: 0.8,
  kappaWindow: 100,
  biasMax: 0.25,
  biasWindow: 30,
  minRatings: 20,
  driftEnabled: true,
  driftK: 0.5,
  driftH: 5,
  driftWindow: 100,
  notifyLead: true,
};

// ---------------------------------------------------------------------------------------------
// Views

const labelledStatSchema = statSchema.extend({
  label: bandLabelSchema.nullable(),
  ciMethod: z.string().nullable(),
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
  alpha: labelledStatSchema.extend({ name: z.string(), note: z.enum(['reliable', 'tentative', 'unreliable']).nullable() }),
  fleissKappa: labelledStatSchema.extend({ name: z.string() }),
  exact: statSchema,
  withinHalfClass: statSchema,
  trend: z.array(quarterStatSchema),
  bootstrap: z.object({ B: z.number(), seed: z.number() }),
  sources: z.object({ landisKoch: z.string(), krippendorff: z.string() }),
  /** Open and acknowledged flags (leads only; null for other roles). */
  openFlags: z.array(flagSchema).nullable(),
});
export type Overview = z.infer<typeof overviewSchema>;

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
  /** Mean signed deviation by quarter (the sparkline). */
  trend: z.array(quarterStatSchema),
  flags: z.array(z.object({ id: z.number(), rule: flagRuleSchema, status: flagStatusSchema })),
});
export type ClassifierRow = z.infer<typeof classifierRowSchema>;
export const classifiersResponseSchema = z.object({ classifiers: z.array(classifierRowSchema) });
export type ClassifiersResponse = z.infer<typeof classifiersResponseSchema>;

export const boundarySplitSchema = statSchema.extend({
  lower: z.string(),
  upper: z.string(),
  splitRate: z.number().nullable(),
  touching: z.number(),
  above: z.number(),
  below: z.number(),
});

export const driftSeriesSchema = z.object({
  n: z.number(),
  k: z.number(),
  h: z.number(),
  sigma: z.number(),
  /** Chronological CUSUM sums (upper: rating higher, lower: rating lower), one per rating. */
  points: z.array(z.object({ index: z.number(), upper: z.number(), lower: z.number(), deviation: z.number() })),
  alarms: z.array(z.object({ index: z.number(), direction: z.enum(['up', 'down']), quarter: z.string() })),
});

export const classifierDetailSchema = z.object({
  code: z.string(),
  name: z.string().nullable(),
  row: classifierRowSchema,
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
    .object({ exact: statSchema, withinHalfClass: statSchema, kappa: statSchema, linearKappa: statSchema, quadraticKappa: statSchema })
    .nullable(),
  confusion: confusionSchema,
});
export type PairDetail = z.infer<typeof pairDetailSchema>;

export const boundariesResponseSchema = z.object({
  boundaries: z.array(statSchema.extend({ lower: z.string(), upper: z.string(), splitRate: z.number().nullable(), splits: z.number() })),
  trend: z.array(z.object({ quarter: z.string(), boundary: z.string(), n: z.number(), value: z.number().nullable(), ci95: intervalSchema.nullable() })),
});
export type BoundariesResponse = z.infer<typeof boundariesResponseSchema>;

export const raterDriftSchema = z.object({
  parameters: z.object({ k: z.number(), h: z.number(), sigma: z.number() }),
  classifiers: z.array(
    z.object({
      code: z.string(),
      name: z.string().nullable(),
      n: z.number(),
      byQuarter: z.array(quarterStatSchema),
      alarms: z.number(),
      lastAlarm: z.object({ quarter: z.string(), direction: z.enum(['up', 'down']) }).nullable(),
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

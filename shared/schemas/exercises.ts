/**
 * Calibration exercises: what a lead sends to create one, what a classifier sends as an answer,
 * and what the API answers. Classes are integers of half points (shared/scale.ts).
 *
 * Blindness (docs/decisions/0010-calibration-exercises.md): before the close, a classifier's view
 * of an exercise has no `referenceClass` on its cases and no one's answers but their own.
 */
import { z } from 'zod';
import { statSchema } from './analytics';
import { isoDateSchema } from './common';

/** The skills a classifier watches (a fact of the trade), in the order people name them. */
export const SKILLS = ['pushing', 'stopping', 'dribbling', 'passing', 'catching', 'shooting', 'rebounding', 'chair-contact'] as const;
export const skillSchema = z.enum(SKILLS, { message: `is not one of the skills (${SKILLS.join(', ')})` });
export type Skill = z.infer<typeof skillSchema>;

export const SKILL_LABELS: Record<Skill, string> = {
  pushing: 'Pushing',
  stopping: 'Stopping',
  dribbling: 'Dribbling',
  passing: 'Passing',
  catching: 'Catching',
  shooting: 'Shooting',
  rebounding: 'Rebounding',
  'chair-contact': 'Reaction to chair contact',
};

export const exerciseStatusSchema = z.enum(['draft', 'open', 'closed']);
export type ExerciseStatus = z.infer<typeof exerciseStatusSchema>;

export const EXERCISE_STATUS_LABELS: Record<ExerciseStatus, string> = { draft: 'Draft', open: 'Open', closed: 'Closed' };

const halfPoints = z
  .number({ message: 'Enter a class' })
  .int({ message: 'is not a class in half points' })
  .min(2, { message: 'is below 1.0' })
  .max(10, { message: 'is above 5.0' });

/** An http(s) link (a video to watch): only the address is kept. */
export const videoUrlSchema = z
  .string()
  .trim()
  .max(2000, { message: 'The link is at most 2,000 characters' })
  .refine(
    (v) => {
      try {
        const u = new URL(v);
        return (u.protocol === 'http:' || u.protocol === 'https:') && u.hostname.length > 0;
      } catch {
        return false;
      }
    },
    { message: 'is not an http(s) address' },
  );

const uniqueSkills = z
  .array(skillSchema)
  .max(SKILLS.length)
  .refine((a) => new Set(a).size === a.length, { message: 'names a skill twice' });

export const exerciseCaseInputSchema = z.object({
  description: z
    .string()
    .trim()
    .min(1, { message: 'Describe the case' })
    .max(2000, { message: 'The description is at most 2,000 characters' }),
  videoUrl: z
    .union([videoUrlSchema, z.literal('').transform(() => null), z.null()])
    .optional()
    .transform((v) => v ?? null),
  skills: uniqueSkills.min(1, { message: 'Tick at least one skill to watch' }),
  referenceClass: halfPoints,
});
export type ExerciseCaseInput = z.input<typeof exerciseCaseInputSchema>;

export const exerciseSourceSchema = z.object({
  kind: z.enum(['flag', 'boundary']),
  ref: z.string().regex(/^\d{1,9}$/, { message: 'is not a flag id or a class' }),
});
export type ExerciseSource = z.infer<typeof exerciseSourceSchema>;

const classifierCode = z.string().regex(/^[A-Za-z0-9._-]{1,64}$/, { message: 'is not a classifier code' });

export const exerciseInputSchema = z
  .object({
    title: z.string().trim().min(1, { message: 'Give the exercise a title' }).max(200, { message: 'The title is at most 200 characters' }),
    opensOn: isoDateSchema,
    closesOn: isoDateSchema,
    cases: z.array(exerciseCaseInputSchema).min(1, { message: 'Add at least one case' }).max(60, { message: 'At most 60 cases' }),
    classifierCodes: z
      .array(classifierCode)
      .min(1, { message: 'Assign at least one classifier' })
      .max(100)
      .refine((a) => new Set(a).size === a.length, { message: 'names a classifier twice' }),
    source: exerciseSourceSchema.nullable().optional(),
  })
  .refine((v) => v.closesOn >= v.opensOn, { message: 'The close date is before the open date', path: ['closesOn'] });
export type ExerciseInput = z.input<typeof exerciseInputSchema>;

export const answerInputSchema = z.object({
  sportClass: halfPoints,
  skills: uniqueSkills.default([]),
  reason: z
    .string()
    .trim()
    .max(500, { message: 'The reason is at most 500 characters' })
    .optional()
    .transform((v) => (v ? v : null)),
});
export type AnswerInput = z.input<typeof answerInputSchema>;

export const closeFlagInputSchema = z.object({
  note: z
    .string()
    .trim()
    .min(1, { message: 'Say what the exercise showed' })
    .max(2000, { message: 'The note is at most 2,000 characters' }),
});

// ---------------------------------------------------------------------------------------------
// Responses

export const exerciseSummarySchema = z.object({
  id: z.number(),
  title: z.string(),
  status: exerciseStatusSchema,
  opensOn: z.string(),
  closesOn: z.string(),
  cases: z.number(),
  assigned: z.number(),
  finished: z.number(),
  /** The caller's own progress (classifiers). */
  mine: z.object({ answered: z.number(), finished: z.boolean() }).nullable(),
});
export type ExerciseSummary = z.infer<typeof exerciseSummarySchema>;

/** The federation's class scale in half points (the classes a case or an answer may take). */
export const scaleSchema = z.object({ min: z.number(), max: z.number() });

export const exerciseListSchema = z.object({ exercises: z.array(exerciseSummarySchema), scale: scaleSchema });
export type ExerciseList = z.infer<typeof exerciseListSchema>;

export const exerciseCaseViewSchema = z.object({
  id: z.number(),
  position: z.number(),
  description: z.string(),
  videoUrl: z.string().nullable(),
  skills: z.array(skillSchema),
  /** Absent from a classifier's view before the close. */
  referenceClass: z.number().optional(),
});
export type ExerciseCaseView = z.infer<typeof exerciseCaseViewSchema>;

export const answerViewSchema = z.object({
  caseId: z.number(),
  sportClass: z.number(),
  skills: z.array(skillSchema),
  reason: z.string().nullable(),
  updatedAt: z.string(),
});
export type AnswerView = z.infer<typeof answerViewSchema>;

export const assignmentViewSchema = z.object({
  classifierCode: z.string(),
  classifierName: z.string(),
  hasAccount: z.boolean(),
  hadOpenFlag: z.boolean(),
  answered: z.number(),
  finishedAt: z.string().nullable(),
  invitedAt: z.string().nullable(),
  remindedAt: z.string().nullable(),
});
export type AssignmentView = z.infer<typeof assignmentViewSchema>;

export const classifierScoreSchema = z.object({
  classifierCode: z.string(),
  classifierName: z.string(),
  answered: z.number(),
  exact: statSchema,
  withinHalf: statSchema,
  quadraticKappa: statSchema,
  /** Mean of (answer − reference) in points; positive = above the reference. */
  bias: statSchema,
  /** Mean |answer − reference| in points. */
  meanAbsolutePoints: z.number().nullable(),
  /** Share of answers off by half a point (one class) or more, and by a whole point or more. */
  offByHalfPoint: statSchema,
  offByOnePoint: statSchema,
});
export type ClassifierScore = z.infer<typeof classifierScoreSchema>;

const sideSchema = z.object({ answers: z.number(), skills: z.array(z.object({ skill: skillSchema, n: z.number() })) });

export const caseSpreadSchema = z.object({
  caseId: z.number(),
  position: z.number(),
  referenceClass: z.number(),
  answers: z.number(),
  counts: z.array(z.object({ sportClass: z.number(), n: z.number() })),
  lowest: z.number().nullable(),
  highest: z.number().nullable(),
  rangePoints: z.number().nullable(),
  exactShare: z.number().nullable(),
  /** Answers fall in more than one class. */
  split: z.boolean(),
  /** The boundary that divides the answers best: the lower class of it (half points). */
  boundary: z.number().nullable(),
  lower: sideSchema.nullable(),
  upper: sideSchema.nullable(),
});
export type CaseSpread = z.infer<typeof caseSpreadSchema>;

export const panelWindowSchema = z.object({
  n: z.number(),
  from: z.string().nullable(),
  to: z.string().nullable(),
  exactWithPanel: statSchema,
  withinHalfWithPanel: statSchema,
  quadraticKappaWithPanel: statSchema,
  meanDeviation: statSchema,
});
export type PanelWindow = z.infer<typeof panelWindowSchema>;

export const beforeAfterSchema = z.object({
  classifierCode: z.string(),
  classifierName: z.string(),
  before: panelWindowSchema,
  after: panelWindowSchema,
  quarters: z.array(
    z.object({
      quarter: z.string(),
      phase: z.enum(['before', 'during', 'after']),
      n: z.number(),
      exact: z.number().nullable(),
      meanDeviation: z.number().nullable(),
    }),
  ),
});
export type BeforeAfter = z.infer<typeof beforeAfterSchema>;

export const exerciseResultsSchema = z.object({
  classifiers: z.array(classifierScoreSchema),
  cases: z.array(caseSpreadSchema),
  /** Classifiers who had an open calibration flag: their live-panel figures before and after (leads). */
  beforeAfter: z.array(beforeAfterSchema),
  window: z.number(),
});
export type ExerciseResults = z.infer<typeof exerciseResultsSchema>;

export const exerciseDetailSchema = exerciseSummarySchema.extend({
  scale: scaleSchema,
  source: exerciseSourceSchema.nullable(),
  openedAt: z.string().nullable(),
  closedAt: z.string().nullable(),
  caseList: z.array(exerciseCaseViewSchema),
  /** The caller's own answers (classifiers); null for leads. */
  myAnswers: z.array(answerViewSchema).nullable(),
  /** Who is assigned and how far they are (leads); null for classifiers. */
  assignments: z.array(assignmentViewSchema).nullable(),
  /** After the close: scores (a classifier sees their own row and the anonymous case spreads). */
  results: exerciseResultsSchema.nullable(),
  /** Flags closed with a link to this exercise (leads). */
  linkedFlags: z.array(z.object({ id: z.number(), classifierCode: z.string(), rule: z.string() })),
});
export type ExerciseDetail = z.infer<typeof exerciseDetailSchema>;

export const exerciseProposalSchema = z.object({
  title: z.string(),
  source: exerciseSourceSchema,
  boundary: z.number(),
  cases: z.array(exerciseCaseInputSchema.extend({ videoUrl: z.string().nullable() })),
  classifierCodes: z.array(z.string()),
  note: z.string(),
});
export type ExerciseProposal = z.infer<typeof exerciseProposalSchema>;

export const proposalQuerySchema = z
  .object({
    flag: z.coerce.number().int().positive().optional(),
    boundary: z.coerce.number().int().min(2).max(9).optional(),
  })
  .refine((v) => (v.flag === undefined) !== (v.boundary === undefined), { message: 'Give either a flag or a boundary' });

export const answerSavedSchema = z.object({ answer: answerViewSchema, answered: z.number(), finished: z.boolean() });

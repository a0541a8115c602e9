import { z } from 'zod';
import { assessmentKindSchema } from './common';

/**
 * Anonymised research exports: what a researcher or a lead asks for, and what the API answers.
 * No identity ever appears in these payloads for a researcher (see docs/decisions/0007-research-export.md).
 */

/** A season runs from 1 July to 30 June and is written "2023-24". */
export const seasonLabelSchema = z.string().regex(/^\d{4}-\d{2}$/, { message: 'A season is written like 2023-24' });

/** Optional columns; assessment, classifier and sport_class are always exported. */
export const EXPORT_FIELDS = ['athlete', 'panel_class', 'kind', 'season', 'event', 'event_level', 'category', 'date'] as const;
export const exportFieldSchema = z.enum(EXPORT_FIELDS);
export type ExportField = z.infer<typeof exportFieldSchema>;

export const EXPORT_FIELD_LABELS: Record<ExportField, string> = {
  athlete: 'Athlete (pseudonym)',
  panel_class: "Panel's final class",
  kind: 'Assessment kind',
  season: 'Season',
  event: 'Event (pseudonym)',
  event_level: 'Event level',
  category: 'Competition category',
  date: 'Date (coarsened)',
};

export const dateModeSchema = z.enum(['month', 'offset']);
export type DateMode = z.infer<typeof dateModeSchema>;

export const DATE_MODE_LABELS: Record<DateMode, string> = {
  month: 'Month of the assessment (YYYY-MM)',
  offset: "Days since the athlete's first assessment in the export",
};

const shortText = z.string().trim().min(1).max(60);

export const exportScopeSchema = z.object({
  seasons: z.array(seasonLabelSchema).min(1, { message: 'Choose at least one season' }).max(100),
  eventLevels: z.array(shortText).min(1, { message: 'Choose at least one event level' }).max(50),
  /** Leads only: narrow to these events (by their internal id). Researchers choose by level. */
  eventIds: z.array(z.number().int().positive()).max(1000).optional(),
  categories: z.array(shortText).min(1, { message: 'Choose at least one competition category' }).max(50),
  kinds: z.array(assessmentKindSchema).min(1, { message: 'Choose at least one assessment kind' }),
});
export type ExportScope = z.infer<typeof exportScopeSchema>;

export const exportRequestSchema = z.object({
  scope: exportScopeSchema,
  fields: z.array(exportFieldSchema).max(EXPORT_FIELDS.length),
  dateMode: dateModeSchema,
  /** Export under a study's stable salt (exports of one study can be joined); null: a fresh salt. */
  studyId: z.number().int().positive().nullable().optional(),
});
export type ExportRequest = z.infer<typeof exportRequestSchema>;

/** The build form's values: the study is chosen in a select ('' = none). */
export const exportFormSchema = exportRequestSchema.extend({
  scope: exportScopeSchema.extend({ eventIds: z.array(z.string().regex(/^\d+$/)) }),
  studyId: z.string().regex(/^\d*$/),
});
export type ExportForm = z.infer<typeof exportFormSchema>;

export const EXPORT_FILES = ['csv', 'json', 'dictionary'] as const;
export const exportFileSchema = z.enum(EXPORT_FILES);
export type ExportFile = z.infer<typeof exportFileSchema>;

export const suppressionCountsSchema = z.object({
  /** Athletes whose competition category was blanked (their category had fewer than k athletes). */
  categoryAthletes: z.number(),
  categoryRows: z.number(),
  /** Assessments whose assessment-level attributes were blanked (their combination had fewer than k athletes). */
  combinationAssessments: z.number(),
  combinationRows: z.number(),
});
export type SuppressionCounts = z.infer<typeof suppressionCountsSchema>;

export const exportCountsSchema = z.object({
  rows: z.number(),
  assessments: z.number(),
  athletes: z.number(),
  classifiers: z.number(),
  suppressed: suppressionCountsSchema,
});
export type ExportCounts = z.infer<typeof exportCountsSchema>;

export const exportViewSchema = z.object({
  id: z.number(),
  createdAt: z.string(),
  expiresAt: z.string(),
  expired: z.boolean(),
  request: exportRequestSchema,
  study: z.object({ id: z.number(), name: z.string() }).nullable(),
  minAthletes: z.number(),
  counts: exportCountsSchema,
  /** Bytes of the gzip-compressed files kept on the server (0 once expired): what counts towards the quota. */
  storedBytes: z.number(),
  /** API paths of the files (below /api), while they can be downloaded. */
  files: z.record(z.string(), z.string()),
});
export type ExportView = z.infer<typeof exportViewSchema>;

export const studyViewSchema = z.object({
  id: z.number(),
  name: z.string(),
  purpose: z.string().nullable(),
  createdAt: z.string(),
  closedAt: z.string().nullable(),
});
export type StudyView = z.infer<typeof studyViewSchema>;

export const exportOptionsSchema = z.object({
  seasons: z.array(z.string()),
  eventLevels: z.array(z.string()),
  categories: z.array(z.string()),
  kinds: z.array(assessmentKindSchema),
  /** Individual events: for leads only (empty for researchers, who choose by season and level). */
  events: z.array(z.object({ id: z.number(), code: z.string(), name: z.string(), season: z.string(), level: z.string() })),
  minAthletes: z.number(),
  studies: z.array(studyViewSchema),
});
export type ExportOptions = z.infer<typeof exportOptionsSchema>;

export const exportSettingsSchema = z.object({
  minAthletes: z.number().int().min(2, { message: 'k must be at least 2' }).max(100, { message: 'k must be at most 100' }),
  /** Each researcher's quota: exports in any 24 hours … */
  maxExportsPerDay: z
    .number({ message: 'Enter a whole number' })
    .int({ message: 'Enter a whole number' })
    .min(1, { message: 'At least 1 export a day' })
    .max(1000, { message: 'At most 1,000 exports a day' })
    .optional(),
  /** … and megabytes of compressed files kept at once. */
  maxStoredMegabytes: z
    .number({ message: 'Enter a whole number' })
    .int({ message: 'Enter a whole number' })
    .min(1, { message: 'At least 1 MB' })
    .max(100_000, { message: 'At most 100,000 MB' })
    .optional(),
});
export type ExportSettings = z.infer<typeof exportSettingsSchema>;

export const exportSettingsViewSchema = exportSettingsSchema.extend({
  maxExportsPerDay: z.number(),
  maxStoredMegabytes: z.number(),
  studies: z.array(studyViewSchema),
});
export type ExportSettingsView = z.infer<typeof exportSettingsViewSchema>;

export const createStudySchema = z.object({
  name: z.string().trim().min(3, { message: 'Name the study (3 characters or more)' }).max(80),
  purpose: z.string().trim().max(500).optional(),
});
export type CreateStudy = z.infer<typeof createStudySchema>;

import { z } from 'zod';
import { DATE_FORMATS, IMPORT_LAYOUTS, isColumnTarget } from '../import-columns';
import { assessmentKindSchema } from './common';

export const importLayoutSchema = z.enum(IMPORT_LAYOUTS);
export const dateFormatSchema = z.enum(DATE_FORMATS);

export const columnTargetSchema = z
  .string()
  .refine(isColumnTarget, { message: 'is not a column of the import' })
  .transform((v) => v);

export const columnMappingSchema = z.record(z.string().trim().min(1).max(200), columnTargetSchema);

/** The form fields sent with an uploaded CSV (multipart, beside the file). */
export const uploadOptionsSchema = z.object({
  mapping: columnMappingSchema.optional(),
  dateFormat: dateFormatSchema.default('iso'),
  addClassifiers: z.boolean().default(false),
});
export type UploadOptions = z.infer<typeof uploadOptionsSchema>;

/** A problem found in an import: where (row, line, column or item) and what (value, message). */
export const importIssueSchema = z.object({
  /** 1-based data row (the header is not counted); null for a problem with the file as a whole. */
  row: z.number().int().nullable(),
  /** 1-based line of the file. */
  line: z.number().int().nullable(),
  /** The column as written in the file's header (or the field of an API item). */
  column: z.string().nullable(),
  value: z.string().nullable(),
  message: z.string(),
});
export type ImportIssue = z.infer<typeof importIssueSchema>;

/** A kind of problem (its column and its words; the values differ from row to row) and how many rows have it. */
export const importIssueKindSchema = z.object({
  column: z.string().nullable(),
  /** The problem as its first row says it. */
  problem: z.string(),
  count: z.number().int(),
  /** How many of them are among the errors listed. */
  shown: z.number().int(),
});
export type ImportIssueKind = z.infer<typeof importIssueKindSchema>;

/** An assessment already stored that the file gives to another athlete: applied only when the lead confirms it. */
export const athleteChangeSchema = z.object({
  assessmentId: z.string(),
  row: z.number().int(),
  line: z.number().int().nullable(),
  column: z.string(),
  storedAthlete: z.string(),
  fileAthlete: z.string(),
});
export type AthleteChange = z.infer<typeof athleteChangeSchema>;

const changeCountsSchema = z.object({ new: z.number().int(), changed: z.number().int(), unchanged: z.number().int() });
export type ChangeCounts = z.infer<typeof changeCountsSchema>;

export const importCountsSchema = z.object({
  assessments: changeCountsSchema,
  ratings: changeCountsSchema,
  classifiers: changeCountsSchema,
  athletes: changeCountsSchema,
  events: changeCountsSchema,
  /** Assessments rated by a single classifier: kept, but they carry no agreement information. */
  notAnalysable: z.number().int(),
  rows: z.number().int(),
});
export type ImportCounts = z.infer<typeof importCountsSchema>;

/** `expired`: checked, never committed, and removed after STAGED_IMPORT_DAYS days. */
export const importStatusSchema = z.enum(['staged', 'committed', 'reverted', 'discarded', 'expired']);

/** Days a checked file waits for its commit before it expires. */
export const STAGED_IMPORT_DAYS = 7;
export type ImportStatus = z.infer<typeof importStatusSchema>;

/** The answer to an upload (a dry run): nothing is written to the federation's data yet. */
export const dryRunSchema = z.object({
  /** The staged import to commit; null when the file was refused or changes nothing. */
  importId: z.number().int().nullable(),
  outcome: z.enum(['ready', 'refused', 'nothing-to-do']),
  fileName: z.string().nullable(),
  fileHash: z.string().nullable(),
  layout: importLayoutSchema.nullable(),
  counts: importCountsSchema.nullable(),
  /** Total number of errors; `errors` holds the first 200. */
  errorCount: z.number().int(),
  errors: z.array(importIssueSchema),
  warningCount: z.number().int(),
  warnings: z.array(importIssueSchema),
  /** Every kind of error, counted in full (the file is read and compared with the data in one round). */
  errorKinds: z.array(importIssueKindSchema).optional(),
  /** Stored assessments the file gives to another athlete (the first 200): the commit needs the lead's confirmation. */
  athleteChanges: z.array(athleteChangeSchema).optional(),
  athleteChangeCount: z.number().int().optional(),
  /** When a staged import expires if it is not committed. */
  expiresAt: z.string().nullable().optional(),
  /** An earlier committed import of the same file, if any. */
  sameFileAs: z.object({ importId: z.number().int(), committedAt: z.string().nullable() }).nullable(),
});
export type DryRun = z.infer<typeof dryRunSchema>;

export const importViewSchema = z.object({
  id: z.number().int(),
  source: z.enum(['csv', 'api', 'seed']),
  fileName: z.string().nullable(),
  status: importStatusSchema,
  counts: importCountsSchema.partial().nullable(),
  by: z.string().nullable(),
  createdAt: z.string(),
  committedAt: z.string().nullable(),
  revertedAt: z.string().nullable(),
  /** Whether the caller may revert it now, and if not, why. */
  revertable: z.boolean(),
  revertBlockedBy: z.string().nullable(),
  /** A note for the history (an expired or a waiting checked file). */
  note: z.string().nullable().optional(),
});
export type ImportView = z.infer<typeof importViewSchema>;

export const importListSchema = z.object({ imports: z.array(importViewSchema) });
export type ImportList = z.infer<typeof importListSchema>;

export const savedMappingSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  layout: importLayoutSchema,
  mapping: columnMappingSchema,
  dateFormat: dateFormatSchema,
  updatedAt: z.string(),
});
export type SavedMapping = z.infer<typeof savedMappingSchema>;

export const saveMappingSchema = z.object({
  name: z.string().trim().min(1, { message: 'Give the mapping a name' }).max(80),
  mapping: columnMappingSchema,
  dateFormat: dateFormatSchema.default('iso'),
});
export type SaveMapping = z.infer<typeof saveMappingSchema>;

export const savedMappingListSchema = z.object({ mappings: z.array(savedMappingSchema) });
export type SavedMappingList = z.infer<typeof savedMappingListSchema>;

/** Progress of a long import step, streamed as server-sent events. */
export const importProgressSchema = z.object({
  phase: z.enum(['waiting', 'reading', 'checking', 'writing', 'reverting', 'done', 'failed']),
  done: z.number(),
  total: z.number(),
  message: z.string().nullable(),
});
export type ImportProgress = z.infer<typeof importProgressSchema>;

// ——— Batch API for federations' own systems ———

const sportClassInput = z.union([z.string().max(20), z.number()]);

export const batchRatingSchema = z.object({
  classifier_code: z.string().max(64),
  sport_class: sportClassInput,
});

export const batchAssessmentSchema = z.object({
  assessment_id: z.string().max(64),
  athlete_code: z.string().max(64),
  event_code: z.string().max(64),
  assessed_on: z.string().max(40).meta({ description: 'ISO 8601 date (YYYY-MM-DD)' }),
  kind: assessmentKindSchema.optional(),
  panel_class: sportClassInput.nullable().optional(),
  note: z.string().max(2000).nullable().optional(),
  ratings: z.array(batchRatingSchema).min(1).max(10),
});
export type BatchAssessment = z.infer<typeof batchAssessmentSchema>;

export const BATCH_MAX_ITEMS = 20_000;
export const batchRequestSchema = z.array(batchAssessmentSchema).min(1).max(BATCH_MAX_ITEMS);

export const batchQuerySchema = z.object({
  dryRun: z.enum(['true', 'false', '1', '0']).optional(),
  addClassifiers: z.enum(['true', 'false', '1', '0']).optional(),
});

/** A problem with one item of a batch: its index in the array, the field and the value. */
export const batchIssueSchema = z.object({
  item: z.number().int().nullable(),
  field: z.string().nullable(),
  value: z.string().nullable(),
  message: z.string(),
});
export type BatchIssue = z.infer<typeof batchIssueSchema>;

export const batchResultSchema = z.object({
  importId: z.number().int().nullable(),
  outcome: z.enum(['committed', 'nothing-to-do', 'dry-run']),
  counts: importCountsSchema,
  warnings: z.array(batchIssueSchema),
});
export type BatchResult = z.infer<typeof batchResultSchema>;

export const batchRefusalSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.object({ errorCount: z.number().int(), errors: z.array(batchIssueSchema) }),
  }),
});

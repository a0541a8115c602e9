/** OpenAPI descriptions of the imports' routes (imports.ts beside this file). */
import { z } from 'zod';
import { apiErrorSchema } from '../../shared/schemas/common';
import {
  batchQuerySchema,
  batchRefusalSchema,
  batchRequestSchema,
  batchResultSchema,
  dateFormatSchema,
  dryRunSchema,
  importListSchema,
  importViewSchema,
  saveMappingSchema,
  savedMappingListSchema,
  savedMappingSchema,
} from '../../shared/schemas/imports';
import { JOB_ID } from '../imports/progress';
import type { RouteDoc } from '../openapi/registry';

const lead = { session: true } as const;
const tags = ['Imports'];
const importParam = { importId: 'The import’s id' };
const errorResponse = (description: string) => ({ description, schema: apiErrorSchema });

export const importsRouteDocs: RouteDoc[] = [
  {
    method: 'get',
    path: '/api/federations/:federation/imports',
    summary: 'The federation’s import history (newest first)',
    tags,
    security: lead,
    responses: { 200: { description: 'The imports', schema: importListSchema } },
  },
  {
    method: 'post',
    path: '/api/federations/:federation/imports',
    summary: 'Upload a CSV for a dry run: read, check and compare it; a file that passes is staged to commit',
    description:
      'multipart/form-data with the file in "file" (at most 50 MB), and optionally "mapping" (JSON: header → target), "dateFormat" and "addClassifiers". Nothing is written to the federation’s data. Pass ?job=ID to follow progress at /import-jobs/ID/events.',
    tags,
    security: lead,
    query: z.object({ job: z.string().regex(JOB_ID).optional() }),
    body: {
      contentType: 'multipart/form-data',
      schema: z.object({
        file: z.string().meta({ format: 'binary' }),
        mapping: z.string().optional(),
        dateFormat: dateFormatSchema.optional(),
        addClassifiers: z.enum(['true', 'false']).optional(),
      }),
    },
    responses: {
      200: {
        description: 'The dry run: counts, the first 200 errors with their rows, and the staged import’s id when it can be committed',
        schema: dryRunSchema,
      },
      400: errorResponse('No file, or the form fields are not valid'),
      413: errorResponse('The file is larger than 50 MB'),
    },
  },
  {
    method: 'get',
    path: '/api/federations/:federation/imports/:importId',
    summary: 'One import',
    tags,
    security: lead,
    params: importParam,
    responses: { 200: { description: 'The import', schema: importViewSchema }, 404: errorResponse('No such import in the federation') },
  },
  {
    method: 'post',
    path: '/api/federations/:federation/imports/:importId/commit',
    summary: 'Commit a staged import, all or nothing, in one transaction',
    tags,
    security: lead,
    params: importParam,
    body: { schema: z.object({ confirmAthleteChanges: z.boolean().optional() }) },
    query: z.object({ job: z.string().regex(JOB_ID).optional() }),
    responses: {
      200: { description: 'The committed import', schema: importViewSchema },
      404: errorResponse('No such import'),
      409: errorResponse(
        'The import is not staged, the data changed so that the file no longer passes, or it gives stored assessments to other athletes without confirmAthleteChanges',
      ),
      410: errorResponse('The checked file is no longer kept: upload it again'),
    },
  },
  {
    method: 'post',
    path: '/api/federations/:federation/imports/:importId/revert',
    summary: 'Revert a committed import: remove what it added, restore what it changed',
    tags,
    security: lead,
    params: importParam,
    noBody: true,
    query: z.object({ job: z.string().regex(JOB_ID).optional() }),
    responses: {
      200: { description: 'The reverted import', schema: importViewSchema },
      404: errorResponse('No such import'),
      409: errorResponse('Not committed, the demo data, or a later import must be reverted first'),
    },
  },
  {
    method: 'delete',
    path: '/api/federations/:federation/imports/:importId',
    summary: 'Discard a staged import without committing it',
    tags,
    security: lead,
    params: importParam,
    responses: { 204: { description: 'Discarded' }, 404: errorResponse('No such import'), 409: errorResponse('The import is not staged') },
  },
  {
    method: 'get',
    path: '/api/federations/:federation/import-jobs/:job/events',
    summary: 'Progress of a dry run, commit or revert, as server-sent events',
    tags,
    security: lead,
    params: { job: 'The id the client sent as ?job= with the request' },
    responses: {
      200: {
        description: 'A stream of `data: {phase, done, total, message}` events, closed when the job ends',
        contentType: 'text/event-stream',
        schema: z.string(),
      },
    },
  },
  {
    method: 'get',
    path: '/api/federations/:federation/import-mappings',
    summary: 'Column mappings saved by name',
    tags,
    security: lead,
    responses: { 200: { description: 'The saved mappings', schema: savedMappingListSchema } },
  },
  {
    method: 'post',
    path: '/api/federations/:federation/import-mappings',
    summary: 'Save a column mapping by name (replacing one of the same name)',
    tags,
    security: lead,
    body: { schema: saveMappingSchema },
    responses: {
      200: { description: 'Replaced', schema: savedMappingSchema },
      201: { description: 'Saved', schema: savedMappingSchema },
      400: errorResponse('Not valid'),
    },
  },
  {
    method: 'delete',
    path: '/api/federations/:federation/import-mappings/:mappingId',
    summary: 'Delete a saved column mapping',
    tags,
    security: lead,
    params: { mappingId: 'The saved mapping’s id' },
    responses: { 204: { description: 'Deleted' }, 404: errorResponse('No such mapping') },
  },
  {
    method: 'post',
    path: '/api/v1/federations/:federation/assessments',
    summary: 'Batch API: import assessments with their ratings, idempotent by natural key',
    description:
      'A JSON array of assessments. The same checks as a CSV upload; all items are written in one transaction or none. Posting the same items again changes nothing (assessments by (federation, assessment_id), ratings by (assessment, classifier)). ?dryRun=true checks and counts without writing; ?addClassifiers=true adds unknown classifier codes to the roster.',
    tags,
    security: { session: true, bearerScopes: ['import'] },
    query: batchQuerySchema,
    body: { schema: batchRequestSchema },
    responses: {
      200: { description: 'A dry run, or nothing to change', schema: batchResultSchema },
      201: { description: 'Written as a new import', schema: batchResultSchema },
      400: errorResponse('The query is not valid'),
      422: { description: 'Refused, nothing written: every problem with its item, field and value', schema: batchRefusalSchema },
    },
  },
];

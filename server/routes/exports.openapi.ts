/** OpenAPI descriptions of the research exports' routes (exports.ts beside this file). */
import { z } from 'zod';
import { apiErrorSchema } from '../../shared/schemas/common';
import {
  createStudySchema,
  exportOptionsSchema,
  exportRequestSchema,
  exportSettingsSchema,
  exportSettingsViewSchema,
  exportViewSchema,
  studyViewSchema,
} from '../../shared/schemas/exports';
import type { RouteDoc } from '../openapi/registry';

const base = '/api/federations/:federation/exports';
const tags = ['Research exports'];
const session = { session: true } as const;
const error = (description: string) => ({ description, schema: apiErrorSchema });
const invalid = { 400: error('Not valid: each field named') };

export const exportsRouteDocs: RouteDoc[] = [
  {
    method: 'get',
    path: `${base}/options`,
    summary: 'What an export can cover: seasons, kinds, categories, columns, open studies, the federation’s k (leads and researchers)',
    tags,
    security: session,
    responses: { 200: { description: 'The options', schema: exportOptionsSchema } },
  },
  {
    method: 'get',
    path: base,
    summary: 'The caller’s own exports, newest first, with their expiry (leads and researchers)',
    tags,
    security: session,
    responses: { 200: { description: 'The exports', schema: z.array(exportViewSchema) } },
  },
  {
    method: 'post',
    path: base,
    summary: 'Build an anonymised export: pseudonyms, coarsened dates, cells under k suppressed (leads and researchers)',
    tags,
    security: session,
    body: { schema: exportRequestSchema },
    responses: {
      201: { description: 'The export and its counts', schema: exportViewSchema },
      ...invalid,
      403: error('Researchers choose events by season and level; API tokens make no exports'),
      409: error('The study is closed'),
      422: error('The scope holds fewer than k athletes, or differs from an earlier export by fewer than k athletes'),
      429: error('The researcher’s export quota (per day or space kept) is reached: the message says when the next is possible'),
    },
  },
  {
    method: 'get',
    path: `${base}/settings`,
    summary: 'The export settings (k) and studies (leads)',
    tags,
    security: session,
    responses: { 200: { description: 'The settings', schema: exportSettingsViewSchema } },
  },
  {
    method: 'put',
    path: `${base}/settings`,
    summary: 'Change the export settings (leads)',
    tags,
    security: session,
    body: { schema: exportSettingsSchema },
    responses: { 200: { description: 'The settings', schema: exportSettingsViewSchema }, ...invalid },
  },
  {
    method: 'post',
    path: `${base}/studies`,
    summary: 'Add a study: its exports share stable pseudonyms (leads)',
    tags,
    security: session,
    body: { schema: createStudySchema },
    responses: { 201: { description: 'The study', schema: studyViewSchema }, ...invalid, 409: error('A study of that name exists') },
  },
  {
    method: 'post',
    path: `${base}/studies/:studyId/close`,
    summary: 'Close a study: no new exports in it (leads)',
    tags,
    security: session,
    params: { studyId: 'The study’s id' },
    noBody: true,
    responses: { 200: { description: 'The study', schema: studyViewSchema }, 404: error('No such study') },
  },
  {
    method: 'get',
    path: `${base}/:exportId/:file`,
    summary:
      'Download one file of an export: csv, json or dictionary, streamed (gzip to a client that accepts it; its maker; for seven days)',
    tags,
    security: session,
    params: { exportId: 'The export’s id', file: 'csv, json or dictionary' },
    responses: {
      200: { description: 'The file', contentType: 'application/octet-stream', schema: z.string().meta({ format: 'binary' }) },
      404: error('No such export of the caller'),
      410: error('The export has expired'),
    },
  },
];

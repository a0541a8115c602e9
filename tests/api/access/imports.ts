import type { AccessEntry } from './types';

/** A lead-only route: the lead's own answer, everyone else refused (API tokens too). */
const leadOnly = (lead: number) => ({
  anonymous: 401,
  lead,
  classifier: 403,
  researcher: 403,
  outsider: 403,
  readToken: 403,
  importToken: 403,
});
const base = '/api/federations/:federation';
const missing = '999999';

/** Imports, saved mappings, import progress, the batch API and the OpenAPI document (server/routes/imports.ts, openapi.ts). */
export const entries: AccessEntry[] = [
  { method: 'get', path: `${base}/imports`, expect: leadOnly(200), note: 'who imported what: leads only' },
  {
    method: 'post',
    path: `${base}/imports`,
    body: { not: 'a file' },
    expect: leadOnly(400),
    note: 'a JSON body instead of a multipart file is refused',
  },
  { method: 'get', path: `${base}/imports/:importId`, params: { importId: missing }, expect: leadOnly(404) },
  { method: 'post', path: `${base}/imports/:importId/commit`, params: { importId: missing }, expect: leadOnly(404) },
  { method: 'post', path: `${base}/imports/:importId/revert`, params: { importId: missing }, expect: leadOnly(404) },
  { method: 'delete', path: `${base}/imports/:importId`, params: { importId: missing }, expect: leadOnly(404) },
  {
    method: 'get',
    path: `${base}/import-jobs/:job/events`,
    params: { job: 'x' },
    expect: leadOnly(400),
    note: 'a job id that is too short is refused (a valid one would open a stream that lasts until its job ends)',
  },
  { method: 'get', path: `${base}/import-mappings`, expect: leadOnly(200) },
  {
    method: 'post',
    path: `${base}/import-mappings`,
    body: { name: '', mapping: {} },
    expect: leadOnly(400),
    note: 'the body is refused by validation',
  },
  { method: 'delete', path: `${base}/import-mappings/:mappingId`, params: { mappingId: missing }, expect: leadOnly(404) },
  {
    method: 'post',
    path: '/api/v1/federations/:federation/assessments',
    body: [],
    expect: { anonymous: 401, lead: 422, classifier: 403, researcher: 403, outsider: 403, readToken: 403, importToken: 422 },
    note: 'the batch API: a lead or an API token with the import scope; an empty batch is refused by validation',
  },
  {
    method: 'get',
    path: '/api/openapi.json',
    expect: { anonymous: 200, lead: 200, classifier: 200, researcher: 200, outsider: 200, readToken: 200, importToken: 200 },
    note: 'open: the API’s description has no data in it',
  },
];

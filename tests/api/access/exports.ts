import type { AccessEntry } from './types';

/** Leads and researchers of the federation; never classifiers, outsiders or API tokens. */
const exporters = { anonymous: 401, lead: 200, classifier: 403, researcher: 200, outsider: 403, readToken: 403, importToken: 403 };
const leadOnly = { anonymous: 401, lead: 200, classifier: 403, researcher: 403, outsider: 403, readToken: 403, importToken: 403 };
const base = '/api/federations/:federation/exports';

/** Anonymised research exports (server/routes/exports.ts). */
export const entries: AccessEntry[] = [
  { method: 'get', path: `${base}/options`, expect: exporters, note: 'seasons, levels, categories; individual events only for leads' },
  { method: 'get', path: base, expect: exporters, note: 'the caller’s own exports only' },
  {
    method: 'post',
    path: base,
    body: { scope: { seasons: [] }, fields: [], dateMode: 'month' },
    expect: { ...exporters, lead: 400, researcher: 400 },
    note: 'the body is refused by validation (no season chosen)',
  },
  { method: 'get', path: `${base}/settings`, expect: leadOnly, note: 'k and every study, closed ones too' },
  {
    method: 'put',
    path: `${base}/settings`,
    body: { minAthletes: 1 },
    expect: { ...leadOnly, lead: 400 },
    note: 'the body is refused by validation (k below 2)',
  },
  {
    method: 'post',
    path: `${base}/studies`,
    body: { name: '' },
    expect: { ...leadOnly, lead: 400 },
    note: 'the body is refused by validation',
  },
  {
    method: 'post',
    path: `${base}/studies/:studyId/close`,
    params: { studyId: '999999' },
    expect: { ...leadOnly, lead: 404 },
    note: 'no such study in the demo data',
  },
  {
    method: 'get',
    path: `${base}/:exportId/:file`,
    params: { exportId: '999999', file: 'csv' },
    expect: { ...exporters, lead: 404, researcher: 404 },
    note: 'only the maker can download an export (another’s is 404), for seven days (then 410): tests/api/exports.test.ts',
  },
];

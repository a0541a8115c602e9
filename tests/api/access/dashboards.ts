import type { AccessEntry } from './types';

const aggregates = { anonymous: 401, lead: 200, classifier: 200, researcher: 200, outsider: 403, readToken: 200, importToken: 403 };
const leadOnly = { anonymous: 401, lead: 200, classifier: 403, researcher: 403, outsider: 403, readToken: 403, importToken: 403 };
const base = '/api/federations/:federation/analytics';

/** The agreement dashboards (server/routes/analytics.ts). */
export const entries: AccessEntry[] = [
  { method: 'get', path: `${base}/filters`, expect: aggregates, note: 'seasons, events, categories: no identities' },
  {
    method: 'get',
    path: `${base}/overview`,
    expect: aggregates,
    note: 'federation-wide figures; the open flags (with codes) only for leads',
  },
  { method: 'get', path: `${base}/classifiers`, expect: leadOnly, note: 'names every classifier' },
  {
    method: 'get',
    path: `${base}/classifiers/:code`,
    params: { code: 'C12' },
    expect: { ...leadOnly, classifier: 200 },
    note: 'C12 is the demo classifier’s own entry; another code gives a classifier 403 (tests/api/analytics.test.ts)',
  },
  {
    method: 'get',
    path: `${base}/me`,
    expect: { ...leadOnly, lead: 403, classifier: 200 },
    note: 'a classifier’s own figures; needs a linked roster entry',
  },
  { method: 'get', path: `${base}/pairs`, expect: leadOnly },
  { method: 'get', path: `${base}/pairs/:a/:b`, params: { a: 'C01', b: 'C02' }, expect: leadOnly },
  { method: 'get', path: `${base}/boundaries`, expect: aggregates },
  { method: 'get', path: `${base}/drift/raters`, expect: leadOnly },
  { method: 'get', path: `${base}/drift/classes`, expect: aggregates, note: 'the list of changes with athletes and dates only for leads' },
  { method: 'get', path: `${base}/flags`, expect: leadOnly },
  { method: 'post', path: `${base}/flags/evaluate`, expect: leadOnly, note: 're-evaluation is harmless: it only refreshes flags' },
  {
    method: 'patch',
    path: `${base}/flags/:id`,
    params: { id: '1' },
    body: { status: 'not-a-status' },
    expect: { ...leadOnly, lead: 400 },
    note: 'the body is refused by validation',
  },
  { method: 'get', path: `${base}/flag-settings`, expect: leadOnly },
  {
    method: 'put',
    path: `${base}/flag-settings`,
    body: { biasMin: 'high' },
    expect: { ...leadOnly, lead: 400 },
    note: 'the body is refused by validation',
  },
];

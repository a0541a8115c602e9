import type { AccessEntry } from './types';

const none = { anonymous: 401, lead: 403, classifier: 403, researcher: 403, outsider: 403, readToken: 403, importToken: 403 };
const leadOrClassifier = { ...none, lead: 200, classifier: 200 };
const base = '/api/federations/:federation/exercises';

/**
 * Calibration exercises (server/routes/exercises.ts). Researchers and API tokens have no exercise
 * route at all (docs/decisions/0010-calibration-exercises.md). In the demo, exercise 1 is closed
 * and exercise 2 is open and assigned to the demo classifier (C12); case 7 is exercise 2's first.
 * Blindness before the close is checked on every route a classifier can call in
 * tests/api/exercises-blindness.test.ts.
 */
export const entries: AccessEntry[] = [
  { method: 'get', path: base, expect: leadOrClassifier, note: 'a lead sees every exercise, a classifier those assigned once open' },
  { method: 'post', path: base, body: { title: '' }, expect: { ...none, lead: 400 }, note: 'the body is refused by validation' },
  {
    method: 'get',
    path: `${base}/proposal`,
    expect: { ...none, lead: 400 },
    note: 'without ?flag= or ?boundary= the query is refused (tests/api/exercises.test.ts asks with one)',
  },
  {
    method: 'get',
    path: `${base}/:id`,
    params: { id: '2' },
    expect: leadOrClassifier,
    note: 'the open demo exercise: the classifier’s view has no reference class and only their own answers',
  },
  {
    method: 'put',
    path: `${base}/:id`,
    params: { id: '2' },
    body: { title: '' },
    expect: { ...none, lead: 400 },
    note: 'the body is refused by validation',
  },
  { method: 'post', path: `${base}/:id/open`, params: { id: '2' }, expect: { ...none, lead: 409 }, note: 'already open: nothing changes' },
  {
    method: 'post',
    path: `${base}/:id/close`,
    params: { id: '1' },
    expect: { ...none, lead: 409 },
    note: 'already closed: nothing changes',
  },
  {
    method: 'put',
    path: `${base}/:id/answers/:caseId`,
    params: { id: '2', caseId: '7' },
    body: { sportClass: 'high' },
    expect: { ...none, classifier: 400 },
    note: 'classifiers only (a lead does not answer); the body is refused by validation',
  },
  {
    method: 'post',
    path: `${base}/:id/flags/:flagId/close`,
    params: { id: '1', flagId: '1' },
    body: {},
    expect: { ...none, lead: 400 },
    note: 'the body is refused by validation',
  },
];

import type { AccessEntry } from './types';

export const entries: AccessEntry[] = [
  {
    method: 'get',
    path: '/api/health',
    expect: { anonymous: 200, lead: 200, classifier: 200, researcher: 200, outsider: 200, readToken: 200, importToken: 200 },
    note: 'open: load balancers and monitors call it',
  },
  {
    method: 'post',
    path: '/api/session',
    body: { email: 'not-an-email' },
    expect: { anonymous: 400, lead: 400, classifier: 400, researcher: 400, outsider: 400, readToken: 400, importToken: 400 },
    note: 'open: signing in; the body is refused by validation',
  },
  {
    method: 'get',
    path: '/api/session',
    expect: { anonymous: 200, lead: 200, classifier: 200, researcher: 200, outsider: 200, readToken: 403, importToken: 403 },
    note: 'open: without a session it answers {user: null}, so the app’s probe on every load is not an error',
  },
  {
    method: 'delete',
    path: '/api/session',
    expect: { anonymous: 204, lead: 204, classifier: 204, researcher: 204, outsider: 204, readToken: 204, importToken: 204 },
    note: 'signing out is always allowed; it revokes the caller’s own session only',
  },
  {
    method: 'get',
    path: '/api/federations/:federation/summary',
    expect: { anonymous: 401, lead: 200, classifier: 200, researcher: 200, outsider: 403, readToken: 200, importToken: 403 },
  },
];

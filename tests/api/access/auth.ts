import type { AccessEntry } from './types';

/** What an entry of a lead-only route expects from each caller, with the lead's own answer. */
const leadOnly = (lead: number) => ({
  anonymous: 401,
  lead,
  classifier: 403,
  researcher: 403,
  outsider: 403,
  readToken: 403,
  importToken: 403,
});
/** Routes of e-mailed links: open to people (the link is the key), never to API tokens. */
const linkRoute = (people: number) => ({
  anonymous: people,
  lead: people,
  classifier: people,
  researcher: people,
  outsider: people,
  readToken: 403,
  importToken: 403,
});
/** The site owner's routes: no demo caller of the matrix is the owner (tests/api/auth.test.ts covers the owner). */
const ownerOnly = { anonymous: 401, lead: 403, classifier: 403, researcher: 403, outsider: 403, readToken: 403, importToken: 403 };
/** A well-formed token that was never issued. */
const unknownLink = 'x'.repeat(43);
const base = '/api/federations/:federation';

/**
 * Invitations, password resets, members, API tokens, the Outbox and the site owner's routes
 * (server/routes/access-links.ts, members.ts, owner.ts).
 */
export const entries: AccessEntry[] = [
  {
    method: 'get',
    path: '/api/invitations/:token',
    params: { token: unknownLink },
    expect: linkRoute(410),
    note: 'an unknown, used or expired link answers 410 alike',
  },
  { method: 'post', path: '/api/invitations/:token/accept', params: { token: unknownLink }, body: {}, expect: linkRoute(410) },
  {
    method: 'post',
    path: '/api/password-resets',
    body: { email: 'not-an-email' },
    expect: linkRoute(400),
    note: 'open: asking for a reset link; the body is refused by validation',
  },
  { method: 'get', path: '/api/password-resets/:token', params: { token: unknownLink }, expect: linkRoute(410) },
  {
    method: 'post',
    path: '/api/password-resets/:token',
    params: { token: unknownLink },
    body: { password: 'a-long-enough-password', confirmPassword: 'a-long-enough-password' },
    expect: linkRoute(410),
  },
  { method: 'get', path: `${base}/members`, expect: leadOnly(200), note: 'names and e-mail addresses: leads only' },
  {
    method: 'patch',
    path: `${base}/members/:userId`,
    params: { userId: '1' },
    body: {},
    expect: leadOnly(400),
    note: 'the body is refused by validation (nothing to change)',
  },
  {
    method: 'post',
    path: `${base}/invitations`,
    body: { email: 'not-an-email', role: 'lead' },
    expect: leadOnly(400),
    note: 'the body is refused by validation',
  },
  {
    method: 'delete',
    path: `${base}/invitations/:invitationId`,
    params: { invitationId: '999999' },
    expect: leadOnly(404),
    note: 'no such invitation',
  },
  { method: 'get', path: `${base}/api-tokens`, expect: leadOnly(200), note: 'a token cannot list or make tokens' },
  {
    method: 'post',
    path: `${base}/api-tokens`,
    body: { name: '', scope: 'read' },
    expect: leadOnly(400),
    note: 'the body is refused by validation',
  },
  { method: 'delete', path: `${base}/api-tokens/:tokenId`, params: { tokenId: '999999' }, expect: leadOnly(404), note: 'no such token' },
  {
    method: 'get',
    path: `${base}/outbox`,
    expect: leadOnly(200),
    note: 'outside production only (404 in production); messages about this federation only',
  },
  { method: 'get', path: '/api/owner/federations', expect: ownerOnly },
  { method: 'post', path: '/api/owner/federations', body: {}, expect: ownerOnly },
  { method: 'post', path: '/api/owner/federations/:slug/leads', params: { slug: 'kestrel-coast' }, body: {}, expect: ownerOnly },
  { method: 'get', path: '/api/owner/outbox', expect: ownerOnly, note: 'outside production only' },
];

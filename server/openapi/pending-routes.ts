/**
 * Routes of other features that their owners have not described yet: method, path, summary and
 * how one signs in, without schemas. A feature's own registerRoute(...) replaces its entry here
 * (registerPlaceholder never replaces a real description), and its line here can then go.
 */
import { registerPlaceholder } from './registry';

const pending: [string, string, string, string][] = [
  ['get', '/api/invitations/:token', 'Invitations: read an invitation link', 'none'],
  ['post', '/api/invitations/:token/accept', 'Invitations: accept an invitation', 'none'],
  ['post', '/api/password-resets', 'Password resets: ask for a reset link', 'none'],
  ['get', '/api/password-resets/:token', 'Password resets: read a reset link', 'none'],
  ['post', '/api/password-resets/:token', 'Password resets: set a new password', 'none'],
  ['get', '/api/federations/:federation/members', 'Members of the federation', 'session'],
  ['patch', '/api/federations/:federation/members/:userId', 'Change a member', 'session'],
  ['post', '/api/federations/:federation/invitations', 'Invite someone', 'session'],
  ['delete', '/api/federations/:federation/invitations/:invitationId', 'Revoke an invitation', 'session'],
  ['get', '/api/federations/:federation/api-tokens', 'API tokens of the federation', 'session'],
  ['post', '/api/federations/:federation/api-tokens', 'Create an API token', 'session'],
  ['delete', '/api/federations/:federation/api-tokens/:tokenId', 'Revoke an API token', 'session'],
  ['get', '/api/federations/:federation/outbox', "The federation's local outbox (outside production)", 'session'],
  ['get', '/api/owner/federations', 'Site owner: federations', 'session'],
  ['post', '/api/owner/federations', 'Site owner: create a federation', 'session'],
  ['post', '/api/owner/federations/:slug/leads', 'Site owner: invite a lead to an existing federation (replaces a pending invitation of the same address)', 'session'],
  ['get', '/api/owner/outbox', 'Site owner: the local outbox (outside production)', 'session'],
  ['get', '/api/federations/:federation/exports/options', 'Research exports: options', 'session'],
  ['get', '/api/federations/:federation/exports', 'Research exports: list', 'session'],
  ['post', '/api/federations/:federation/exports', 'Research exports: build one', 'session'],
  ['get', '/api/federations/:federation/exports/settings', 'Research exports: settings', 'session'],
  ['put', '/api/federations/:federation/exports/settings', 'Research exports: change settings', 'session'],
  ['post', '/api/federations/:federation/exports/studies', 'Research exports: add a study', 'session'],
  ['post', '/api/federations/:federation/exports/studies/:studyId/close', 'Research exports: close a study', 'session'],
  ['get', '/api/federations/:federation/exports/:exportId/:file', 'Research exports: download a file', 'session'],
];

for (const [method, path, summary, security] of pending) {
  const ways = security.split(',');
  registerPlaceholder({
    method: method as 'get' | 'post' | 'put' | 'patch' | 'delete',
    path,
    summary,
    description: 'Not described in detail by its feature yet.',
    security: security === 'none' ? 'none' : { session: ways.includes('session'), bearerScopes: ways.includes('read') ? ['read'] : [] },
    responses: { 200: { description: 'See the feature’s shared schemas' } },
  });
}

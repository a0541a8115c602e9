/** OpenAPI descriptions of the foundation's routes: health, session, the federation summary, this document. */
import { z } from 'zod';
import { apiErrorSchema } from '../../shared/schemas/common';
import { federationSummarySchema } from '../../shared/schemas/federation';
import { sessionSchema, signedOutSchema, signInSchema } from '../../shared/schemas/session';
import type { RouteDoc } from '../openapi/registry';

export const foundationRouteDocs: RouteDoc[] = [
  {
    method: 'get',
    path: '/api/health',
    summary: 'Whether the server is up, and its version',
    tags: ['Foundation'],
    security: 'none',
    responses: { 200: { description: 'Up', schema: z.object({ status: z.literal('ok'), version: z.string() }) } },
  },
  {
    method: 'post',
    path: '/api/session',
    summary: 'Sign in with e-mail and password; sets the session cookie',
    tags: ['Foundation'],
    security: 'none',
    body: { schema: signInSchema },
    responses: {
      201: { description: 'Signed in', schema: sessionSchema },
      400: { description: 'Not valid', schema: apiErrorSchema },
      401: { description: 'The e-mail or password is not right', schema: apiErrorSchema },
    },
  },
  {
    method: 'get',
    path: '/api/session',
    summary: 'The signed-in user and their memberships ({user: null} when nobody is signed in)',
    tags: ['Foundation'],
    security: 'none',
    responses: {
      200: { description: 'The session, or {user: null, memberships: []} without one', schema: z.union([sessionSchema, signedOutSchema]) },
      401: { description: 'A session cookie that no longer holds (expired, revoked or forged)', schema: apiErrorSchema },
      403: { description: 'An API token: this route is for signed-in users', schema: apiErrorSchema },
    },
  },
  {
    method: 'delete',
    path: '/api/session',
    summary: 'Sign out (revokes this session)',
    tags: ['Foundation'],
    security: 'none',
    responses: { 204: { description: 'Signed out' } },
  },
  {
    method: 'get',
    path: '/api/federations/:federation/summary',
    summary: 'The federation’s counts (no identities)',
    tags: ['Foundation'],
    security: { session: true, bearerScopes: ['read'] },
    responses: { 200: { description: 'The counts', schema: federationSummarySchema } },
  },
  {
    method: 'get',
    path: '/api/openapi.json',
    summary: 'This OpenAPI 3.1 document',
    tags: ['Foundation'],
    security: 'none',
    responses: { 200: { description: 'The document', schema: z.record(z.string(), z.unknown()) } },
  },
];

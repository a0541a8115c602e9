/**
 * OpenAPI descriptions of the access routes: e-mailed links (access-links.ts), members,
 * invitations, API tokens and the Outbox (members.ts), and the site owner's routes (owner.ts).
 */
import {
  acceptInvitationSchema,
  acceptResultSchema,
  createdTokenSchema,
  federationCreatedSchema,
  federationCreateSchema,
  invitationCreatedSchema,
  invitationPreviewSchema,
  leadInviteSchema,
  inviteSchema,
  memberUpdateSchema,
  memberViewSchema,
  membersViewSchema,
  outboxSchema,
  ownerFederationsSchema,
  resetPasswordSchema,
  resetPreviewSchema,
  resetRequestedSchema,
  resetRequestSchema,
  tokenCreateSchema,
  tokenListSchema,
} from '../../shared/schemas/access';
import { apiErrorSchema } from '../../shared/schemas/common';
import type { RouteDoc } from '../openapi/registry';

const error = (description: string) => ({ description, schema: apiErrorSchema });
const invalid = { 400: error('Not valid: each field named') };
const gone = { 410: error('The link has expired or was already used') };
const limited = { 429: error('Too many attempts: try again later') };
const link = { token: 'The secret of the e-mailed link' };
const lead = { session: true } as const;
const owner = { session: true } as const;
const fed = '/api/federations/:federation';
const notInProduction = { 404: error('The Outbox is only available outside production') };

export const accessRouteDocs: RouteDoc[] = [
  {
    method: 'get',
    path: '/api/invitations/:token',
    summary: 'Read an invitation link: who is invited, to which federation and role',
    tags: ['Access'],
    security: 'none',
    params: link,
    responses: { 200: { description: 'The invitation', schema: invitationPreviewSchema }, ...gone, ...limited },
  },
  {
    method: 'post',
    path: '/api/invitations/:token/accept',
    summary: 'Accept an invitation: a name and password for a new account, an empty object for an existing one',
    tags: ['Access'],
    security: 'none',
    params: link,
    body: { schema: acceptInvitationSchema },
    responses: { 201: { description: 'The membership was added', schema: acceptResultSchema }, ...invalid, ...gone, ...limited },
  },
  {
    method: 'post',
    path: '/api/password-resets',
    summary: 'Ask for a password reset link; the same answer for any address',
    tags: ['Access'],
    security: 'none',
    body: { schema: resetRequestSchema },
    responses: {
      202: { description: 'If the address has an account, a link is on its way', schema: resetRequestedSchema },
      ...invalid,
      ...limited,
    },
  },
  {
    method: 'get',
    path: '/api/password-resets/:token',
    summary: 'Read a password reset link',
    tags: ['Access'],
    security: 'none',
    params: link,
    responses: { 200: { description: 'The account the link is for', schema: resetPreviewSchema }, ...gone, ...limited },
  },
  {
    method: 'post',
    path: '/api/password-resets/:token',
    summary: 'Set a new password with a reset link; every other session of the account ends',
    tags: ['Access'],
    security: 'none',
    params: link,
    body: { schema: resetPasswordSchema },
    responses: { 204: { description: 'The password was changed' }, ...invalid, ...gone, ...limited },
  },
  {
    method: 'get',
    path: `${fed}/members`,
    summary: 'Members, pending invitations and roster entries without an account (leads)',
    tags: ['Members'],
    security: lead,
    responses: { 200: { description: 'The members', schema: membersViewSchema } },
  },
  {
    method: 'patch',
    path: `${fed}/members/:userId`,
    summary: 'Change a member’s role, roster link or active state (leads)',
    tags: ['Members'],
    security: lead,
    params: { userId: 'The member’s user id' },
    body: { schema: memberUpdateSchema },
    responses: {
      200: { description: 'The member', schema: memberViewSchema },
      ...invalid,
      404: error('No such member'),
      409: error('The change would leave no lead'),
    },
  },
  {
    method: 'post',
    path: `${fed}/invitations`,
    summary: 'Invite someone by e-mail with a role (leads)',
    tags: ['Members'],
    security: lead,
    body: { schema: inviteSchema },
    responses: {
      201: { description: 'The invitation, and whether its e-mail was sent', schema: invitationCreatedSchema },
      ...invalid,
      409: error('Already a member'),
    },
  },
  {
    method: 'delete',
    path: `${fed}/invitations/:invitationId`,
    summary: 'Revoke a pending invitation; its link stops working (leads)',
    tags: ['Members'],
    security: lead,
    params: { invitationId: 'The invitation’s id' },
    responses: { 204: { description: 'Revoked' }, 404: error('No such pending invitation') },
  },
  {
    method: 'get',
    path: `${fed}/api-tokens`,
    summary: 'The federation’s API tokens, without their secrets (leads)',
    tags: ['Members'],
    security: lead,
    responses: { 200: { description: 'The tokens', schema: tokenListSchema } },
  },
  {
    method: 'post',
    path: `${fed}/api-tokens`,
    summary: 'Create an API token; its secret is shown in this answer only (leads)',
    tags: ['Members'],
    security: lead,
    body: { schema: tokenCreateSchema },
    responses: { 201: { description: 'The token and its secret', schema: createdTokenSchema }, ...invalid },
  },
  {
    method: 'delete',
    path: `${fed}/api-tokens/:tokenId`,
    summary: 'Revoke an API token; systems using it are refused from the next request (leads)',
    tags: ['Members'],
    security: lead,
    params: { tokenId: 'The token’s id' },
    responses: { 204: { description: 'Revoked' }, 404: error('No such token') },
  },
  {
    method: 'get',
    path: `${fed}/outbox`,
    summary: 'The e-mails about the federation kept by the local mail server (outside production; leads)',
    tags: ['Members'],
    security: lead,
    responses: { 200: { description: 'The newest 200 messages', schema: outboxSchema }, ...notInProduction },
  },
  {
    method: 'get',
    path: '/api/owner/federations',
    summary: 'Every federation with its counts of members, leads and pending invitations (site owner)',
    tags: ['Site owner'],
    security: owner,
    responses: { 200: { description: 'The federations', schema: ownerFederationsSchema } },
  },
  {
    method: 'post',
    path: '/api/owner/federations',
    summary: 'Create a federation and invite its first lead (site owner)',
    tags: ['Site owner'],
    security: owner,
    body: { schema: federationCreateSchema },
    responses: {
      201: { description: 'The federation and the invitation', schema: federationCreatedSchema },
      ...invalid,
      409: error('The address is taken'),
    },
  },
  {
    method: 'post',
    path: '/api/owner/federations/:slug/leads',
    summary:
      'Invite a lead to an existing federation, e.g. one left without a lead (site owner); replaces a pending invitation of the same address',
    tags: ['Site owner'],
    security: owner,
    params: { slug: 'The federation’s slug' },
    body: { schema: leadInviteSchema },
    responses: {
      201: { description: 'The invitation, and whether its e-mail was sent', schema: invitationCreatedSchema },
      ...invalid,
      404: error('No such federation'),
      409: error('Already a member'),
    },
  },
  {
    method: 'get',
    path: '/api/owner/outbox',
    summary: 'Every e-mail kept by the local mail server (outside production; site owner)',
    tags: ['Site owner'],
    security: owner,
    responses: { 200: { description: 'The newest 200 messages', schema: outboxSchema }, ...notInProduction },
  },
];

import { Router } from 'express';
import { z } from 'zod';
import { inviteSchema, memberUpdateSchema, tokenCreateSchema } from '../../shared/schemas/access';
import { accessOf, requireAccess } from '../auth/access';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import { createApiToken, listApiTokens, revokeApiToken } from '../services/api-tokens';
import { createInvitation, revokeInvitation } from '../services/invitations';
import { outboxEnabled, outboxMessages } from '../services/outbox';
import { listMembers, updateMember } from '../services/members';

const idParam = z.coerce.number().int().positive();

/**
 * A federation's people and systems, for its leads: members (role, roster link, deactivation),
 * invitations, API tokens, and (outside production) the Outbox of the e-mails about the
 * federation. API tokens never reach these routes.
 */
export function membersRouter(ctx: AppContext): Router {
  const router = Router();
  const leads = requireAccess(ctx, { roles: ['lead'] });
  const base = '/federations/:federation';
  const actor = (req: Parameters<typeof accessOf>[0]) => {
    const access = accessOf(req);
    return { federation: access.federation, userId: access.userId as number };
  };

  router.get(`${base}/members`, leads, async (req, res) => {
    res.json(await listMembers(ctx, accessOf(req).federation.id));
  });

  router.patch(`${base}/members/:userId`, leads, async (req, res) => {
    const { federation, userId } = actor(req);
    const target = parseWith(idParam, req.params.userId, 'member id');
    const update = parseWith(memberUpdateSchema, req.body);
    res.json(await updateMember(ctx, federation.id, userId, target, update));
  });

  router.post(`${base}/invitations`, leads, async (req, res) => {
    const { federation, userId } = actor(req);
    const input = parseWith(inviteSchema, req.body);
    const inviter = req.auth?.kind === 'session' ? { id: userId, displayName: req.auth.user.displayName } : null;
    res.status(201).json(await createInvitation(ctx, federation, input, inviter));
  });

  router.delete(`${base}/invitations/:invitationId`, leads, async (req, res) => {
    const { federation, userId } = actor(req);
    await revokeInvitation(ctx, federation.id, parseWith(idParam, req.params.invitationId, 'invitation id'), userId);
    res.status(204).end();
  });

  router.get(`${base}/api-tokens`, leads, async (req, res) => {
    res.json({ tokens: await listApiTokens(ctx, accessOf(req).federation.id) });
  });

  router.post(`${base}/api-tokens`, leads, async (req, res) => {
    const { federation, userId } = actor(req);
    const input = parseWith(tokenCreateSchema, req.body);
    res.set('cache-control', 'no-store');
    res.status(201).json(await createApiToken(ctx, federation.id, input, userId));
  });

  router.delete(`${base}/api-tokens/:tokenId`, leads, async (req, res) => {
    const { federation, userId } = actor(req);
    await revokeApiToken(ctx, federation.id, parseWith(idParam, req.params.tokenId, 'token id'), userId);
    res.status(204).end();
  });

  router.get(`${base}/outbox`, leads, async (req, res) => {
    if (!outboxEnabled(ctx)) throw new HttpError(404, 'not_found', 'The Outbox is only available outside production');
    res.json({ messages: await outboxMessages(ctx, accessOf(req).federation.slug) });
  });

  return router;
}

import { Router, type RequestHandler } from 'express';
import { federationCreateSchema, leadInviteSchema } from '../../shared/schemas/access';
import { requireSession } from '../auth/access';
import type { AppContext } from '../context';
import { forbidden, HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import { outboxEnabled, outboxMessages } from '../services/outbox';
import { createFederation, inviteLead, ownerFederations } from '../services/owner';

/** The site owner only (users.is_owner), signed in; never an API token. */
const ownerOnly: RequestHandler = (req, _res, next) => {
  const auth = requireSession(req);
  if (!auth.user.isOwner) return next(forbidden('Only the site owner can do this'));
  next();
};

/**
 * The site owner's routes: federations and their first lead (invited by e-mail), and the whole
 * Outbox of the local mail server outside production.
 */
export function ownerRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/owner/federations', ownerOnly, async (_req, res) => {
    res.json({ federations: await ownerFederations(ctx) });
  });

  router.post('/owner/federations', ownerOnly, async (req, res) => {
    const auth = requireSession(req);
    const input = parseWith(federationCreateSchema, req.body);
    res.status(201).json(await createFederation(ctx, input, { id: auth.user.id, displayName: auth.user.displayName }));
  });

  router.post('/owner/federations/:slug/leads', ownerOnly, async (req, res) => {
    const auth = requireSession(req);
    const { email } = parseWith(leadInviteSchema, req.body);
    const { invitation, mailSent } = await inviteLead(ctx, String(req.params.slug), email, {
      id: auth.user.id,
      displayName: auth.user.displayName,
    });
    res.status(201).json({ invitation, mailSent });
  });

  router.get('/owner/outbox', ownerOnly, async (_req, res) => {
    if (!outboxEnabled(ctx)) throw new HttpError(404, 'not_found', 'The Outbox is only available outside production');
    res.json({ messages: await outboxMessages(ctx, null) });
  });

  return router;
}

import { Router, type RequestHandler } from 'express';
import { sql } from 'kysely';
import { federationCreateSchema, leadInviteSchema, type OwnerFederation } from '../../shared/schemas/access';
import { requireSession } from '../auth/access';
import { nowIso } from '../auth/secret-token';
import type { AppContext } from '../context';
import { forbidden, HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import { audit } from '../services/audit';
import { createInvitation } from '../services/invitations';
import { outboxEnabled, outboxView } from './members';

/** The site owner only (users.is_owner), signed in; never an API token. */
const ownerOnly: RequestHandler = (req, _res, next) => {
  const auth = requireSession(req);
  if (!auth.user.isOwner) return next(forbidden('Only the site owner can do this'));
  next();
};

async function ownerFederations(ctx: AppContext): Promise<OwnerFederation[]> {
  const now = nowIso();
  const rows = await ctx.db
    .selectFrom('federations')
    .select((eb) => [
      'federations.id',
      'federations.slug',
      'federations.name',
      'federations.created_at',
      eb
        .selectFrom('memberships')
        .select(sql<number>`count(*)`.as('n'))
        .whereRef('memberships.federation_id', '=', 'federations.id')
        .where('memberships.active', '=', 1)
        .as('members'),
      eb
        .selectFrom('memberships')
        .select(sql<number>`count(*)`.as('n'))
        .whereRef('memberships.federation_id', '=', 'federations.id')
        .where('memberships.active', '=', 1)
        .where('memberships.role', '=', 'lead')
        .as('leads'),
      eb
        .selectFrom('invitations')
        .select(sql<number>`count(*)`.as('n'))
        .whereRef('invitations.federation_id', '=', 'federations.id')
        .where('invitations.accepted_at', 'is', null)
        .where('invitations.revoked_at', 'is', null)
        .where('invitations.expires_at', '>', now)
        .as('pending'),
    ])
    .orderBy('federations.name')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    slug: r.slug,
    name: r.name,
    activeMembers: Number(r.members ?? 0),
    leads: Number(r.leads ?? 0),
    pendingInvitations: Number(r.pending ?? 0),
    createdAt: r.created_at,
  }));
}

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
    const taken = await ctx.db.selectFrom('federations').select('id').where('slug', '=', input.slug).executeTakeFirst();
    if (taken)
      throw new HttpError(409, 'conflict', `The address ${input.slug} is taken by another federation`, [
        { path: 'slug', message: 'Already in use' },
      ]);
    const federation = await ctx.db
      .insertInto('federations')
      .values({ slug: input.slug, name: input.name })
      .returning(['id', 'slug', 'name'])
      .executeTakeFirstOrThrow();
    await audit(ctx.db, {
      federationId: federation.id,
      userId: auth.user.id,
      action: 'federation.create',
      entity: 'federation',
      entityId: federation.id,
      detail: { slug: federation.slug },
    });
    const { invitation, mailSent } = await createInvitation(
      ctx,
      federation,
      { email: input.leadEmail, role: 'lead' },
      { id: auth.user.id, displayName: auth.user.displayName },
    );
    res.status(201).json({ federation: { id: federation.id, slug: federation.slug, name: federation.name }, invitation, mailSent });
  });

  router.post('/owner/federations/:slug/leads', ownerOnly, async (req, res) => {
    const auth = requireSession(req);
    const { email } = parseWith(leadInviteSchema, req.body);
    const federation = await ctx.db
      .selectFrom('federations')
      .select(['id', 'slug', 'name'])
      .where('slug', '=', String(req.params.slug))
      .executeTakeFirst();
    if (!federation) throw new HttpError(404, 'not_found', `There is no federation ${String(req.params.slug)}`);
    const { invitation, mailSent } = await createInvitation(
      ctx,
      federation,
      { email, role: 'lead' },
      { id: auth.user.id, displayName: auth.user.displayName },
    );
    res.status(201).json({ invitation, mailSent });
  });

  router.get('/owner/outbox', ownerOnly, async (_req, res) => {
    if (!outboxEnabled(ctx)) throw new HttpError(404, 'not_found', 'The Outbox is only available outside production');
    const rows = await ctx.db
      .selectFrom('outbox_messages')
      .select(['id', 'mail_to', 'subject', 'text_body', 'received_at'])
      .orderBy('id', 'desc')
      .limit(200)
      .execute();
    res.json({ messages: rows.map(outboxView) });
  });

  return router;
}

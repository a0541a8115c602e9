/** The site owner's federations: their counts, creating one with its first lead, inviting a lead. */
import { sql } from 'kysely';
import type { FederationCreate, OwnerFederation } from '../../shared/schemas/access';
import { nowIso } from '../auth/secret-token';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import { audit } from './audit';
import { createInvitation } from './invitations';

type Inviter = { id: number; displayName: string };

export async function ownerFederations(ctx: AppContext): Promise<OwnerFederation[]> {
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

/** Creates the federation and invites its first lead; 409 when the slug is taken. */
export async function createFederation(ctx: AppContext, input: FederationCreate, owner: Inviter) {
  const taken = await ctx.db.selectFrom('federations').select('id').where('slug', '=', input.slug).executeTakeFirst();
  if (taken)
    throw new HttpError(409, 'conflict', `The address ${input.slug} is taken by another federation`, [
      { path: 'slug', message: 'Already in use' },
    ]);
  const federation = await ctx.db.transaction().execute(async (trx) => {
    const created = await trx
      .insertInto('federations')
      .values({ slug: input.slug, name: input.name })
      .returning(['id', 'slug', 'name'])
      .executeTakeFirstOrThrow();
    await audit(trx, {
      federationId: created.id,
      userId: owner.id,
      action: 'federation.create',
      entity: 'federation',
      entityId: created.id,
      detail: { slug: created.slug },
    });
    return created;
  });
  const { invitation, mailSent } = await createInvitation(ctx, federation, { email: input.leadEmail, role: 'lead' }, owner);
  return { federation: { id: federation.id, slug: federation.slug, name: federation.name }, invitation, mailSent };
}

/** Invites a (further) lead to an existing federation; 404 when there is none of that slug. */
export async function inviteLead(ctx: AppContext, slug: string, email: string, owner: Inviter) {
  const federation = await ctx.db.selectFrom('federations').select(['id', 'slug', 'name']).where('slug', '=', slug).executeTakeFirst();
  if (!federation) throw new HttpError(404, 'not_found', `There is no federation ${slug}`);
  return createInvitation(ctx, federation, { email, role: 'lead' }, owner);
}

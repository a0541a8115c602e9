/** Sessions and sign-in: the queries behind server/routes/session.ts. */
import crypto from 'node:crypto';
import type { SessionView } from '../../shared/schemas/session';
import type { AppContext } from '../context';
import { audit } from './audit';

/** The signed-in user and their active memberships, the federation where they do the most first. */
export async function sessionView(ctx: AppContext, userId: number): Promise<SessionView> {
  const user = await ctx.db
    .selectFrom('users')
    .select(['id', 'email', 'display_name', 'is_owner'])
    .where('id', '=', userId)
    .executeTakeFirstOrThrow();
  const rows = await ctx.db
    .selectFrom('memberships')
    .innerJoin('federations', 'federations.id', 'memberships.federation_id')
    .leftJoin('classifiers', (join) =>
      join.onRef('classifiers.federation_id', '=', 'memberships.federation_id').onRef('classifiers.user_id', '=', 'memberships.user_id'),
    )
    .select(['federations.id', 'federations.slug', 'federations.name', 'memberships.role', 'classifiers.code'])
    .where('memberships.user_id', '=', userId)
    .where('memberships.active', '=', 1)
    .orderBy('federations.name')
    .execute();
  // The federation where the user does the most comes first: it is where they land.
  const weight = { lead: 0, classifier: 1, researcher: 2 } as const;
  rows.sort((a, b) => weight[a.role] - weight[b.role]);
  return {
    user: { id: user.id, email: user.email, displayName: user.display_name, isOwner: user.is_owner === 1 },
    localMail: ctx.config.env !== 'production' && ctx.mailer?.local === true,
    memberships: rows.map((r) => ({
      federation: { id: r.id, slug: r.slug, name: r.name },
      role: r.role,
      classifierCode: r.role === 'classifier' ? (r.code ?? null) : null,
    })),
  };
}

/** Records a new session for the user; returns its id (the cookie carries it, signed). */
/** A new session of a user and its audit entry, in one transaction. */
export async function createSessionRow(ctx: AppContext, userId: number): Promise<string> {
  const id = crypto.randomBytes(18).toString('base64url');
  const now = new Date().toISOString();
  await ctx.db.transaction().execute(async (trx) => {
    await trx.insertInto('sessions').values({ id, user_id: userId, created_at: now, last_seen_at: now, revoked_at: null }).execute();
    await audit(trx, { userId, action: 'session.start', entity: 'user', entityId: userId });
  });
  return id;
}

export async function userByEmail(ctx: AppContext, email: string) {
  return ctx.db.selectFrom('users').selectAll().where('email', '=', email).executeTakeFirst();
}

export async function setPasswordHash(ctx: AppContext, userId: number, passwordHash: string): Promise<void> {
  await ctx.db.updateTable('users').set({ password_hash: passwordHash }).where('id', '=', userId).execute();
}

export async function revokeSession(ctx: AppContext, sessionId: string): Promise<void> {
  await ctx.db.updateTable('sessions').set({ revoked_at: new Date().toISOString() }).where('id', '=', sessionId).execute();
}

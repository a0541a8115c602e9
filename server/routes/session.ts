import crypto from 'node:crypto';
import { Router, type Response } from 'express';
import { signInSchema, type SessionView, type SignedOutView } from '../../shared/schemas/session';
import { SESSION_COOKIE, requireSession, sessionCookieOptions } from '../auth/access';
import { signInLimits } from '../auth/rate-limits';
import { needsRehash, hashPassword, verifyAgainstDummy, verifyPassword } from '../auth/password';
import { signSessionToken } from '../auth/session-token';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import { audit } from '../services/audit';

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

/** Creates a session row and sets its signed cookie. */
export async function startSession(ctx: AppContext, res: Response, userId: number, sessionVersion: number): Promise<void> {
  const id = crypto.randomBytes(18).toString('base64url');
  const now = new Date().toISOString();
  await ctx.db.insertInto('sessions').values({ id, user_id: userId, created_at: now, last_seen_at: now, revoked_at: null }).execute();
  const token = await signSessionToken({ sid: id, uid: userId, sv: sessionVersion }, ctx.config.sessionSecret, ctx.config.sessionMinutes);
  res.cookie(SESSION_COOKIE, token, sessionCookieOptions(ctx));
}

export function sessionRouter(ctx: AppContext): Router {
  const router = Router();

  router.post('/session', ...signInLimits(), async (req, res) => {
    const { email, password } = parseWith(signInSchema, req.body);
    const user = await ctx.db.selectFrom('users').selectAll().where('email', '=', email).executeTakeFirst();
    // The same answer, after the same work, for an unknown e-mail and a wrong password.
    const ok = user ? await verifyPassword(password, user.password_hash) : await verifyAgainstDummy(password);
    if (!user || !ok) throw new HttpError(401, 'unauthenticated', 'The e-mail or password is not right');
    if (user.password_hash && needsRehash(user.password_hash)) {
      await ctx.db
        .updateTable('users')
        .set({ password_hash: await hashPassword(password) })
        .where('id', '=', user.id)
        .execute();
    }
    await startSession(ctx, res, user.id, user.session_version);
    await audit(ctx.db, { userId: user.id, action: 'session.start', entity: 'user', entityId: user.id });
    res.status(201).json(await sessionView(ctx, user.id));
  });

  router.get('/session', async (req, res) => {
    // The app asks on every load whether someone is signed in: nobody is an answer, not an error.
    // A session cookie that no longer holds (expired, revoked, forged) is still a 401.
    if (!req.auth && !(req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE]) {
      res.json({ user: null, memberships: [] } satisfies SignedOutView);
      return;
    }
    const auth = requireSession(req);
    res.json(await sessionView(ctx, auth.user.id));
  });

  router.delete('/session', async (req, res) => {
    if (req.auth?.kind === 'session') {
      await ctx.db.updateTable('sessions').set({ revoked_at: new Date().toISOString() }).where('id', '=', req.auth.sessionId).execute();
    }
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  return router;
}

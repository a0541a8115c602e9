import { Router, type Response } from 'express';
import { signInSchema, type SignedOutView } from '../../shared/schemas/session';
import { SESSION_COOKIE, requireSession, sessionCookieOptions } from '../auth/access';
import { signInLimits } from '../auth/rate-limits';
import { needsRehash, hashPassword, verifyAgainstDummy, verifyPassword } from '../auth/password';
import { signSessionToken } from '../auth/session-token';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import { createSessionRow, revokeSession, sessionView, setPasswordHash, userByEmail } from '../services/sessions';

/** Creates a session row and sets its signed cookie. */
export async function startSession(ctx: AppContext, res: Response, userId: number, sessionVersion: number): Promise<void> {
  const id = await createSessionRow(ctx, userId);
  const token = await signSessionToken({ sid: id, uid: userId, sv: sessionVersion }, ctx.config.sessionSecret, ctx.config.sessionMinutes);
  res.cookie(SESSION_COOKIE, token, sessionCookieOptions(ctx));
}

export function sessionRouter(ctx: AppContext): Router {
  const router = Router();

  router.post('/session', ...signInLimits(), async (req, res) => {
    const { email, password } = parseWith(signInSchema, req.body);
    const user = await userByEmail(ctx, email);
    // The same answer, after the same work, for an unknown e-mail and a wrong password.
    const ok = user ? await verifyPassword(password, user.password_hash) : await verifyAgainstDummy(password);
    if (!user || !ok) throw new HttpError(401, 'unauthenticated', 'The e-mail or password is not right');
    if (user.password_hash && needsRehash(user.password_hash)) {
      await setPasswordHash(ctx, user.id, await hashPassword(password));
    }
    await startSession(ctx, res, user.id, user.session_version);
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
      await revokeSession(ctx, req.auth.sessionId);
    }
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  return router;
}

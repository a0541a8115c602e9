import { Router, type RequestHandler } from 'express';
import { acceptNewUserSchema, resetPasswordSchema, resetRequestSchema } from '../../shared/schemas/access';
import type { AppContext } from '../context';
import { forbidden, HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import { assertStrongPassword } from '../auth/password-strength';
import { linkLimits, resetRequestLimits } from '../auth/rate-limits';
import { acceptInvitation, previewInvitation } from '../services/invitations';
import { completePasswordReset, previewPasswordReset, requestPasswordReset } from '../services/password-resets';
import { startSession } from './session';

/** These routes are for people following e-mailed links; an API token has no business here. */
const noTokens: RequestHandler = (req, _res, next) => {
  if (req.auth?.kind === 'token') return next(forbidden('This route is for people, not API tokens'));
  next();
};

function tokenParam(value: unknown): string {
  if (typeof value !== 'string' || value.length < 20 || value.length > 200)
    throw new HttpError(410, 'gone', 'This link has expired or was already used. Ask for a new one.');
  return value;
}

/**
 * Following e-mailed links, without a session: accepting an invitation and resetting a password.
 * Links are single-use and expire; an unknown, used or expired link answers 410 alike.
 */
export function accessLinksRouter(ctx: AppContext): Router {
  const router = Router();
  const links = linkLimits();

  router.get('/invitations/:token', noTokens, ...links, async (req, res) => {
    res.json(await previewInvitation(ctx, tokenParam(req.params.token)));
  });

  router.post('/invitations/:token/accept', noTokens, ...links, async (req, res) => {
    const token = tokenParam(req.params.token);
    const preview = await previewInvitation(ctx, token);
    const newUser = preview.existingUser ? null : parseWith(acceptNewUserSchema, req.body);
    if (newUser) await assertStrongPassword(newUser.password, [preview.email, newUser.displayName]);
    const result = await acceptInvitation(ctx, token, newUser);
    const signedInAsThem = req.auth?.kind === 'session' && req.auth.user.id === result.userId;
    if (result.created) await startSession(ctx, res, result.userId, result.sessionVersion);
    res.status(201).json({ federation: result.federation, role: result.role, signedIn: result.created || signedInAsThem });
  });

  router.post('/password-resets', noTokens, ...resetRequestLimits(), async (req, res) => {
    const { email } = parseWith(resetRequestSchema, req.body);
    // The work happens after the answer: the same answer, in the same time, for any address.
    res.status(202).json({ message: 'If the address has an account, a link to choose a new password is on its way.' });
    await requestPasswordReset(ctx, email).catch((error: unknown) =>
      ctx.logger.error({ err: error }, 'the password reset could not be started'),
    );
  });

  router.get('/password-resets/:token', noTokens, ...links, async (req, res) => {
    res.json(await previewPasswordReset(ctx, tokenParam(req.params.token)));
  });

  router.post('/password-resets/:token', noTokens, ...links, async (req, res) => {
    const token = tokenParam(req.params.token);
    const { password } = parseWith(resetPasswordSchema, req.body);
    const reset = await previewPasswordReset(ctx, token);
    await assertStrongPassword(password, [reset.email]);
    await completePasswordReset(ctx, token, password);
    res.status(204).end();
  });

  return router;
}

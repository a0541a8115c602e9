import type { Request, RequestHandler } from 'express';
import { rateLimit, type Options } from 'express-rate-limit';
import { HttpError } from '../http/errors';

/**
 * Rate limits of the routes that take secrets from anonymous callers. Each app instance has its
 * own in-memory counters (one process serves Panelwise; a cluster would need a shared store).
 * Keys: the client's IP address (express-rate-limit's default, IPv6 by /56 subnet; the app
 * trusts X-Forwarded-For from loopback only) and, separately, the account's normalised e-mail,
 * so spreading guesses over addresses or over accounts are both limited.
 */

const MINUTE = 60_000;

function accountKey(req: Request): string {
  const email = (req.body as { email?: unknown } | undefined)?.email;
  return `account:${typeof email === 'string' ? email.trim().toLowerCase() : ''}`;
}

function limiter(options: Partial<Options> & { message: string }): RequestHandler {
  const { message, ...rest } = options;
  return rateLimit({
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) => next(new HttpError(429, 'rate_limited', message)),
    ...rest,
  });
}

/**
 * Sign-in: only failed attempts count (a success is taken back). Ten wrong passwords for one
 * account within a minute, or thirty from one address, and the next attempt is refused with 429.
 */
export function signInLimits(): RequestHandler[] {
  const message = 'Too many failed sign-in attempts. Wait a minute and try again.';
  return [
    limiter({ windowMs: MINUTE, limit: 30, skipSuccessfulRequests: true, message }),
    limiter({ windowMs: MINUTE, limit: 10, skipSuccessfulRequests: true, keyGenerator: accountKey, message }),
  ];
}

/** Password-reset requests: every request counts (the answer is the same whether the account exists). */
export function resetRequestLimits(): RequestHandler[] {
  const message = 'Too many password-reset requests. Wait a quarter of an hour and try again.';
  return [
    limiter({ windowMs: 15 * MINUTE, limit: 20, message }),
    limiter({ windowMs: 15 * MINUTE, limit: 5, keyGenerator: accountKey, message }),
  ];
}

/** Following e-mailed links: failed look-ups of a token count per address. */
export function linkLimits(): RequestHandler[] {
  return [limiter({ windowMs: 15 * MINUTE, limit: 100, skipSuccessfulRequests: true, message: 'Too many attempts with links. Wait a quarter of an hour and try again.' })];
}

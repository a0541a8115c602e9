import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit, type Options } from 'express-rate-limit';
import { HttpError } from '../http/errors';

/**
 * Rate limits of the routes that take secrets from anonymous callers. Each app instance has its
 * own in-memory counters (one process serves Panelwise; a cluster would need a shared store).
 * Keys: the client's IP address (express-rate-limit's default, IPv6 by /56 subnet; the app
 * trusts X-Forwarded-For from loopback only) and, for sign-in, the account's normalised e-mail
 * together with the address: guessing one account from one address is stopped early, but
 * nobody can lock an account out for its owner, who signs in from another address.
 */

const MINUTE = 60_000;

function accountKey(req: Request): string {
  const email = (req.body as { email?: unknown } | undefined)?.email;
  return `account:${typeof email === 'string' ? email.trim().toLowerCase() : ''}`;
}

/** The account and the caller's address (IPv6 by /56 subnet), so a lock-out binds only the guesser. */
function accountAndAddressKey(req: Request): string {
  return `${accountKey(req)}|${ipKeyGenerator(req.ip ?? '')}`;
}

function limiter(options: Omit<Partial<Options>, 'message'> & { message: string }): RequestHandler {
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
 * account from one address within a quarter of an hour, or thirty from one address within a
 * minute (any accounts), and the next attempt from that address is refused with 429. The lock is
 * per account and address, never per account alone: an anonymous caller who fails on purpose
 * locks out only themselves, and the account's owner still signs in from their own address.
 * Guessing spread over many addresses meets the per-address limits and the password strength
 * rule (zxcvbn score 3 or more: over 10^8 guesses) at scrypt's cost per try.
 */
export function signInLimits(): RequestHandler[] {
  return [
    limiter({
      windowMs: MINUTE,
      limit: 30,
      skipSuccessfulRequests: true,
      message: 'Too many failed sign-in attempts from your address. Wait a minute and try again.',
    }),
    limiter({
      windowMs: 15 * MINUTE,
      limit: 10,
      skipSuccessfulRequests: true,
      keyGenerator: accountAndAddressKey,
      message:
        'Too many failed sign-in attempts for this account from your address. Wait a quarter of an hour, or choose a new password with “Forgot your password?”.',
    }),
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
  return [
    limiter({
      windowMs: 15 * MINUTE,
      limit: 100,
      skipSuccessfulRequests: true,
      message: 'Too many attempts with links. Wait a quarter of an hour and try again.',
    }),
  ];
}

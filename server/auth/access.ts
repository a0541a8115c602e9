import type { Request, RequestHandler } from 'express';
import type { Role } from '../db/database';
import type { AppContext } from '../context';
import { forbidden, HttpError, notFound, unauthenticated } from '../http/errors';
import { signSessionToken, verifySessionToken } from './session-token';
import { resolveApiToken } from '../services/api-tokens';

export const SESSION_COOKIE = 'pw_session';
/** A token older than this is re-issued on the next request (sliding renewal). */
const RENEW_AFTER_SECONDS = 5 * 60;

export type TokenScope = 'import' | 'read';

export interface SessionAuth {
  kind: 'session';
  sessionId: string;
  user: { id: number; email: string; displayName: string; isOwner: boolean };
}

export interface TokenAuth {
  kind: 'token';
  tokenId: number;
  federationId: number;
  scope: TokenScope;
}

export type Auth = SessionAuth | TokenAuth;

export interface FederationAccess {
  federation: { id: number; slug: string; name: string; scaleMin: number; scaleMax: number; settings: string };
  /** The caller's role, or null for an API token. */
  role: Role | null;
  userId: number | null;
  /** The roster entry linked to the caller, for classifiers. */
  classifierId: number | null;
  via: 'session' | 'token';
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      auth?: Auth;
      access?: FederationAccess;
    }
  }
}

export function sessionCookieOptions(ctx: AppContext) {
  return {
    httpOnly: true,
    sameSite: 'lax' as const,
    secure: ctx.config.env === 'production',
    path: '/',
    maxAge: ctx.config.sessionMinutes * 60 * 1000,
  };
}

/** When a session that started at `createdAt` (ISO time) ends at the latest, in epoch milliseconds. */
export function sessionEndsAt(ctx: AppContext, createdAt: string): number {
  const started = Date.parse(createdAt);
  return (Number.isFinite(started) ? started : 0) + ctx.config.sessionMaxDays * 24 * 3600 * 1000;
}

/**
 * Reads the session cookie (or a bearer API token) and sets `req.auth`. A session whose row is
 * revoked, whose user's session version moved on, that is older than the absolute lifetime
 * (sessionMaxDays), or that has no active membership left is ignored. It never rejects by itself: routes say what they require.
 */
export function authenticate(ctx: AppContext): RequestHandler {
  return async (req, res, next) => {
    const header = req.get('authorization');
    if (header?.startsWith('Bearer ')) {
      const token = header.slice('Bearer '.length).trim();
      const auth = await resolveApiToken(ctx, token);
      if (!auth) throw unauthenticated('The API token is not valid');
      req.auth = auth;
      return next();
    }
    const raw = (req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE];
    if (!raw) return next();
    const claims = await verifySessionToken(raw, ctx.config.sessionSecret);
    if (!claims) return next();
    const row = await ctx.db
      .selectFrom('sessions')
      .innerJoin('users', 'users.id', 'sessions.user_id')
      .select([
        'sessions.id as sid',
        'sessions.revoked_at',
        'sessions.created_at',
        'users.id',
        'users.email',
        'users.display_name',
        'users.is_owner',
        'users.session_version',
      ])
      .where('sessions.id', '=', claims.sid)
      .executeTakeFirst();
    if (!row || row.revoked_at || row.id !== claims.uid || row.session_version !== claims.sv) return next();
    // The absolute lifetime: however active, a session ends sessionMaxDays after its sign-in.
    const endsAt = sessionEndsAt(ctx, row.created_at);
    if (endsAt <= Date.now()) {
      res.clearCookie(SESSION_COOKIE, { path: '/' });
      await ctx.db
        .updateTable('sessions')
        .set({ revoked_at: new Date().toISOString() })
        .where('id', '=', row.sid)
        .where('revoked_at', 'is', null)
        .execute();
      return next();
    }
    req.auth = {
      kind: 'session',
      sessionId: row.sid,
      user: { id: row.id, email: row.email, displayName: row.display_name, isOwner: row.is_owner === 1 },
    };
    const now = Math.floor(Date.now() / 1000);
    if (now - claims.iat > RENEW_AFTER_SECONDS) {
      // Renewed for sessionMinutes more, but never past the session's absolute end.
      const minutes = Math.max(1, Math.min(ctx.config.sessionMinutes, Math.floor((endsAt - Date.now()) / 60_000)));
      const fresh = await signSessionToken({ sid: claims.sid, uid: claims.uid, sv: claims.sv }, ctx.config.sessionSecret, minutes);
      res.cookie(SESSION_COOKIE, fresh, { ...sessionCookieOptions(ctx), maxAge: minutes * 60 * 1000 });
      await ctx.db.updateTable('sessions').set({ last_seen_at: new Date().toISOString() }).where('id', '=', claims.sid).execute();
    }
    next();
  };
}

export function requireSession(req: Request): SessionAuth {
  if (!req.auth) throw unauthenticated();
  if (req.auth.kind !== 'session') throw forbidden('This route needs a signed-in user, not an API token');
  return req.auth;
}

export interface AccessRule {
  /** Roles that may use the route. */
  roles: readonly Role[];
  /** API token scopes that may use the route (none by default). */
  tokenScopes?: readonly TokenScope[];
}

/**
 * Checks, on the server, that the caller may use a federation-scoped route (`:federation` is the
 * federation's slug): a signed-in user with an active membership whose role the rule allows, or
 * an API token of that federation with an allowed scope. Sets `req.access`.
 */
export function requireAccess(ctx: AppContext, rule: AccessRule): RequestHandler {
  return async (req, _res, next) => {
    if (!req.auth) throw unauthenticated();
    const slug = req.params.federation;
    if (typeof slug !== 'string') throw new HttpError(500, 'internal', 'Route has no :federation parameter');
    const federation = await ctx.db
      .selectFrom('federations')
      .select(['id', 'slug', 'name', 'scale_min as scaleMin', 'scale_max as scaleMax', 'settings'])
      .where('slug', '=', slug)
      .executeTakeFirst();
    if (req.auth.kind === 'token') {
      if (!federation || federation.id !== req.auth.federationId) throw forbidden('This API token belongs to another federation');
      if (!rule.tokenScopes?.includes(req.auth.scope))
        throw forbidden(`An API token with the ${req.auth.scope} scope cannot use this route`);
      req.access = { federation, role: null, userId: null, classifierId: null, via: 'token' };
      return next();
    }
    if (!federation) throw notFound('The federation');
    const membership = await ctx.db
      .selectFrom('memberships')
      .select(['role', 'active'])
      .where('user_id', '=', req.auth.user.id)
      .where('federation_id', '=', federation.id)
      .executeTakeFirst();
    if (!membership || membership.active !== 1) throw forbidden('You are not a member of this federation');
    if (!rule.roles.includes(membership.role)) throw forbidden(`The ${membership.role} role cannot use this`);
    let classifierId: number | null = null;
    if (membership.role === 'classifier') {
      const linked = await ctx.db
        .selectFrom('classifiers')
        .select('id')
        .where('federation_id', '=', federation.id)
        .where('user_id', '=', req.auth.user.id)
        .executeTakeFirst();
      classifierId = linked?.id ?? null;
    }
    req.access = { federation, role: membership.role, userId: req.auth.user.id, classifierId, via: 'session' };
    next();
  };
}

/** The access set by `requireAccess`; a programming error when the route forgot it. */
export function accessOf(req: Request): FederationAccess {
  if (!req.access) throw new HttpError(500, 'internal', 'Route is missing its access check');
  return req.access;
}

/**
 * Cross-site request defence for cookie-authenticated, state-changing requests: a browser always
 * sends Origin on such requests, so one from another origin (or marked cross-site) is refused.
 */
export const sameOriginWrites: RequestHandler = (req, _res, next) => {
  if (['GET', 'HEAD', 'OPTIONS'].includes(req.method) || req.get('authorization')?.startsWith('Bearer ')) return next();
  const origin = req.get('origin');
  if (origin) {
    let host: string | null = null;
    try {
      host = new URL(origin).host;
    } catch {
      host = null;
    }
    if (host !== req.get('host')) return next(forbidden('Cross-site request refused'));
  }
  if (req.get('sec-fetch-site') === 'cross-site') return next(forbidden('Cross-site request refused'));
  next();
};

/**
 * Passwords and sessions: new passwords that are short, common or guessable (zxcvbn-ts score
 * below 3, or built from the person's own e-mail and name) are refused with a clear message on
 * invitation accept and password reset; a session ends at its absolute lifetime however active;
 * failed sign-ins lock the account only for the address they came from.
 */
import { decodeJwt } from 'jose';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SESSION_COOKIE } from '../../server/auth/access';
import { passwordStrength, MIN_SCORE } from '../../server/auth/password-strength';
import { hashSecret, inIso } from '../../server/auth/secret-token';
import { createTestApp, type TestApp } from '../helpers/test-app';

const LEAD = 'lead@demo.panelwise.test';
const CLASSIFIER = 'classifier@demo.panelwise.test';
const RESEARCHER = 'researcher@demo.panelwise.test';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
});
afterAll(() => t.close());

function sessionCookieOf(response: request.Response): string {
  const cookie = ([] as string[]).concat(response.headers['set-cookie'] ?? []).find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  if (!cookie) throw new Error('no session cookie');
  return cookie.split(';')[0];
}

/** An invitation for a new address, with its link token (written directly: the token is only e-mailed). */
async function invitation(email: string): Promise<string> {
  const federation = await t.ctx.db.selectFrom('federations').select('id').where('slug', '=', 'kestrel-coast').executeTakeFirstOrThrow();
  const token = `test-invitation-${email}-${'x'.repeat(20)}`;
  await t.ctx.db
    .insertInto('invitations')
    .values({
      federation_id: federation.id,
      email,
      role: 'researcher',
      classifier_id: null,
      token_hash: hashSecret(token),
      invited_by: null,
      expires_at: inIso(3600_000),
    })
    .execute();
  return token;
}

describe('password strength', () => {
  it('scores the examples as zxcvbn-ts 4.2 does (common and English dictionaries, no Levenshtein)', async () => {
    // Scores from @zxcvbn-ts/core 4.2.0 `check(password, userInputs)` with the options of password-strength.ts.
    expect((await passwordStrength('aaaaaaaaaa')).score).toBe(0);
    expect((await passwordStrength('password123')).score).toBe(0);
    expect((await passwordStrength('qwertyuiop')).score).toBe(0);
    expect((await passwordStrength('quiet-lantern-harbour-gravel')).score).toBeGreaterThanOrEqual(MIN_SCORE);
    // The person's own words and the site's do not count as strength.
    expect((await passwordStrength('panelwise-demo')).ok).toBe(false);
    expect((await passwordStrength('fennwright-osprey', [])).ok).toBe(true);
    expect((await passwordStrength('fennwright-osprey', ['fennwright.osprey@example.test', 'Fennwright Osprey'])).ok).toBe(false);
  });

  it('invitation accept refuses a short, a common and a personal password with a clear message, and writes no account', async () => {
    const email = 'juniper.quill@example.test';
    const token = await invitation(email);
    const accept = (password: string) =>
      request(t.app).post(`/api/invitations/${token}/accept`).send({ displayName: 'Juniper Quill', password, confirmPassword: password });

    const short = await accept('short');
    expect(short.status).toBe(400);
    expect(short.body.error.details).toContainEqual({ path: 'password', message: 'Use at least 10 characters' });
    for (const weak of ['aaaaaaaaaa', 'password1234', 'juniperquill2026']) {
      const res = await accept(weak);
      expect(res.status, weak).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(res.body.error.message).toMatch(/^This password is too easy to guess\./);
      expect(res.body.error.details[0].path).toBe('password');
    }
    expect(await t.ctx.db.selectFrom('users').select('id').where('email', '=', email).executeTakeFirst()).toBeUndefined();
    expect((await accept('copper-meadow-sextant-41')).status).toBe(201);
  });

  it('a password reset refuses a weak password and keeps the link usable; a strong one then works once', async () => {
    const user = await t.ctx.db.selectFrom('users').select('id').where('email', '=', CLASSIFIER).executeTakeFirstOrThrow();
    const token = `test-reset-${'y'.repeat(30)}`;
    await t.ctx.db
      .insertInto('password_resets')
      .values({ user_id: user.id, token_hash: hashSecret(token), expires_at: inIso(3600_000) })
      .execute();
    const weak = await request(t.app)
      .post(`/api/password-resets/${token}`)
      .send({ password: 'classifier123', confirmPassword: 'classifier123' });
    expect(weak.status).toBe(400);
    expect(weak.body.error.message).toMatch(/too easy to guess/);
    // Nothing changed: the old password still works and the link is still open.
    expect((await request(t.app).post('/api/session').send({ email: CLASSIFIER, password: 'panelwise-demo' })).status).toBe(201);
    expect((await request(t.app).get(`/api/password-resets/${token}`)).status).toBe(200);
    expect(
      (
        await request(t.app)
          .post(`/api/password-resets/${token}`)
          .send({ password: 'tundra-violin-parcel-88', confirmPassword: 'tundra-violin-parcel-88' })
      ).status,
    ).toBe(204);
  });
});

describe('absolute session lifetime', () => {
  it('a session ends sessionMaxDays after sign-in however active it is, and renewals never reach past that end', async () => {
    expect(t.ctx.config.sessionMaxDays).toBe(30);
    const signIn = await request(t.app).post('/api/session').send({ email: RESEARCHER, password: 'panelwise-demo' });
    const cookie = sessionCookieOf(signIn);
    const { sid, exp } = decodeJwt(cookie.slice(SESSION_COOKIE.length + 1)) as { sid: string; exp: number };
    expect((await request(t.app).get('/api/session').set('Cookie', cookie)).status).toBe(200);

    // Sign-in 30 days minus 10 minutes ago: still valid; a renewal is cut to the 10 minutes left.
    const ago = (ms: number) => new Date(Date.now() - ms).toISOString();
    const day = 24 * 3600 * 1000;
    await t.ctx.db
      .updateTable('sessions')
      .set({ created_at: ago(30 * day - 10 * 60_000) })
      .where('id', '=', sid)
      .execute();
    expect((await request(t.app).get('/api/session').set('Cookie', cookie)).status).toBe(200);

    // Past the absolute end: refused (401), and the row is revoked.
    await t.ctx.db
      .updateTable('sessions')
      .set({ created_at: ago(30 * day + 1000) })
      .where('id', '=', sid)
      .execute();
    const ended = await request(t.app).get('/api/session').set('Cookie', cookie);
    expect(ended.status).toBe(401);
    const row = await t.ctx.db.selectFrom('sessions').select('revoked_at').where('id', '=', sid).executeTakeFirstOrThrow();
    expect(row.revoked_at).not.toBeNull();
    expect(exp).toBeGreaterThan(Date.now() / 1000);
  });

  it('renews a token near the absolute end only up to that end', async () => {
    const signIn = await request(t.app).post('/api/session').send({ email: LEAD, password: 'panelwise-demo' });
    const cookie = sessionCookieOf(signIn);
    const { sid } = decodeJwt(cookie.slice(SESSION_COOKIE.length + 1)) as { sid: string };
    const day = 24 * 3600 * 1000;
    await t.ctx.db
      .updateTable('sessions')
      .set({ created_at: new Date(Date.now() - 30 * day + 10 * 60_000).toISOString() })
      .where('id', '=', sid)
      .execute();
    // A token older than five minutes is renewed: forge the age by signing one issued 6 minutes ago.
    const { SignJWT } = await import('jose');
    const claims = decodeJwt(cookie.slice(SESSION_COOKIE.length + 1)) as { sid: string; uid: number; sv: number };
    const now = Math.floor(Date.now() / 1000);
    const old = await new SignJWT({ sid: claims.sid, uid: claims.uid, sv: claims.sv })
      .setProtectedHeader({ alg: 'HS256' })
      .setIssuer('panelwise')
      .setAudience('panelwise-session')
      .setIssuedAt(now - 360)
      .setExpirationTime(now + 3000)
      .sign(t.ctx.config.sessionSecret);
    const renewed = await request(t.app).get('/api/session').set('Cookie', `${SESSION_COOKIE}=${old}`);
    expect(renewed.status).toBe(200);
    const fresh = decodeJwt(sessionCookieOf(renewed).slice(SESSION_COOKIE.length + 1));
    // The session has about 10 minutes left: the renewed token lives at most that, not the 60 sliding minutes.
    expect(fresh.exp! - now).toBeLessThanOrEqual(10 * 60 + 5);
    expect(fresh.exp! - now).toBeGreaterThan(5 * 60);
  });
});

describe('lock-out an anonymous caller cannot use against someone else', () => {
  it('failures from one address lock that address out of the account; its owner signs in from theirs', async () => {
    const attacker = '203.0.113.66';
    const owner = '198.51.100.20';
    const attempt = (ip: string, password: string) =>
      request(t.app).post('/api/session').set('X-Forwarded-For', ip).send({ email: LEAD, password });
    for (let i = 0; i < 10; i++) expect((await attempt(attacker, `not-the-password-${i}`)).status).toBe(401);
    const locked = await attempt(attacker, 'panelwise-demo');
    expect(locked.status).toBe(429);
    expect(locked.body.error.message).toMatch(/for this account from your address/);
    // The owner, from their own address, is not locked out, and a success does not count.
    expect((await attempt(owner, 'panelwise-demo')).status).toBe(201);
    expect((await attempt(owner, 'panelwise-demo')).status).toBe(201);
    // The attacker's address is still locked for that account, though not for another account.
    expect((await attempt(attacker, 'panelwise-demo')).status).toBe(429);
    expect(
      (await request(t.app).post('/api/session').set('X-Forwarded-For', attacker).send({ email: RESEARCHER, password: 'panelwise-demo' }))
        .status,
    ).toBe(201);
  });
});

import { decodeJwt, SignJWT } from 'jose';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import { SESSION_COOKIE } from '../../server/auth/access';
import { hashSecret } from '../../server/auth/secret-token';
import { parseMessage } from '../../server/mail/parse-message';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';

const LEAD = 'lead@demo.panelwise.test';
const CLASSIFIER = 'classifier@demo.panelwise.test';
const RESEARCHER = 'researcher@demo.panelwise.test';
const OWNER = 'owner@demo.panelwise.test';
const KC = '/api/federations/kestrel-coast';

/** The newest message the local mail server stored for an address (waits for it to arrive). */
async function messageTo(t: TestApp, to: string, after = 0) {
  for (let i = 0; i < 100; i++) {
    const row = await t.ctx.db
      .selectFrom('outbox_messages')
      .selectAll()
      .where('mail_to', '=', to)
      .where('id', '>', after)
      .orderBy('id', 'desc')
      .executeTakeFirst();
    if (row) return row;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`no message to ${to}`);
}

const lastMessageId = async (t: TestApp) =>
  (
    await t.ctx.db
      .selectFrom('outbox_messages')
      .select((eb) => eb.fn.max('id').as('id'))
      .executeTakeFirst()
  )?.id ?? 0;

/** The path of the link in a message's text (the origin is PUBLIC_ORIGIN). */
function linkPath(text: string, kind: 'invitations' | 'reset-password'): { path: string; token: string } {
  const match = new RegExp(`https?://[^\\s/]+/${kind}/([A-Za-z0-9_-]+)`).exec(text);
  if (!match?.[1]) throw new Error(`no ${kind} link in: ${text}`);
  return { path: `/${kind}/${match[1]}`, token: match[1] };
}

function sessionCookieOf(response: request.Response): string {
  const cookies = ([] as string[]).concat(response.headers['set-cookie'] ?? []);
  const cookie = cookies.find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  if (!cookie) throw new Error('no session cookie');
  return cookie.split(';')[0];
}

describe('invitations through the local mail server', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
  });
  afterAll(() => t.close());

  it('a lead invites a classifier linked to a roster entry; the e-mailed link sets name and password once, and the new classifier signs in', async () => {
    const lead = await signedInAgent(t.app, LEAD);
    const before = await lead.get(`${KC}/members`);
    expect(before.status).toBe(200);
    expect(before.body.unlinkedClassifiers.map((c: { code: string }) => c.code)).toContain('C03');

    const invited = await lead
      .post(`${KC}/invitations`)
      .send({ email: 'New.Classifier@Example.test', role: 'classifier', classifierCode: 'C03' });
    expect(invited.status).toBe(201);
    expect(invited.body).toMatchObject({
      mailSent: true,
      invitation: { email: 'new.classifier@example.test', role: 'classifier', classifierCode: 'C03' },
    });

    // The message went over SMTP to the local server, which stored it; the lead's Outbox lists it with its link.
    const stored = await messageTo(t, 'new.classifier@example.test');
    expect(stored.subject).toBe('Invitation to Kestrel Coast Wheelchair Basketball Federation on Panelwise');
    expect(stored.raw).toMatch(/^X-Panelwise-Federation: kestrel-coast/m);
    const outbox = await lead.get(`${KC}/outbox`);
    expect(outbox.status).toBe(200);
    const listed = outbox.body.messages.find((m: { id: number }) => m.id === stored.id);
    const { path, token } = linkPath(stored.text_body, 'invitations');
    expect(listed.links).toContain(`${t.ctx.config.publicOrigin}${path}`);
    expect(stored.html_body).toContain(path);

    // Only a hash of the token is stored.
    const row = await t.ctx.db
      .selectFrom('invitations')
      .selectAll()
      .where('email', '=', 'new.classifier@example.test')
      .executeTakeFirstOrThrow();
    expect(row.token_hash).toBe(hashSecret(token));
    expect(JSON.stringify(row)).not.toContain(token);

    const preview = await request(t.app).get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(preview.body).toMatchObject({
      email: 'new.classifier@example.test',
      role: 'classifier',
      classifierCode: 'C03',
      existingUser: false,
      federation: { slug: 'kestrel-coast' },
    });

    const invalid = await request(t.app)
      .post(`/api/invitations/${token}/accept`)
      .send({ displayName: '', password: 'short', confirmPassword: 'other' });
    expect(invalid.status).toBe(400);
    expect(invalid.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['confirmPassword', 'displayName', 'password']);

    const accepted = await request(t.app)
      .post(`/api/invitations/${token}/accept`)
      .send({ displayName: 'Wren Alder', password: 'a-new-classifier-pass', confirmPassword: 'a-new-classifier-pass' });
    expect(accepted.status).toBe(201);
    expect(accepted.body).toEqual({
      federation: { slug: 'kestrel-coast', name: 'Kestrel Coast Wheelchair Basketball Federation' },
      role: 'classifier',
      signedIn: true,
    });
    expect(String(accepted.headers['set-cookie'])).toMatch(/HttpOnly/);

    // Used once: the same link answers 410 now.
    expect((await request(t.app).get(`/api/invitations/${token}`)).status).toBe(410);
    expect(
      (
        await request(t.app)
          .post(`/api/invitations/${token}/accept`)
          .send({ displayName: 'X', password: 'another-password', confirmPassword: 'another-password' })
      ).status,
    ).toBe(410);

    const classifier = await signedInAgent(t.app, 'new.classifier@example.test', 'a-new-classifier-pass');
    const session = await classifier.get('/api/session');
    expect(session.body.memberships).toEqual([
      { federation: expect.objectContaining({ slug: 'kestrel-coast' }), role: 'classifier', classifierCode: 'C03' },
    ]);
    // Their own figures, and no one else's.
    expect((await classifier.get(`${KC}/members`)).status).toBe(403);
    expect((await classifier.get(`${KC}/analytics/classifiers/C05`)).status).toBe(403);
    expect((await classifier.get(`${KC}/analytics/classifiers/C03`)).status).toBe(200);
  });

  it('refuses invitations that cannot work, naming the field', async () => {
    const lead = await signedInAgent(t.app, LEAD);
    const noCode = await lead.post(`${KC}/invitations`).send({ email: 'x@example.test', role: 'classifier' });
    expect(noCode.status).toBe(400);
    expect(noCode.body.error.details).toEqual([{ path: 'classifierCode', message: 'Choose the roster entry of the classifier' }]);
    const taken = await lead.post(`${KC}/invitations`).send({ email: 'x@example.test', role: 'classifier', classifierCode: 'C12' });
    expect(taken.status).toBe(409);
    expect((await lead.post(`${KC}/invitations`).send({ email: 'x@example.test', role: 'classifier', classifierCode: 'C99' })).status).toBe(
      400,
    );
    expect((await lead.post(`${KC}/invitations`).send({ email: RESEARCHER, role: 'researcher' })).status).toBe(409);
  });

  it('an expired or revoked invitation link answers 410', async () => {
    const lead = await signedInAgent(t.app, LEAD);
    const after = await lastMessageId(t);
    const invited = await lead.post(`${KC}/invitations`).send({ email: 'late@example.test', role: 'researcher' });
    const { token } = linkPath((await messageTo(t, 'late@example.test', after)).text_body, 'invitations');
    await t.ctx.db
      .updateTable('invitations')
      .set({ expires_at: '2000-01-01T00:00:00.000Z' })
      .where('id', '=', invited.body.invitation.id)
      .execute();
    const expired = await request(t.app).get(`/api/invitations/${token}`);
    expect(expired.status).toBe(410);
    expect(expired.body.error.code).toBe('gone');

    const again = await lead.post(`${KC}/invitations`).send({ email: 'late@example.test', role: 'researcher' });
    const second = linkPath((await messageTo(t, 'late@example.test', (await lastMessageId(t)) - 1)).text_body, 'invitations');
    expect((await lead.delete(`${KC}/invitations/${again.body.invitation.id}`)).status).toBe(204);
    expect((await request(t.app).get(`/api/invitations/${second.token}`)).status).toBe(410);
  });

  it('the site owner creates a federation and invites its first lead; an existing account gains the membership', async () => {
    const owner = await signedInAgent(t.app, OWNER);
    expect((await signedInAgent(t.app, LEAD).then((a) => a.get('/api/owner/federations'))).status).toBe(403);
    const created = await owner
      .post('/api/owner/federations')
      .send({ slug: 'gannet-bay', name: 'Gannet Bay Wheelchair Basketball', leadEmail: RESEARCHER });
    expect(created.status).toBe(201);
    expect(created.body.mailSent).toBe(true);
    expect(
      (await owner.post('/api/owner/federations').send({ slug: 'gannet-bay', name: 'Again', leadEmail: 'a@example.test' })).status,
    ).toBe(409);
    const list = await owner.get('/api/owner/federations');
    expect(list.body.federations).toContainEqual(expect.objectContaining({ slug: 'gannet-bay', leads: 0, pendingInvitations: 1 }));

    const message = await messageTo(t, RESEARCHER);
    expect((await owner.get('/api/owner/outbox')).body.messages.map((m: { id: number }) => m.id)).toContain(message.id);
    const { token } = linkPath(message.text_body, 'invitations');
    expect((await request(t.app).get(`/api/invitations/${token}`)).body.existingUser).toBe(true);
    const researcher = await signedInAgent(t.app, RESEARCHER);
    const accepted = await researcher.post(`/api/invitations/${token}/accept`).send({});
    expect(accepted.status).toBe(201);
    expect(accepted.body.signedIn).toBe(true);
    const session = await researcher.get('/api/session');
    expect(session.body.memberships.map((m: { federation: { slug: string }; role: string }) => `${m.federation.slug}:${m.role}`)).toEqual([
      'gannet-bay:lead',
      'kestrel-coast:researcher',
    ]);
    expect((await researcher.get('/api/federations/gannet-bay/members')).status).toBe(200);
  });

  it('the site owner invites a lead to an existing federation, so a federation is never left without one', async () => {
    const owner = await signedInAgent(t.app, OWNER);
    await owner
      .post('/api/owner/federations')
      .send({ slug: 'tern-point', name: 'Tern Point Wheelchair Basketball', leadEmail: 'first.lead@example.test' });
    expect((await owner.post('/api/owner/federations/tern-point/leads').send({ email: 'not-an-email' })).status).toBe(400);
    expect((await owner.post('/api/owner/federations/no-such-place/leads').send({ email: 'x@example.test' })).status).toBe(404);
    expect(
      (await signedInAgent(t.app, LEAD).then((a) => a.post('/api/owner/federations/tern-point/leads').send({ email: 'x@example.test' })))
        .status,
    ).toBe(403);

    const before = await lastMessageId(t);
    const invited = await owner.post('/api/owner/federations/tern-point/leads').send({ email: 'second.lead@example.test' });
    expect(invited.status).toBe(201);
    expect(invited.body.invitation).toEqual(expect.objectContaining({ email: 'second.lead@example.test', role: 'lead' }));
    const message = await messageTo(t, 'second.lead@example.test', before);
    expect(message.subject).toBe('Invitation to Tern Point Wheelchair Basketball on Panelwise');
    const list = await owner.get('/api/owner/federations');
    expect(list.body.federations).toContainEqual(expect.objectContaining({ slug: 'tern-point', leads: 0, pendingInvitations: 2 }));

    const { token } = linkPath(message.text_body, 'invitations');
    const accepted = await request(t.app)
      .post(`/api/invitations/${token}/accept`)
      .send({ displayName: 'Second Lead', password: 'second-lead-password', confirmPassword: 'second-lead-password' });
    expect(accepted.status).toBe(201);
    expect(accepted.body.role).toBe('lead');
    expect((await owner.get('/api/owner/federations')).body.federations).toContainEqual(
      expect.objectContaining({ slug: 'tern-point', leads: 1 }),
    );
  });
});

describe('password reset through the local mail server', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
  });
  afterAll(() => t.close());

  it('e-mails a single-use link; the new password works, the old one and old sessions do not', async () => {
    const oldSession = await signedInAgent(t.app, CLASSIFIER);
    const unknown = await request(t.app).post('/api/password-resets').send({ email: 'nobody@example.test' });
    const known = await request(t.app).post('/api/password-resets').send({ email: 'Classifier@demo.panelwise.test' });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(known.body);

    const message = await messageTo(t, CLASSIFIER);
    expect(message.subject).toBe('Choose a new Panelwise password');
    const { token } = linkPath(message.text_body, 'reset-password');
    expect((await request(t.app).get(`/api/password-resets/${token}`)).body.email).toBe(CLASSIFIER);
    const mismatch = await request(t.app)
      .post(`/api/password-resets/${token}`)
      .send({ password: 'brand-new-password', confirmPassword: 'brand-new-passwort' });
    expect(mismatch.status).toBe(400);
    expect(
      (
        await request(t.app)
          .post(`/api/password-resets/${token}`)
          .send({ password: 'brand-new-password', confirmPassword: 'brand-new-password' })
      ).status,
    ).toBe(204);
    expect(
      (
        await request(t.app)
          .post(`/api/password-resets/${token}`)
          .send({ password: 'brand-new-password', confirmPassword: 'brand-new-password' })
      ).status,
    ).toBe(410);

    expect((await oldSession.get('/api/session')).status).toBe(401);
    expect((await request(t.app).post('/api/session').send({ email: CLASSIFIER, password: 'panelwise-demo' })).status).toBe(401);
    const fresh = await signedInAgent(t.app, CLASSIFIER, 'brand-new-password');
    expect((await fresh.get('/api/session')).status).toBe(200);
    expect(await t.ctx.db.selectFrom('password_resets').select('token_hash').execute()).toEqual([{ token_hash: hashSecret(token) }]);
  });

  it('an expired reset link answers 410', async () => {
    const after = await lastMessageId(t);
    await request(t.app).post('/api/password-resets').send({ email: RESEARCHER });
    const { token } = linkPath((await messageTo(t, RESEARCHER, after)).text_body, 'reset-password');
    await t.ctx.db
      .updateTable('password_resets')
      .set({ expires_at: '2000-01-01T00:00:00.000Z' })
      .where('token_hash', '=', hashSecret(token))
      .execute();
    expect((await request(t.app).get(`/api/password-resets/${token}`)).status).toBe(410);
  });

  it('limits reset requests per account', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await request(t.app).post('/api/password-resets').send({ email: LEAD })).status);
    expect(statuses).toEqual([202, 202, 202, 202, 202, 429]);
  });
});

describe('brute force', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
  });
  afterAll(() => t.close());

  it('after 10 wrong passwords from one address the next attempt from it gets 429, even with the right password', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 10; i++)
      statuses.push(
        (
          await request(t.app)
            .post('/api/session')
            .send({ email: RESEARCHER, password: `wrong-${i}` })
        ).status,
      );
    expect(statuses).toEqual(Array(10).fill(401));
    const blocked = await request(t.app).post('/api/session').send({ email: RESEARCHER, password: 'panelwise-demo' });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate_limited');
    expect(blocked.headers['ratelimit-policy'] ?? blocked.headers['ratelimit']).toBeDefined();
    // The lock is per account and address (and, higher, per address): another account still signs in,
    // and the same account from another address does too, so a guesser cannot lock its owner out.
    expect((await request(t.app).post('/api/session').send({ email: LEAD, password: 'panelwise-demo' })).status).toBe(201);
    const elsewhere = await request(t.app)
      .post('/api/session')
      .set('X-Forwarded-For', '203.0.113.50')
      .send({ email: RESEARCHER, password: 'panelwise-demo' });
    expect(elsewhere.status).toBe(201);
  });
});

describe('session tokens and members', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
  });
  afterAll(() => t.close());

  it('refuses a session token with a bad signature, an expired one, and one of a deactivated member: 401', async () => {
    const signIn = await request(t.app).post('/api/session').send({ email: CLASSIFIER, password: 'panelwise-demo' });
    const cookie = sessionCookieOf(signIn);
    const claims = decodeJwt(cookie.slice(SESSION_COOKIE.length + 1));
    expect((await request(t.app).get('/api/session').set('Cookie', cookie)).status).toBe(200);

    const forge = (secret: Uint8Array, iat: number, exp: number) =>
      new SignJWT({ sid: claims.sid, uid: claims.uid, sv: claims.sv })
        .setProtectedHeader({ alg: 'HS256' })
        .setIssuer('panelwise')
        .setAudience('panelwise-session')
        .setIssuedAt(iat)
        .setExpirationTime(exp)
        .sign(secret);
    const now = Math.floor(Date.now() / 1000);
    const badSignature = await forge(new TextEncoder().encode('not-the-server-secret-at-all-000'), now, now + 600);
    expect((await request(t.app).get('/api/session').set('Cookie', `${SESSION_COOKIE}=${badSignature}`)).status).toBe(401);
    const expired = await forge(t.ctx.config.sessionSecret, now - 7200, now - 3600);
    expect((await request(t.app).get('/api/session').set('Cookie', `${SESSION_COOKIE}=${expired}`)).status).toBe(401);
    const tampered = cookie.slice(0, -3) + (cookie.endsWith('AAA') ? 'BBB' : 'AAA');
    expect((await request(t.app).get('/api/session').set('Cookie', tampered)).status).toBe(401);

    const lead = await signedInAgent(t.app, LEAD);
    const member = (await lead.get(`${KC}/members`)).body.members.find((m: { email: string }) => m.email === CLASSIFIER);
    const deactivated = await lead.patch(`${KC}/members/${member.userId}`).send({ active: false });
    expect(deactivated.status).toBe(200);
    expect(deactivated.body.active).toBe(false);
    expect((await request(t.app).get('/api/session').set('Cookie', cookie)).status).toBe(401);
    expect((await request(t.app).get(`${KC}/summary`).set('Cookie', cookie)).status).toBe(401);
    // Reactivated, they sign in again (the old token stays dead).
    expect((await lead.patch(`${KC}/members/${member.userId}`).send({ active: true })).status).toBe(200);
    expect((await request(t.app).get('/api/session').set('Cookie', cookie)).status).toBe(401);
    expect((await signedInAgent(t.app, CLASSIFIER).then((a) => a.get(`${KC}/summary`))).status).toBe(200);
  });

  it('a member deactivated in one federation keeps the others, and loses this one at once', async () => {
    // The lead is also a researcher in harbour-cities; make someone else lead of kestrel-coast first.
    const lead = await signedInAgent(t.app, LEAD);
    const members = (await lead.get(`${KC}/members`)).body.members as { userId: number; email: string }[];
    const researcherId = members.find((m) => m.email === RESEARCHER)!.userId;
    const leadId = members.find((m) => m.email === LEAD)!.userId;
    expect((await lead.patch(`${KC}/members/${leadId}`).send({ active: false })).status).toBe(409);
    expect((await lead.patch(`${KC}/members/${researcherId}`).send({ role: 'lead' })).status).toBe(200);
    const researcher = await signedInAgent(t.app, RESEARCHER);
    expect((await researcher.get(`${KC}/members`)).status).toBe(200);
    expect((await researcher.patch(`${KC}/members/${leadId}`).send({ active: false })).status).toBe(200);
    expect((await lead.get(`${KC}/summary`)).status).toBe(403);
    const session = await lead.get('/api/session');
    expect(session.status).toBe(200);
    expect(session.body.memberships.map((m: { federation: { slug: string } }) => m.federation.slug)).toEqual(['harbour-cities']);
    expect((await lead.get('/api/federations/harbour-cities/summary')).status).toBe(200);
  });

  it('role changes apply on the next request; a classifier needs a roster entry', async () => {
    const lead = await signedInAgent(t.app, 'researcher@demo.panelwise.test');
    const members = (await lead.get(`${KC}/members`)).body.members as { userId: number; email: string }[];
    const classifierId = members.find((m) => m.email === CLASSIFIER)!.userId;
    const classifier = await signedInAgent(t.app, CLASSIFIER);
    expect((await classifier.get(`${KC}/analytics/me`)).status).toBe(200);
    expect((await lead.patch(`${KC}/members/${classifierId}`).send({ role: 'researcher' })).status).toBe(200);
    expect((await classifier.get(`${KC}/analytics/me`)).status).toBe(403);
    const needsCode = await lead.patch(`${KC}/members/${classifierId}`).send({ role: 'classifier' });
    expect(needsCode.status).toBe(400);
    expect(needsCode.body.error.details[0].path).toBe('classifierCode');
    const back = await lead.patch(`${KC}/members/${classifierId}`).send({ role: 'classifier', classifierCode: 'C12' });
    expect(back.status).toBe(200);
    expect(back.body).toMatchObject({ role: 'classifier', classifierCode: 'C12' });
    expect((await classifier.get(`${KC}/analytics/me`)).status).toBe(200);
  });
});

describe('API tokens', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
  });
  afterAll(() => t.close());

  it('are shown once, stored hashed, scoped to one federation and scope, never reach member routes, record their last use and can be revoked', async () => {
    const lead = await signedInAgent(t.app, LEAD);
    const created = await lead.post(`${KC}/api-tokens`).send({ name: 'Registration system', scope: 'read' });
    expect(created.status).toBe(201);
    const { token, view } = created.body as { token: string; view: { id: number; prefix: string; lastUsedAt: string | null } };
    expect(token).toMatch(/^pwt_[A-Za-z0-9_-]{43}$/);
    expect(token.startsWith(view.prefix)).toBe(true);
    expect(view.lastUsedAt).toBeNull();
    const listed = await lead.get(`${KC}/api-tokens`);
    expect(JSON.stringify(listed.body)).not.toContain(token);
    const row = await t.ctx.db.selectFrom('api_tokens').selectAll().where('id', '=', view.id).executeTakeFirstOrThrow();
    expect(row.token_hash).toBe(hashSecret(token));

    const bearer = { Authorization: `Bearer ${token}` };
    expect((await request(t.app).get(`${KC}/summary`).set(bearer)).status).toBe(200);
    expect((await request(t.app).get('/api/federations/harbour-cities/summary').set(bearer)).status).toBe(403);
    expect((await request(t.app).get('/api/session').set(bearer)).status).toBe(403);
    expect((await request(t.app).get(`${KC}/members`).set(bearer)).status).toBe(403);
    expect((await request(t.app).post(`${KC}/api-tokens`).set(bearer).send({ name: 'more', scope: 'import' })).status).toBe(403);
    expect((await lead.get(`${KC}/api-tokens`)).body.tokens.find((x: { id: number }) => x.id === view.id).lastUsedAt).not.toBeNull();

    expect(
      (
        await request(t.app)
          .get(`${KC}/summary`)
          .set({ Authorization: `Bearer ${token}x` })
      ).status,
    ).toBe(401);
    expect((await request(t.app).get(`${KC}/summary`).set({ Authorization: 'Bearer pwt_not-a-token' })).status).toBe(401);
    expect((await lead.delete(`${KC}/api-tokens/${view.id}`)).status).toBe(204);
    expect((await request(t.app).get(`${KC}/summary`).set(bearer)).status).toBe(401);
    expect((await lead.delete(`${KC}/api-tokens/${view.id}`)).status).toBe(404);
  });

  it('are validated, naming the field', async () => {
    const lead = await signedInAgent(t.app, LEAD);
    const response = await lead.post(`${KC}/api-tokens`).send({ name: ' ', scope: 'write' });
    expect(response.status).toBe(400);
    expect(response.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['name', 'scope']);
  });
});

describe('in production', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
  });
  afterAll(() => t.close());

  it('has no Outbox and shows no stack traces', async () => {
    const ctx = { ...t.ctx, config: { ...t.ctx.config, env: 'production' as const } };
    const app = createApp(ctx, { serveClient: false });
    const signIn = await request(app).post('/api/session').send({ email: LEAD, password: 'panelwise-demo' });
    expect(String(signIn.headers['set-cookie'])).toMatch(/Secure/);
    const cookie = sessionCookieOf(signIn);
    expect(signIn.body.localMail).toBe(false);
    expect((await request(app).get(`${KC}/outbox`).set('Cookie', cookie)).status).toBe(404);
    const owner = sessionCookieOf(await request(app).post('/api/session').send({ email: OWNER, password: 'panelwise-demo' }));
    expect((await request(app).get('/api/owner/outbox').set('Cookie', owner)).status).toBe(404);
    const broken = await request(app).post('/api/session').set('content-type', 'application/json').send('{"email":');
    expect(broken.status).toBe(400);
    expect(JSON.stringify(broken.body)).not.toMatch(/stack|at .*\.ts/);
  });
});

describe('the local mail server', () => {
  it('decodes quoted-printable, base64 and encoded-word subjects', () => {
    const raw = [
      'From: a@example.test',
      'To: b@example.test',
      'Subject: =?UTF-8?Q?Caf=C3=A9_panel?=',
      'Content-Type: multipart/alternative; boundary="xyz"',
      '',
      '--xyz',
      'Content-Type: text/plain; charset=utf-8',
      'Content-Transfer-Encoding: quoted-printable',
      '',
      'Hello =E2=80=94 a long line that is soft-=',
      'wrapped',
      '--xyz',
      'Content-Type: text/html; charset=utf-8',
      'Content-Transfer-Encoding: base64',
      '',
      Buffer.from('<p>Hello</p>').toString('base64'),
      '--xyz--',
      '',
    ].join('\r\n');
    const parsed = parseMessage(raw);
    expect(parsed.subject).toBe('Café panel');
    expect(parsed.text).toBe('Hello — a long line that is soft-wrapped');
    expect(parsed.html).toBe('<p>Hello</p>');
  });
});

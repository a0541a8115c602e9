import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';

describe('session API', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
  });
  afterAll(() => t.close());

  it('signs in, tells who is signed in, and signs out for good', async () => {
    const agent = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    const me = await agent.get('/api/session');
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe('lead@demo.panelwise.test');
    expect(me.body.memberships).toContainEqual(
      expect.objectContaining({ role: 'lead', federation: expect.objectContaining({ slug: 'kestrel-coast' }) }),
    );
    const cookie = (await request(t.app).post('/api/session').send({ email: 'lead@demo.panelwise.test', password: 'panelwise-demo' }))
      .headers['set-cookie'];
    expect(String(cookie)).toMatch(/HttpOnly/i);
    expect(String(cookie)).toMatch(/SameSite=Lax/i);

    expect((await agent.delete('/api/session')).status).toBe(204);
    const after = await agent.get('/api/session');
    expect(after.status).toBe(200);
    expect(after.body).toEqual({ user: null, memberships: [] });
    expect((await agent.get('/api/federations/kestrel-coast/summary')).status).toBe(401);
  });

  it('answers an unknown e-mail and a wrong password the same way', async () => {
    const unknown = await request(t.app).post('/api/session').send({ email: 'nobody@demo.panelwise.test', password: 'whatever' });
    const wrong = await request(t.app).post('/api/session').send({ email: 'lead@demo.panelwise.test', password: 'whatever' });
    expect(unknown.status).toBe(401);
    expect(wrong.status).toBe(401);
    expect(unknown.body).toEqual(wrong.body);
  });

  it('names the fields of an invalid sign-in', async () => {
    const response = await request(t.app).post('/api/session').send({ email: 'not-an-email' });
    expect(response.status).toBe(400);
    expect(response.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['email', 'password']);
  });

  it('keeps a federation summary to its members', async () => {
    const lead = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    const summary = await lead.get('/api/federations/kestrel-coast/summary');
    expect(summary.status).toBe(200);
    expect(summary.body.counts.athletes).toBe(300);
    expect((await request(t.app).get('/api/federations/kestrel-coast/summary')).status).toBe(401);
    const researcher = await signedInAgent(t.app, 'researcher@demo.panelwise.test');
    expect((await researcher.get('/api/federations/harbour-cities/summary')).status).toBe(403);
  });

  it('refuses a cross-site state-changing request', async () => {
    const response = await request(t.app)
      .post('/api/session')
      .set('Origin', 'https://elsewhere.example')
      .send({ email: 'lead@demo.panelwise.test', password: 'panelwise-demo' });
    expect(response.status).toBe(403);
  });
});

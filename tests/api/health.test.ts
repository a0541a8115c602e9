import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../helpers/test-app';

describe('GET /api/health', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp();
  });
  afterAll(() => t.close());

  it('answers 200 with status and version', async () => {
    const response = await request(t.app).get('/api/health');
    expect(response.status).toBe(200);
    expect(response.body).toEqual({ status: 'ok', version: expect.stringMatching(/^\d+\.\d+\.\d+/) });
  });

  it('answers unknown API routes with the JSON error shape', async () => {
    const response = await request(t.app).get('/api/no-such-route');
    expect(response.status).toBe(404);
    expect(response.body).toEqual({ error: { code: 'not_found', message: expect.any(String) } });
  });

  it('sends security headers with a strict script policy', async () => {
    const response = await request(t.app).get('/api/health');
    expect(response.headers['content-security-policy']).toContain("script-src 'self'");
    expect(response.headers['x-content-type-options']).toBe('nosniff');
  });
});

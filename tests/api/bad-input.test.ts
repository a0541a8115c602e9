/**
 * Bad input never answers 500: JSON nesting and body-size limits per caller and route (400 and
 * 413 with {error: {code, message}}), an unsupported charset (415), malformed percent-encoding
 * in a path (400), and a full disk (SQLite's SQLITE_FULL, produced for real with PRAGMA
 * max_page_count) answers 507 with nothing written.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DISK_FULL_MESSAGE } from '../../server/http/errors';
import { JSON_LIMITS, jsonDepth, MAX_JSON_DEPTH } from '../../server/http/json-body';
import { createTestApp, signedInAgent, tableCounts, type TestApp } from '../helpers/test-app';

const KC = '/api/federations/kestrel-coast';
const BATCH = '/api/v1/federations/kestrel-coast/assessments';
const LEAD = 'lead@demo.panelwise.test';

let t: TestApp;
let lead: Awaited<ReturnType<typeof signedInAgent>>;
beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  lead = await signedInAgent(t.app, LEAD);
});
afterAll(() => t.close());

const json = (req: request.Test, text: string) => req.set('Content-Type', 'application/json').send(text);

describe('jsonDepth', () => {
  it('counts nesting of arrays and objects, not brackets inside strings or escaped quotes', () => {
    expect(jsonDepth('1')).toBe(0);
    expect(jsonDepth('[]')).toBe(1);
    expect(jsonDepth('{"a":[{"b":[1,2]}]}')).toBe(4);
    expect(jsonDepth('["[[[[[[", "\\"[[[["]')).toBe(1);
    expect(jsonDepth('[1],[2],[3]')).toBe(1);
    // Stops early: a million levels are not walked to the end.
    expect(jsonDepth('['.repeat(1_000_000), 5)).toBe(6);
  });
});

describe('nesting', () => {
  it('a deeply nested body on the batch API is 400 before any schema sees it, for a lead and the exact limit passes the parser', async () => {
    const deep = '['.repeat(100_000) + ']'.repeat(100_000);
    const res = await json(lead.post(BATCH), deep);
    expect(res.status).toBe(400);
    expect(res.body.error).toEqual({ code: 'bad_request', message: `The request body is nested more than ${MAX_JSON_DEPTH} levels deep` });
    const atLimit = '['.repeat(MAX_JSON_DEPTH) + ']'.repeat(MAX_JSON_DEPTH);
    const ok = await json(lead.post(BATCH), atLimit);
    expect(ok.status).toBe(422);
  });

  it('deep objects on a signed-in route and on sign-in are 400 too, and unbalanced nesting is not valid JSON', async () => {
    const deepObject = '{"a":'.repeat(5_000) + '1' + '}'.repeat(5_000);
    expect((await json(lead.post(`${KC}/import-mappings`), deepObject)).status).toBe(400);
    const anonymous = await json(request(t.app).post('/api/session'), '{"email":' + '['.repeat(3000) + ']'.repeat(3000) + '}');
    expect(anonymous.status).toBe(400);
    const broken = await json(lead.post(BATCH), '[[[[');
    expect(broken.status).toBe(400);
    expect(broken.body.error.message).toBe('The request body is not valid JSON');
  });
});

describe('size', () => {
  it('anonymous routes take small bodies only: 10 MB on sign-in or reset is 413 without being read', async () => {
    const big = JSON.stringify({ email: 'someone@example.test', password: 'x'.repeat(10 * 1024 * 1024) });
    for (const path of [
      '/api/session',
      '/api/password-resets',
      `/api/password-resets/${'x'.repeat(43)}`,
      `/api/invitations/${'x'.repeat(43)}/accept`,
    ]) {
      const res = await json(request(t.app).post(path), big);
      expect(res.status, path).toBe(413);
      expect(res.body.error).toEqual({ code: 'payload_too_large', message: 'The request body is too large' });
    }
    const justOver = JSON.stringify({ email: 'a@example.test', password: 'x'.repeat(JSON_LIMITS.anonymous) });
    expect((await json(request(t.app).post('/api/session'), justOver)).status).toBe(413);
    // An anonymous caller gets the small limit on the batch API too (and then 401).
    expect((await json(request(t.app).post(BATCH), JSON.stringify([{ note: 'x'.repeat(JSON_LIMITS.anonymous) }]))).status).toBe(413);
    expect((await json(request(t.app).post(BATCH), '[]')).status).toBe(401);
  });

  it('signed-in routes take more, the batch API most', async () => {
    const mapping = JSON.stringify({ name: 'big', mapping: { a: 'x'.repeat(JSON_LIMITS.signedIn) } });
    expect((await json(lead.post(`${KC}/import-mappings`), mapping)).status).toBe(413);
    const batch = JSON.stringify(Array.from({ length: 2000 }, (_, i) => ({ assessment_id: `BIG-${i}`, note: 'x'.repeat(200) })));
    expect(batch.length).toBeGreaterThan(JSON_LIMITS.signedIn);
    const res = await json(lead.post(`${BATCH}?dryRun=true`), batch);
    expect(res.status).toBe(422);
  });
});

describe('the HTTP layer’s own errors', () => {
  it('an unknown charset is 415 and malformed percent-encoding in a path is 400', async () => {
    const charset = await request(t.app).post('/api/session').set('Content-Type', 'application/json; charset=klingon').send('{}');
    expect(charset.status).toBe(415);
    expect(charset.body.error.code).toBe('unsupported_media_type');
    const encoded = await request(t.app).get('/api/invitations/%E0%A4%A');
    expect(encoded.status).toBe(400);
    expect(encoded.body.error.code).toBe('bad_request');
  });
});

describe('a full disk', () => {
  it('answers 507 "the server’s disk is full; nothing was written", and nothing was', async () => {
    const items = Array.from({ length: 400 }, (_, i) => ({
      assessment_id: `FULL-${i}`,
      athlete_code: `A${String(i % 200).padStart(4, '0')}`,
      event_code: 'S2425-R2',
      assessed_on: '2024-12-03',
      ratings: [
        { classifier_code: 'C01', sport_class: 2.5 },
        { classifier_code: 'C02', sport_class: 3 },
      ],
    }));
    const before = tableCounts(t.ctx);
    const pages = t.ctx.sqlite.pragma('page_count', { simple: true }) as number;
    const freelist = t.ctx.sqlite.pragma('freelist_count', { simple: true }) as number;
    expect(freelist).toBeLessThan(50);
    t.ctx.sqlite.pragma(`max_page_count = ${pages}`);
    try {
      const res = await lead.post(BATCH).send(items);
      expect(res.status).toBe(507);
      expect(res.body.error).toEqual({ code: 'insufficient_storage', message: DISK_FULL_MESSAGE });
      expect(DISK_FULL_MESSAGE).toMatch(/^The server's disk is full; nothing was written/);
    } finally {
      t.ctx.sqlite.pragma('max_page_count = 4294967294');
    }
    expect(tableCounts(t.ctx)).toEqual(before);
    // With room again the same batch is written.
    expect((await lead.post(BATCH).send(items)).status).toBe(201);
  });
});

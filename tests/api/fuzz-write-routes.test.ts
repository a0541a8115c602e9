/**
 * Fuzzed JSON on every write route: nesting, size and types. The routes come from the Express
 * router itself (as in the role × route matrix), their concrete paths from the matrix entries
 * in tests/api/access/. Each is sent generated bodies (fast-check's JSON values, wrong-typed
 * values, raw text that is not JSON) and fixed hostile ones (deep arrays and objects, bodies over
 * the limits) by an anonymous caller, a lead, a researcher, the site owner and an import token.
 * No answer may be 5xx, and every error has the shape {error: {code, message}}.
 */
import fs from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import fc from 'fast-check';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiRouter } from '../../server/routes/index';
import { createApiToken } from '../../server/services/api-tokens';
import { JSON_LIMITS } from '../../server/http/json-body';
import { routesOf } from '../helpers/router-routes';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';
import type { AccessEntry } from './access/types';

async function matrixEntries(): Promise<AccessEntry[]> {
  const folder = path.resolve(import.meta.dirname, 'access');
  const all: AccessEntry[] = [];
  for (const file of fs.readdirSync(folder).filter((f) => f.endsWith('.ts') && f !== 'types.ts')) {
    const module = (await import(pathToFileURL(path.join(folder, file)).href)) as { entries?: AccessEntry[] };
    all.push(...(module.entries ?? []));
  }
  return all;
}

const WRITE = new Set(['post', 'put', 'patch', 'delete']);
/** Routes whose handler does heavy work whatever the body says: only bodies the parser refuses are sent as a lead. */
const HEAVY = new Set(['POST /api/federations/:federation/analytics/flags/evaluate']);
type Caller = 'anonymous' | 'lead' | 'researcher' | 'owner' | 'importToken';
const CALLERS: Caller[] = ['anonymous', 'lead', 'researcher', 'owner', 'importToken'];
const EMAILS = {
  lead: 'lead@demo.panelwise.test',
  researcher: 'researcher@demo.panelwise.test',
  owner: 'owner@demo.panelwise.test',
} as const;

/** Bodies the JSON parser refuses before any handler runs. */
const PARSER_REFUSED: { name: string; text: string }[] = [
  { name: 'deep arrays', text: '['.repeat(50_000) + ']'.repeat(50_000) },
  { name: 'deep objects', text: '{"a":'.repeat(2_000) + 'null' + '}'.repeat(2_000) },
  { name: 'deep inside a valid shape', text: `{"name":"x","mapping":${'['.repeat(64)}${']'.repeat(64)}}` },
  { name: 'over the signed-in limit', text: JSON.stringify({ name: 'x'.repeat(JSON_LIMITS.signedIn + 10) }) },
  { name: 'not JSON', text: '{"email": "a@b", ' },
];

/** Well-formed bodies of the wrong shape or type. */
const WRONG_TYPES: unknown[] = [
  null,
  0,
  -1,
  1e308,
  'text',
  true,
  [],
  {},
  [null],
  [{}],
  { email: 42, password: [] },
  { name: { $gt: '' } },
  [{ assessment_id: 1, ratings: 'x' }],
];

const body = fc.oneof(
  { weight: 4, arbitrary: fc.jsonValue({ maxDepth: 5 }).map((v) => JSON.stringify(v) ?? 'null') },
  { weight: 2, arbitrary: fc.string({ maxLength: 200 }) },
  {
    weight: 1,
    arbitrary: fc.integer({ min: 15, max: 40 }).map((depth) => '['.repeat(depth) + ']'.repeat(depth)),
  },
  {
    weight: 1,
    arbitrary: fc
      .record(
        {
          email: fc.oneof(fc.emailAddress(), fc.string()),
          password: fc.string({ maxLength: 300 }),
          name: fc.string(),
          role: fc.string(),
          scope: fc.string(),
        },
        { requiredKeys: [] },
      )
      .map((v) => JSON.stringify(v)),
  },
);

let t: TestApp;
let importToken: string;
let sent = 0;
const entries = await matrixEntries();

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  const demo = await t.ctx.db.selectFrom('federations').select('id').where('slug', '=', 'kestrel-coast').executeTakeFirstOrThrow();
  importToken = (await createApiToken(t.ctx, demo.id, { name: 'fuzz import', scope: 'import' }, null)).token;
});
afterAll(() => t.close());

function concretePath(entry: AccessEntry): string {
  return entry.path.replace(/:(\w+)/g, (_all, name: string) =>
    encodeURIComponent(entry.params?.[name] ?? (name === 'federation' ? 'kestrel-coast' : '1')),
  );
}

describe('fuzzed JSON on every write route', () => {
  it('finds the write routes on the router, each with a matrix entry', () => {
    const routes = routesOf(apiRouter(t.ctx)).filter((r) => WRITE.has(r.method));
    expect(routes.length).toBeGreaterThan(15);
    const known = new Set(entries.map((e) => `${e.method} /api${e.path.slice(4)}`));
    for (const r of routes) expect(known, `${r.method} /api${r.path}`).toContain(`${r.method} /api${r.path}`);
  });

  const writeEntries = entries.filter((e) => WRITE.has(e.method));
  for (const entry of writeEntries) {
    it(`${entry.method.toUpperCase()} ${entry.path}: no 5xx`, async () => {
      const target = concretePath(entry);
      const heavy = HEAVY.has(`${entry.method.toUpperCase()} ${entry.path}`);
      for (const caller of CALLERS) {
        const agent = caller in EMAILS ? await signedInAgent(t.app, EMAILS[caller as keyof typeof EMAILS]) : null;
        const send = async (text: string): Promise<void> => {
          const method = entry.method;
          let req = agent ? agent[method](target) : request(t.app)[method](target);
          if (caller === 'importToken') req = req.set('Authorization', `Bearer ${importToken}`);
          // Spread over documentation addresses (trusted from loopback), so the sign-in limits
          // bind the fuzz's own addresses, not the loopback address the agents signed in from.
          req = req.set('X-Forwarded-For', `198.51.100.${(sent++ % 250) + 1}`);
          const res = await req.set('Content-Type', 'application/json').send(text);
          const where = `${caller} ${entry.method.toUpperCase()} ${target} with ${text.slice(0, 80)}${text.length > 80 ? '…' : ''}`;
          expect(res.status, `${where}: ${JSON.stringify(res.body)}`).toBeLessThan(500);
          if (res.status >= 400) {
            expect(typeof res.body?.error?.code, where).toBe('string');
            expect(typeof res.body?.error?.message, where).toBe('string');
          }
        };
        for (const hostile of PARSER_REFUSED) await send(hostile.text);
        if (heavy && caller === 'lead') continue;
        for (const value of WRONG_TYPES) await send(JSON.stringify(value));
        await fc.assert(fc.asyncProperty(body, send), { numRuns: 6, seed: 14 });
      }
    }, 120_000);
  }
});

import fs from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import express from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/password';
import { apiRouter } from '../../server/routes/index';
import { createApiToken } from '../../server/services/api-tokens';
import { routesOf } from '../helpers/router-routes';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';
import { CALLERS, type AccessEntry, type Caller } from './access/types';

/**
 * The role × route matrix. The routes come from the Express router itself (apiRouter(ctx),
 * walked with its nested routers and their mount paths), the expectations from every file in
 * tests/api/access/. A route without an entry fails, an entry without a route fails, and every
 * entry is requested by every kind of caller.
 */

const DEMO_FEDERATION = 'kestrel-coast';
const EMAILS: Partial<Record<Caller, string>> = {
  lead: 'lead@demo.panelwise.test',
  classifier: 'classifier@demo.panelwise.test',
  researcher: 'researcher@demo.panelwise.test',
  outsider: 'outsider@matrix.panelwise.test',
};
const OUTSIDER_PASSWORD = 'outsider-password';

async function loadEntries(): Promise<(AccessEntry & { file: string })[]> {
  const folder = path.resolve(import.meta.dirname, 'access');
  const files = fs
    .readdirSync(folder)
    .filter((f) => f.endsWith('.ts') && f !== 'types.ts')
    .sort();
  const all: (AccessEntry & { file: string })[] = [];
  for (const file of files) {
    const module = (await import(pathToFileURL(path.join(folder, file)).href)) as { entries?: AccessEntry[] };
    if (!Array.isArray(module.entries)) throw new Error(`tests/api/access/${file} does not export entries`);
    all.push(...module.entries.map((e) => ({ ...e, file })));
  }
  return all;
}

const key = (method: string, p: string) => `${method.toUpperCase()} ${p}`;

function concretePath(entry: AccessEntry): string {
  return entry.path.replace(/:(\w+)/g, (_all, name: string) => {
    const value = entry.params?.[name] ?? (name === 'federation' ? DEMO_FEDERATION : undefined);
    if (value === undefined) throw new Error(`${key(entry.method, entry.path)}: no value for :${name} (add params)`);
    return encodeURIComponent(value);
  });
}

const entries = await loadEntries();

describe('role × route matrix', () => {
  let t: TestApp;
  let routes: { method: string; path: string }[];
  const tokens: Partial<Record<Caller, string>> = {};
  const cachedAgents = new Map<Caller, ReturnType<typeof request.agent>>();

  beforeAll(async () => {
    t = await createTestApp({ seed: 'demo' });
    routes = routesOf(apiRouter(t.ctx)).map((r) => ({ method: r.method, path: `/api${r.path}` }));

    // The outsider: a lead of another federation only.
    const federation = await t.ctx.db
      .insertInto('federations')
      .values({ slug: 'osprey-matrix', name: 'Osprey Matrix Test League' })
      .returning('id')
      .executeTakeFirstOrThrow();
    const user = await t.ctx.db
      .insertInto('users')
      .values({ email: EMAILS.outsider!, display_name: 'Outsider Lead', password_hash: await hashPassword(OUTSIDER_PASSWORD) })
      .returning('id')
      .executeTakeFirstOrThrow();
    await t.ctx.db.insertInto('memberships').values({ user_id: user.id, federation_id: federation.id, role: 'lead' }).execute();

    const demo = await t.ctx.db.selectFrom('federations').select('id').where('slug', '=', DEMO_FEDERATION).executeTakeFirstOrThrow();
    tokens.readToken = (await createApiToken(t.ctx, demo.id, { name: 'matrix read', scope: 'read' }, null)).token;
    tokens.importToken = (await createApiToken(t.ctx, demo.id, { name: 'matrix import', scope: 'import' }, null)).token;
  });
  afterAll(() => t.close());

  const signIn = (caller: Caller) => signedInAgent(t.app, EMAILS[caller]!, caller === 'outsider' ? OUTSIDER_PASSWORD : undefined);

  /**
   * The caller's request. A session is fresh for every state-changing entry (so signing out or
   * a refused change in one entry cannot affect the next) and shared among reads.
   */
  async function send(caller: Caller, entry: AccessEntry): Promise<number> {
    const target = concretePath(entry);
    const method = entry.method;
    let req;
    if (caller === 'anonymous') req = request(t.app)[method](target);
    else if (caller === 'readToken' || caller === 'importToken')
      req = request(t.app)[method](target).set('Authorization', `Bearer ${tokens[caller]}`);
    else {
      let agent = entry.method === 'get' ? cachedAgents.get(caller) : undefined;
      if (!agent) {
        agent = await signIn(caller);
        if (entry.method === 'get') cachedAgents.set(caller, agent);
      }
      req = agent[method](target);
    }
    if (entry.body !== undefined) req = req.send(entry.body as object);
    const response = await req;
    return response.status;
  }

  it('finds the routes on the router itself, nested routers included', () => {
    const inner = express.Router();
    inner.get('/things/:id', (_req, res) => void res.end());
    inner
      .route('/things')
      .post((_req, res) => void res.end())
      .delete((_req, res) => void res.end());
    const outer = express.Router();
    outer.use('/mounted', inner);
    outer.use(express.Router().get('/flat', (_req, res) => void res.end()));
    expect(routesOf(outer)).toEqual([
      { method: 'get', path: '/mounted/things/:id' },
      { method: 'post', path: '/mounted/things' },
      { method: 'delete', path: '/mounted/things' },
      { method: 'get', path: '/flat' },
    ]);
    expect(routes.length).toBeGreaterThan(10);
    expect(routes).toContainEqual({ method: 'get', path: '/api/federations/:federation/summary' });
    expect(routes).toContainEqual({ method: 'delete', path: '/api/session' });
  });

  it('has an entry for every registered route', () => {
    const known = new Set(entries.map((e) => key(e.method, e.path)));
    const missing = routes.filter((r) => !known.has(key(r.method, r.path))).map((r) => key(r.method, r.path));
    expect(missing, 'routes with no entry in tests/api/access/*.ts').toEqual([]);
  });

  it('has a route for every entry, and one entry per route', () => {
    const registered = new Set(routes.map((r) => key(r.method, r.path)));
    const stale = entries.filter((e) => !registered.has(key(e.method, e.path))).map((e) => `${key(e.method, e.path)} (${e.file})`);
    expect(stale, 'entries naming a route that does not exist').toEqual([]);
    const seen = new Map<string, string>();
    const duplicates: string[] = [];
    for (const e of entries) {
      const k = key(e.method, e.path);
      if (seen.has(k)) duplicates.push(`${k} (${seen.get(k)} and ${e.file})`);
      seen.set(k, e.file);
    }
    expect(duplicates).toEqual([]);
  });

  for (const entry of entries) {
    it(`${key(entry.method, entry.path)} (${entry.file})`, async () => {
      expect(Object.keys(entry.expect).sort(), 'every caller must be listed').toEqual([...CALLERS].sort());
      const actual = {} as Record<Caller, number>;
      for (const caller of CALLERS) actual[caller] = await send(caller, entry);
      expect(actual).toEqual(entry.expect);
    });
  }
});

/**
 * The worker pool on a database file (server/workers/pool.ts): heavy views are computed in
 * worker threads while the event loop keeps answering; callers of the same view share one
 * computation; a request that cannot get a worker is answered 503 with Retry-After; data
 * changes made in a worker move the main thread's data version and start the (awaitable)
 * flag evaluation, which runs again after a restart if it was cut short.
 */
import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FLAG_EVALUATION_JOB } from '../../server/services/calibration-flags';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';
import { FEDERATION, federationId, LEAD, upload } from './imports/helpers';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-pool-'));
const databasePath = path.join(dir, 'pool.db');
const base = `/api/federations/${FEDERATION}/analytics`;

let t: TestApp;
let server: Server;
let origin: string;
let cookie: string;

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo', databasePath });
  server = t.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const signIn = await fetch(`${origin}/api/session`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: LEAD, password: 'panelwise-demo' }),
  });
  expect(signIn.status).toBe(201);
  cookie = signIn.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
});

afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
  await t.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const get = (url: string) => fetch(origin + url, { headers: { cookie } });

/** The nice value of a thread from its /proc stat line (field 19; the name in parentheses may hold spaces). */
const niceOf = (statPath: string) => Number(fs.readFileSync(statPath, 'utf8').split(') ')[1].split(' ')[16]);

describe('the worker pool on a database file', () => {
  it('computes a cold overview in a worker thread while the event loop keeps answering /api/health', async () => {
    expect(t.ctx.pool.stats().kind).toBe('workers');
    let done = false;
    const overview = get(`${base}/overview`).then(async (res) => {
      done = true;
      return { status: res.status, body: (await res.json()) as { counts: { assessments: number } } };
    });
    // Count health answers until the overview arrives: with the work on the event loop there
    // would be at most one (the one queued behind it).
    let answered = 0;
    while (!done && answered < 10_000) {
      const res = await fetch(`${origin}/api/health`);
      expect(res.status).toBe(200);
      await res.arrayBuffer();
      if (!done) answered++;
    }
    const result = await overview;
    expect(result.status).toBe(200);
    expect(result.body.counts.assessments).toBeGreaterThan(1000);
    expect(answered).toBeGreaterThanOrEqual(5);
    const threads = Object.keys(t.ctx.pool.stats().byThread).map(Number);
    expect(threads.length).toBeGreaterThan(0);
    expect(threads).not.toContain(0);
  });

  it.runIf(process.platform === 'linux')('runs its workers at a lower priority than the thread that answers requests', async () => {
    expect((await get(`${base}/overview`)).status).toBe(200);
    // The thread running this test is the app's event loop; the pool's workers lowered their own priority (POOL_NICE, default 10).
    const own = niceOf('/proc/thread-self/stat');
    const tasks = fs.readdirSync('/proc/self/task').map((tid) => niceOf(`/proc/self/task/${tid}/stat`));
    const lowered = tasks.filter((nice) => nice === Math.min(19, own + 10)).length;
    expect(lowered).toBeGreaterThanOrEqual(Object.keys(t.ctx.pool.stats().byThread).length);
    expect(lowered).toBeGreaterThan(0);
  });

  it('shares one computation between callers of the same cold view', async () => {
    const before = t.ctx.pool.stats();
    const url = `${base}/boundaries?kind=first`;
    const answers = await Promise.all(
      Array.from({ length: 6 }, () => get(url).then(async (r) => ({ status: r.status, text: await r.text() }))),
    );
    for (const a of answers) {
      expect(a.status).toBe(200);
      expect(a.text).toBe(answers[0].text);
    }
    const after = t.ctx.pool.stats();
    // One task for the boundaries (and at most one for the athletes check of the filter).
    expect(after.completed - before.completed).toBeLessThanOrEqual(2);
    expect(after.shared - before.shared).toBeGreaterThanOrEqual(5);
  });

  it('brings an HttpError thrown in a worker back as the same answer', async () => {
    const missing = await get(`${base}/classifiers/NOPE-99`);
    expect(missing.status).toBe(404);
    expect(((await missing.json()) as { error: { code: string; message: string } }).error).toEqual({
      code: 'not_found',
      message: 'The classifier NOPE-99 was not found',
    });
    const same = await get(`${base}/pairs/C01/C01`);
    expect(same.status).toBe(400);
  });

  it('commits an import in a worker; the data version moves here and the flag evaluation is awaitable', async () => {
    const lead = await signedInAgent(t.app, LEAD);
    const fedId = federationId(t.ctx);
    await t.ctx.jobs.idle();
    const version = t.ctx.dataVersions.of(fedId);
    const dry = await upload(lead, { name: 'long-valid.csv' });
    expect(dry.status).toBe(200);
    expect(dry.body.outcome).toBe('ready');
    const evaluatedBefore = t.ctx.sqlite
      .prepare('select max(evaluated_at) from calibration_flags where federation_id = ?')
      .pluck()
      .get(fedId) as string | null;
    const commit = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/commit`);
    expect(commit.status).toBe(200);
    expect(commit.body.status).toBe('committed');
    expect(t.ctx.dataVersions.of(fedId)).toBe(version + 1);
    await t.ctx.jobs.idle();
    expect(t.ctx.jobs.size).toBe(0);
    expect(t.ctx.sqlite.prepare('select count(*) from background_jobs').pluck().get()).toBe(0);
    const evaluatedAfter = t.ctx.sqlite
      .prepare('select max(evaluated_at) from calibration_flags where federation_id = ?')
      .pluck()
      .get(fedId) as string | null;
    if (evaluatedBefore !== null) expect(evaluatedAfter! > evaluatedBefore).toBe(true);
    else expect(evaluatedAfter).not.toBeNull();
    // The new assessments show at once (the cached overview belonged to the old version).
    const overview = (await (await get(`${base}/overview`)).json()) as { counts: { assessments: number } };
    const assessments = t.ctx.sqlite.prepare('select count(*) from assessments where federation_id = ?').pluck().get(fedId);
    expect(overview.counts.assessments).toBe(assessments);
    const revert = await lead.post(`/api/federations/${FEDERATION}/imports/${dry.body.importId}/revert`);
    expect(revert.status).toBe(200);
    await t.ctx.jobs.idle();
  });

  it('runs a flag evaluation left owed by an earlier run again at start', async () => {
    const fedId = federationId(t.ctx);
    await t.ctx.jobs.idle();
    // As if the process had stopped after a commit, before the evaluation ran.
    t.ctx.sqlite.prepare("update calibration_flags set evaluated_at = '2000-01-01T00:00:00.000Z' where federation_id = ?").run(fedId);
    t.ctx.sqlite.prepare('insert into background_jobs (kind, subject) values (?, ?)').run(FLAG_EVALUATION_JOB, fedId);
    const again = await createTestApp({ databasePath });
    try {
      await again.ctx.jobs.idle();
      expect(again.ctx.sqlite.prepare('select count(*) from background_jobs').pluck().get()).toBe(0);
      const stale = again.ctx.sqlite
        .prepare("select count(*) from calibration_flags where federation_id = ? and evaluated_at = '2000-01-01T00:00:00.000Z'")
        .pluck()
        .get(fedId);
      expect(stale).toBe(0);
    } finally {
      await again.close();
    }
  });
});

describe('a busy pool', () => {
  it('answers 503 with Retry-After and the error shape when no worker can take the request', async () => {
    const busy = await createTestApp({ databasePath, pool: { threads: 1, perFederation: 1, maxQueuePerFederation: 0 } });
    const busyServer = busy.app.listen(0, '127.0.0.1');
    await new Promise<void>((resolve) => busyServer.once('listening', () => resolve()));
    const at = `http://127.0.0.1:${(busyServer.address() as AddressInfo).port}`;
    try {
      const first = fetch(`${at}${base}/overview?kind=review`, { headers: { cookie } });
      // Wait until the first (cold) computation holds the only worker, then ask for another view.
      for (let i = 0; i < 2000 && busy.ctx.pool.stats().running === 0; i++) await new Promise((r) => setTimeout(r, 5));
      const second = await fetch(`${at}${base}/overview?kind=protest`, { headers: { cookie } });
      const firstAnswer = await first;
      expect(firstAnswer.status).toBe(200);
      expect(second.status).toBe(503);
      expect(Number(second.headers.get('retry-after'))).toBeGreaterThanOrEqual(1);
      const body = (await second.json()) as { error: { code: string; message: string } };
      expect(body.error.code).toBe('busy');
      expect(body.error.message).toMatch(/try again/);
      expect(busy.ctx.pool.stats().refused).toBeGreaterThanOrEqual(1);
    } finally {
      await new Promise((resolve) => busyServer.close(resolve));
      await busy.close();
    }
  });
});

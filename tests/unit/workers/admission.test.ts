/**
 * When the pool lets a task start (server/workers/pool.ts, Admission): never more than
 * `threads` at once, never more than `perFederation` of one federation, so another federation
 * still gets a worker; a full queue is refused at once and a long wait ends in a 503 with
 * Retry-After; background work waits and is never refused. Places are freed by hand here, so
 * nothing depends on how long anything takes.
 */
import { describe, expect, it } from 'vitest';
import { HttpError } from '../../../server/http/errors';
import { Admission } from '../../../server/workers/pool';
import { DataVersions } from '../../../server/services/data-version';

const options = { threads: 2, perFederation: 1, maxQueue: 10, maxQueuePerFederation: 3, queueTimeoutMs: 60_000 };

/** Resolves on the next turn of the event loop with whether `p` has settled. */
async function settledYet(p: Promise<unknown>): Promise<boolean> {
  let settled = false;
  void p.then(
    () => (settled = true),
    () => (settled = true),
  );
  await new Promise((r) => setImmediate(r));
  return settled;
}

describe('Admission', () => {
  it('keeps one federation to its limit and lets another federation use the free worker', async () => {
    const a = new Admission(options);
    const a1 = await a.acquire(1);
    const a2 = a.acquire(1);
    expect(await settledYet(a2)).toBe(false);
    expect(a.runningCount).toBe(1);
    const b1 = await a.acquire(2);
    expect(a.runningCount).toBe(2);
    a1();
    const releaseA2 = await a2;
    expect(a.runningCount).toBe(2);
    releaseA2();
    b1();
    expect(a.runningCount).toBe(0);
  });

  it('starts waiting tasks in order of arrival among those allowed to start', async () => {
    const a = new Admission({ ...options, threads: 1, perFederation: 1 });
    const order: string[] = [];
    const first = await a.acquire(1);
    const waits = [
      a.acquire(1).then((r) => (order.push('1a'), r)),
      a.acquire(2).then((r) => (order.push('2a'), r)),
      a.acquire(1).then((r) => (order.push('1b'), r)),
    ];
    first();
    (await waits[0])();
    (await waits[1])();
    (await waits[2])();
    expect(order).toEqual(['1a', '2a', '1b']);
  });

  it('refuses at once with 503 and Retry-After when a federation’s queue is full; background work still waits', async () => {
    const a = new Admission(options);
    const running = await a.acquire(1);
    const queued = [a.acquire(1), a.acquire(1), a.acquire(1)];
    const refused = await a.acquire(1).then(
      () => null,
      (e: unknown) => e,
    );
    expect(refused).toBeInstanceOf(HttpError);
    const error = refused as HttpError;
    expect(error.status).toBe(503);
    expect(error.code).toBe('busy');
    expect(Number(error.headers?.['retry-after'])).toBeGreaterThanOrEqual(1);
    expect(a.refused).toBe(1);
    const background = a.acquire(1, true);
    expect(await settledYet(background)).toBe(false);
    running();
    for (const q of queued) (await q)();
    (await background)();
    expect(a.runningCount).toBe(0);
  });

  it('ends a wait that lasts too long with a 503 and leaves the queue', async () => {
    const a = new Admission({ ...options, threads: 1, queueTimeoutMs: 20 });
    const running = await a.acquire(1);
    const waited = await a.acquire(2).then(
      () => null,
      (e: unknown) => e as HttpError,
    );
    expect(waited?.status).toBe(503);
    expect(waited?.message).toMatch(/try again/);
    expect(a.waitingCount).toBe(0);
    running();
    expect(a.runningCount).toBe(0);
  });
});

describe('data versions belong to one app', () => {
  it('moves one app’s counter without touching another’s, and tells only its own listeners', () => {
    const first = new DataVersions();
    const second = new DataVersions();
    const heard: string[] = [];
    first.onChange((id) => heard.push(`first:${id}`));
    second.onChange((id) => heard.push(`second:${id}`));
    first.bump(7);
    first.bump(7);
    expect(first.of(7)).toBe(2);
    expect(second.of(7)).toBe(0);
    expect(heard).toEqual(['first:7', 'first:7']);
    second.follow(7, 5);
    expect(second.of(7)).toBe(5);
    expect(heard).toHaveLength(2);
  });
});

describe('Admission order', () => {
  it('starts a waiting request before waiting background work', async () => {
    const a = new Admission({ ...options, threads: 1, perFederation: 1 });
    const order: string[] = [];
    const first = await a.acquire(1);
    const background = a.acquire(1, true).then((r) => (order.push('background'), r));
    const request = a.acquire(1).then((r) => (order.push('request'), r));
    first();
    (await request)();
    (await background)();
    expect(order).toEqual(['request', 'background']);
  });
});

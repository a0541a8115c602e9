/**
 * Background jobs (server/workers/jobs.ts): idle() waits for every job, including one started by
 * another; a durable job is recorded until it has run, runs once more when asked again while it
 * runs, keeps its record (with the error) when it fails, and is resumed from the record.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../../helpers/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(() => t.close());

const owed = () =>
  t.ctx.sqlite.prepare("select subject, attempts, last_error from background_jobs where kind like 'test.%' order by subject").all();

function gate() {
  let open!: () => void;
  const opened = new Promise<void>((resolve) => (open = resolve));
  return { open, opened };
}

describe('ctx.jobs', () => {
  it('idle() waits for jobs and for the jobs they start', async () => {
    const done: string[] = [];
    const g = gate();
    void t.ctx.jobs.run('outer', async () => {
      await g.opened;
      void t.ctx.jobs.run('inner', async () => {
        await new Promise((r) => setImmediate(r));
        done.push('inner');
      });
      done.push('outer');
    });
    const idle = t.ctx.jobs.idle();
    g.open();
    await idle;
    expect(done).toEqual(['outer', 'inner']);
    expect(t.ctx.jobs.size).toBe(0);
  });

  it('records a durable job until it has run, and runs it once more when asked again meanwhile', async () => {
    const runs: number[] = [];
    const g = gate();
    t.ctx.jobs.define('test.count', async (subject) => {
      runs.push(subject);
      await g.opened;
    });
    t.ctx.jobs.enqueue('test.count', 1);
    t.ctx.jobs.enqueue('test.count', 1);
    t.ctx.jobs.enqueue('test.count', 1);
    expect(owed()).toEqual([{ subject: 1, attempts: 0, last_error: null }]);
    g.open();
    await t.ctx.jobs.idle();
    expect(runs).toEqual([1, 1]);
    expect(owed()).toEqual([]);
  });

  it('keeps a failed job with its error, and resumes what is recorded', async () => {
    let fail = true;
    const runs: number[] = [];
    t.ctx.jobs.define('test.flaky', async (subject) => {
      runs.push(subject);
      if (fail) throw new Error('no luck');
    });
    t.ctx.jobs.enqueue('test.flaky', 2);
    await t.ctx.jobs.idle();
    expect(owed()).toEqual([{ subject: 2, attempts: 1, last_error: 'no luck' }]);
    fail = false;
    expect(t.ctx.jobs.resume('test.flaky')).toBe(1);
    await t.ctx.jobs.idle();
    expect(runs).toEqual([2, 2]);
    expect(owed()).toEqual([]);
  });
});

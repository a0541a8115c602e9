/**
 * Background work of one app, in one place (`ctx.jobs`): nothing runs fire-and-forget.
 *
 * - `jobs.run(name, fn)` runs `fn` in the background, logs its failure, and keeps it tracked
 *   until it settles; `await jobs.idle()` waits for every tracked job, including jobs started
 *   by the jobs it waited for (tests await it instead of waiting for "quiet").
 * - A durable kind (`jobs.define(kind, handler)` then `jobs.enqueue(kind, subject)`) is also
 *   recorded in the `background_jobs` table until it has run: a job interrupted by a restart
 *   runs again when the app starts (`jobs.resume(kind)`). Requests for the same kind and subject
 *   coalesce: one runs, and runs once more if another request came while it was running.
 */
import type BetterSqlite3 from 'better-sqlite3';
import type { Logger } from 'pino';

/** A durable job that failed this many times is given up (and logged) rather than retried at each start. */
export const MAX_ATTEMPTS = 3;

interface Coalesced {
  again: boolean;
}

export class Jobs {
  private readonly pending = new Set<Promise<void>>();
  private readonly handlers = new Map<string, (subject: number) => Promise<void>>();
  private readonly states = new Map<string, Coalesced>();
  private closed = false;

  private readonly sqlite: BetterSqlite3.Database;
  private readonly logger: Logger;

  constructor(sqlite: BetterSqlite3.Database, logger: Logger) {
    this.sqlite = sqlite;
    this.logger = logger;
  }

  /** Jobs running or waiting now. */
  get size(): number {
    return this.pending.size;
  }

  /** Runs `fn` in the background; its failure is logged, never thrown at the caller. */
  run(name: string, fn: () => Promise<void>): Promise<void> {
    const job = (async () => {
      try {
        await fn();
      } catch (err) {
        this.logger.error({ err, job: name }, 'background job failed');
      }
    })();
    this.pending.add(job);
    void job.finally(() => this.pending.delete(job));
    return job;
  }

  /** Resolves once no job is running, including those started meanwhile by other jobs. */
  async idle(): Promise<void> {
    while (this.pending.size > 0) await Promise.allSettled([...this.pending]);
  }

  /** Says how to run a durable kind of job (once per app). */
  define(kind: string, handler: (subject: number) => Promise<void>): void {
    this.handlers.set(kind, handler);
  }

  /**
   * Records a durable job for `subject` (a federation id, say) and runs it in the background;
   * if one is already running for the same kind and subject, it runs once more afterwards.
   */
  enqueue(kind: string, subject: number): void {
    const handler = this.handlers.get(kind);
    if (!handler) throw new Error(`No handler for background jobs of kind "${kind}"`);
    if (this.closed) return;
    this.sqlite
      .prepare(
        `insert into background_jobs (kind, subject) values (?, ?)
         on conflict (kind, subject) do update set requested_at = strftime('%Y-%m-%dT%H:%M:%fZ','now')`,
      )
      .run(kind, subject);
    const key = `${kind}:${subject}`;
    const running = this.states.get(key);
    if (running) {
      running.again = true;
      return;
    }
    const state: Coalesced = { again: false };
    this.states.set(key, state);
    void this.run(key, async () => {
      try {
        do {
          state.again = false;
          await handler(subject);
        } while (state.again && !this.closed);
        this.sqlite.prepare('delete from background_jobs where kind = ? and subject = ?').run(kind, subject);
      } catch (err) {
        this.sqlite
          .prepare('update background_jobs set attempts = attempts + 1, last_error = ? where kind = ? and subject = ?')
          .run(err instanceof Error ? err.message.slice(0, 500) : String(err).slice(0, 500), kind, subject);
        throw err;
      } finally {
        this.states.delete(key);
      }
    });
  }

  /** Runs again the durable jobs of `kind` left by an earlier run of the app (a restart). */
  resume(kind: string): number {
    const rows = this.sqlite
      .prepare('select subject, attempts, last_error from background_jobs where kind = ? order by requested_at')
      .all(kind) as { subject: number; attempts: number; last_error: string | null }[];
    let resumed = 0;
    for (const row of rows) {
      if (row.attempts >= MAX_ATTEMPTS) {
        this.logger.error(
          { kind, subject: row.subject, lastError: row.last_error },
          `background job given up after ${row.attempts} attempts`,
        );
        this.sqlite.prepare('delete from background_jobs where kind = ? and subject = ?').run(kind, row.subject);
        continue;
      }
      this.enqueue(kind, row.subject);
      resumed++;
    }
    return resumed;
  }

  /** Starts no new durable job (shutting down); the ones recorded stay for the next start. */
  close(): void {
    this.closed = true;
  }
}

/**
 * The pool that keeps heavy work off the request path: `ctx.pool.run(taskName, payload, options)`
 * runs a task of tasks.ts and resolves with its result (docs/decisions/0011-worker-pool.md).
 *
 * - Executors: worker threads (piscina) on a database file; in process, on the caller's own
 *   context, for an in-memory database (tests), which a worker could not open. Both run the very
 *   same task functions, and results cross the same structured-clone boundary.
 * - Sharing: callers that ask for the same `key` at the same data version share one computation
 *   while it runs, and its result is kept (a small LRU on the main thread) until the federation's
 *   data version moves.
 * - Fairness: at most `perFederation` tasks of one federation run at once, so one federation
 *   cannot take every worker; waiting requests start in order of arrival among those allowed,
 *   before any waiting background work.
 * - Never a hang: the wait is bounded (queue length and time). A request that cannot get a
 *   worker in time gets a 503 with Retry-After (`{error: {code: 'busy', message}}`). Background
 *   work (flag evaluation) waits as long as it takes and is never refused.
 */
import os from 'node:os';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { AppContext } from '../context';
import { busy, HttpError, type ErrorCode } from '../http/errors';
import type { ProgressMessage, SerializedError, TaskMessage, TaskOutcome, WorkerSetup } from './protocol';
import { taskSpec, type TaskName, type TaskPayload, type TaskResult } from './tasks';

export interface RunOptions {
  /** The federation the task works for (fairness, data version, sharing). */
  federationId: number;
  /** Callers with the same key at the same data version share one computation and its cached result. */
  key?: string;
  /** Background work: waits for a worker as long as it takes, never refused with a 503. */
  background?: boolean;
  /** Progress reports of the task (imports). */
  onProgress?: (phase: ProgressMessage['phase'], done: number, total: number) => void;
}

export interface PoolStats {
  kind: 'workers' | 'inline';
  threads: number;
  running: number;
  waiting: number;
  completed: number;
  /** Tasks refused with a 503 (queue full or waited too long). */
  refused: number;
  /** Computations saved by sharing a running one or a cached result. */
  shared: number;
  /** Thread ids that ran tasks, with counts (the main thread's is 0). */
  byThread: Record<number, number>;
}

export interface TaskPool {
  run<N extends TaskName>(name: N, payload: TaskPayload<N>, options: RunOptions): Promise<TaskResult<N>>;
  stats(): PoolStats;
  /** Waits for the running tasks and stops the workers. */
  close(): Promise<void>;
}

export interface PoolOptions {
  /** Tasks running at once (worker threads). */
  threads: number;
  /** Tasks of one federation running at once. */
  perFederation: number;
  /** Requests waiting for a worker, in all (beyond: 503 at once). */
  maxQueue: number;
  /** Requests of one federation waiting for a worker (beyond: 503 at once). */
  maxQueuePerFederation: number;
  /** How long a request waits for a worker before a 503. */
  queueTimeoutMs: number;
  /** How long a task that only reads may run before it is stopped (its worker restarted) and answered with a 503. */
  runTimeoutMs: number;
  /** How much lower than the main thread's the workers' scheduling priority is (nice steps; Linux only; 0 keeps it). */
  nice: number;
}

/** Defaults from the environment: POOL_THREADS (default: the cores, at least 2), POOL_NICE (default 10), POOL_QUEUE_TIMEOUT_MS, … */
export function poolOptionsFromEnv(env: NodeJS.ProcessEnv = process.env): PoolOptions {
  const num = (name: string, fallback: number) => {
    const v = Number(env[name]);
    return Number.isFinite(v) && v > 0 ? v : fallback;
  };
  const threads = Math.floor(num('POOL_THREADS', Math.max(2, os.availableParallelism())));
  return {
    threads,
    perFederation: Math.floor(num('POOL_PER_FEDERATION', Math.max(1, threads - 1))),
    maxQueue: Math.floor(num('POOL_MAX_QUEUE', 200)),
    maxQueuePerFederation: Math.floor(num('POOL_MAX_QUEUE_PER_FEDERATION', 100)),
    queueTimeoutMs: num('POOL_QUEUE_TIMEOUT_MS', 20_000),
    runTimeoutMs: num('POOL_RUN_TIMEOUT_MS', 120_000),
    nice: env.POOL_NICE === '0' ? 0 : Math.min(19, Math.floor(num('POOL_NICE', 10))),
  };
}

// ---------------------------------------------------------------------------------------------
// Admission: per-federation limit, bounded queue, timeout

interface Waiting {
  federationId: number;
  background: boolean;
  admit: () => void;
  timer: NodeJS.Timeout | null;
}

/** Decides when a task may start. `acquire` resolves with the function that frees its place. */
export class Admission {
  private running = 0;
  private readonly runningBy = new Map<number, number>();
  private readonly waiting: Waiting[] = [];
  /** Moving average of how long a task holds its place (for Retry-After). */
  private averageMs = 500;
  refused = 0;

  private readonly options: Pick<PoolOptions, 'threads' | 'perFederation' | 'maxQueue' | 'maxQueuePerFederation' | 'queueTimeoutMs'>;

  constructor(options: Pick<PoolOptions, 'threads' | 'perFederation' | 'maxQueue' | 'maxQueuePerFederation' | 'queueTimeoutMs'>) {
    this.options = options;
  }

  get runningCount(): number {
    return this.running;
  }

  get waitingCount(): number {
    return this.waiting.length;
  }

  /** Seconds a client should wait before trying again, from the queue ahead and the recent task durations. */
  retryAfterSeconds(): number {
    const ahead = this.waiting.length + this.running;
    return Math.min(60, Math.max(1, Math.ceil((this.averageMs * (ahead + 1)) / this.options.threads / 1000)));
  }

  private canStart(federationId: number): boolean {
    return this.running < this.options.threads && (this.runningBy.get(federationId) ?? 0) < this.options.perFederation;
  }

  acquire(federationId: number, background = false): Promise<() => void> {
    const startsNow = this.canStart(federationId) && !this.waiting.some((w) => w.federationId === federationId);
    if (!background && !startsNow) {
      const ofFederation = this.waiting.reduce((n, w) => n + (w.federationId === federationId && !w.background ? 1 : 0), 0);
      const interactive = this.waiting.reduce((n, w) => n + (w.background ? 0 : 1), 0);
      if (interactive >= this.options.maxQueue || ofFederation >= this.options.maxQueuePerFederation) {
        this.refused++;
        return Promise.reject(busy('The server is busy computing other figures: try again in a few seconds', this.retryAfterSeconds()));
      }
    }
    return new Promise((resolve, reject) => {
      const entry: Waiting = {
        federationId,
        background,
        timer: null,
        admit: () => {
          if (entry.timer) clearTimeout(entry.timer);
          const started = Date.now();
          let released = false;
          resolve(() => {
            if (released) return;
            released = true;
            this.averageMs = 0.8 * this.averageMs + 0.2 * (Date.now() - started);
            this.running--;
            const left = (this.runningBy.get(federationId) ?? 1) - 1;
            if (left > 0) this.runningBy.set(federationId, left);
            else this.runningBy.delete(federationId);
            this.pump();
          });
        },
      };
      if (!background) {
        entry.timer = setTimeout(() => {
          const i = this.waiting.indexOf(entry);
          if (i < 0) return;
          this.waiting.splice(i, 1);
          this.refused++;
          reject(
            busy(
              'The server is busy computing other figures and could not start on yours in time: try again in a few seconds',
              this.retryAfterSeconds(),
            ),
          );
        }, this.options.queueTimeoutMs);
        entry.timer.unref();
      }
      this.waiting.push(entry);
      this.pump();
    });
  }

  private pump(): void {
    while (this.running < this.options.threads) {
      // Requests first (someone is waiting for the answer), then background work.
      let i = this.waiting.findIndex((w) => !w.background && this.canStart(w.federationId));
      if (i < 0) i = this.waiting.findIndex((w) => this.canStart(w.federationId));
      if (i < 0) return;
      const [next] = this.waiting.splice(i, 1);
      this.running++;
      this.runningBy.set(next.federationId, (this.runningBy.get(next.federationId) ?? 0) + 1);
      next.admit();
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Executors

interface Executor {
  kind: PoolStats['kind'];
  execute(
    message: Omit<TaskMessage, 'progress'>,
    options: { onProgress?: RunOptions['onProgress']; signal?: AbortSignal },
  ): Promise<TaskOutcome>;
  close(): Promise<void>;
}

/** Runs tasks in this thread on the app's own context (an in-memory database cannot be shared with a worker). */
function inlineExecutor(getCtx: () => AppContext): Executor {
  return {
    kind: 'inline',
    async execute(message, options) {
      // Yield first, as a worker would: the caller's code after run() never runs inside the task.
      await new Promise((resolve) => setImmediate(resolve));
      const reporter = {
        report: (phase: ProgressMessage['phase'], done: number, total: number) => options.onProgress?.(phase, done, total),
      };
      const value = await taskSpec(message.name).run(getCtx(), message.payload, { reporter });
      // The same boundary as a worker's result: plain data only, and a copy the caller may not alter in the cache.
      return { ok: true, value: structuredClone(value), bumped: [], mail: [], threadId: 0 };
    },
    async close() {},
  };
}

/** Worker threads through piscina; TypeScript is loaded in each worker with tsx. */
function workerExecutor(setup: WorkerSetup, threads: number, nice: number): Executor {
  const piscina = new Piscina({
    filename: new URL('./worker.ts', import.meta.url).href,
    minThreads: threads,
    maxThreads: threads,
    // Workers keep their connection and their cache of the federations' ratings: never retire them for idling.
    idleTimeout: Number.POSITIVE_INFINITY,
    concurrentTasksPerWorker: 1,
    execArgv: ['--import', import.meta.resolve('tsx')],
    workerData: { ...setup, nice } satisfies WorkerSetup,
  });
  return {
    kind: 'workers',
    async execute(message, options) {
      let port: MessageChannel | null = null;
      if (options.onProgress) {
        port = new MessageChannel();
        const onProgress = options.onProgress;
        port.port1.on('message', (m: ProgressMessage) => onProgress(m.phase, m.done, m.total));
      }
      const payload = message.payload as { file?: { bytes?: Uint8Array } } | null;
      const transferList: (MessagePort | ArrayBuffer)[] = [];
      if (port) transferList.push(port.port2 as unknown as MessagePort);
      // An uploaded file is handed over, not copied, when its bytes own their whole buffer.
      const bytes = payload?.file?.bytes;
      if (
        bytes instanceof Uint8Array &&
        bytes.byteOffset === 0 &&
        bytes.byteLength === bytes.buffer.byteLength &&
        bytes.buffer instanceof ArrayBuffer
      ) {
        transferList.push(bytes.buffer);
      }
      try {
        return (await piscina.run(
          { ...message, progress: port?.port2 ?? null },
          { transferList: transferList as never, signal: options.signal ?? null },
        )) as TaskOutcome;
      } finally {
        port?.port1.close();
      }
    },
    async close() {
      await piscina.close();
    },
  };
}

// ---------------------------------------------------------------------------------------------
// The pool

const CACHE_ENTRIES = 300;

function revive(error: SerializedError): Error {
  if (error.status !== null && error.code !== null)
    return new HttpError(error.status, error.code as ErrorCode, error.message, error.details, error.headers);
  const e = new Error(error.message);
  if (error.stack) e.stack = error.stack;
  if (error.code) (e as { code?: string }).code = error.code;
  return e;
}

function makePool(getCtx: () => AppContext, executor: Executor, options: PoolOptions): TaskPool {
  const admission = new Admission(options);
  const inflight = new Map<string, Promise<unknown>>();
  const results = new Map<string, unknown>();
  const running = new Set<Promise<unknown>>();
  const byThread: Record<number, number> = {};
  let completed = 0;
  let shared = 0;
  let closed = false;

  async function execute(name: string, payload: unknown, version: number, run: RunOptions): Promise<unknown> {
    const release = await admission.acquire(run.federationId, run.background);
    const spec = taskSpec(name);
    const abort = spec.writes ? null : new AbortController();
    const timer = abort ? setTimeout(() => abort.abort(), options.runTimeoutMs) : null;
    timer?.unref();
    let outcome: TaskOutcome;
    try {
      outcome = await executor.execute(
        { name, payload, federationId: run.federationId, version },
        { onProgress: run.onProgress, signal: abort?.signal },
      );
    } catch (error) {
      if (abort?.signal.aborted)
        throw busy(`The computation took longer than ${Math.round(options.runTimeoutMs / 1000)} s and was stopped: try again later`, 30);
      throw error;
    } finally {
      if (timer) clearTimeout(timer);
      release();
    }
    completed++;
    byThread[outcome.threadId] = (byThread[outcome.threadId] ?? 0) + 1;
    const ctx = getCtx();
    // What the task did in its worker, done here: data versions move (listeners run here), e-mail goes out.
    for (const federationId of outcome.bumped) ctx.dataVersions.bump(federationId);
    for (const message of outcome.mail) {
      try {
        await ctx.mailer?.send(message);
      } catch (err) {
        ctx.logger.error({ err, to: message.to }, 'could not send an e-mail written by a background task');
      }
    }
    if (!outcome.ok) throw revive(outcome.error!);
    return outcome.value;
  }

  return {
    run(name, payload, run) {
      if (closed) return Promise.reject(busy('The server is shutting down', 5));
      const ctx = getCtx();
      const version = ctx.dataVersions.of(run.federationId);
      const fullKey = run.key === undefined ? null : `${run.federationId}|${version}|${name}|${run.key}`;
      if (fullKey !== null) {
        if (results.has(fullKey)) {
          shared++;
          const hit = results.get(fullKey);
          results.delete(fullKey);
          results.set(fullKey, hit);
          return Promise.resolve(hit) as never;
        }
        const pending = inflight.get(fullKey);
        if (pending) {
          shared++;
          return pending as never;
        }
      }
      const promise = execute(name, payload, version, run);
      running.add(promise);
      const settle = () => {
        running.delete(promise);
        if (fullKey !== null) inflight.delete(fullKey);
      };
      promise.then((value) => {
        settle();
        if (fullKey === null) return;
        results.set(fullKey, value);
        for (const k of results.keys()) {
          if (results.size <= CACHE_ENTRIES) break;
          results.delete(k);
        }
      }, settle);
      if (fullKey !== null) inflight.set(fullKey, promise);
      return promise as never;
    },
    stats() {
      return {
        kind: executor.kind,
        threads: options.threads,
        running: admission.runningCount,
        waiting: admission.waitingCount,
        completed,
        refused: admission.refused,
        shared,
        byThread: { ...byThread },
      };
    },
    async close() {
      closed = true;
      await Promise.allSettled([...running]);
      await executor.close();
    },
  };
}

/** A pool that runs tasks in this thread, on the context `getCtx()` returns. */
export function createInlinePool(getCtx: () => AppContext, options: Partial<PoolOptions> = {}): TaskPool {
  return makePool(getCtx, inlineExecutor(getCtx), { ...poolOptionsFromEnv(), threads: 1, perFederation: 1, ...options });
}

/**
 * The app's pool: worker threads on a database file; in process for an in-memory database
 * (or with POOL_THREADS=0).
 */
export function createPool(getCtx: () => AppContext, setup: WorkerSetup, options: Partial<PoolOptions> = {}): TaskPool {
  const resolved = { ...poolOptionsFromEnv(), ...options };
  if (setup.databasePath === ':memory:' || process.env.POOL_THREADS === '0') return createInlinePool(getCtx, options);
  return makePool(getCtx, workerExecutor(setup, resolved.threads, resolved.nice), resolved);
}

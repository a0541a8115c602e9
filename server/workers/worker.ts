/**
 * A worker thread of the pool (server/workers/pool.ts). It opens its own connection to the
 * SQLite file (WAL: it reads a consistent snapshot while the main thread or another worker
 * writes), keeps its own cache of computed results, and runs the tasks of tasks.ts with a
 * context on that connection. Data versions follow the main thread's (each task carries its
 * federation's version); data changes and e-mail made by a task go back with its result.
 */
import os from 'node:os';
import { threadId } from 'node:worker_threads';
import { workerData } from 'piscina';
import { loadConfig } from '../config';
import type { AppContext } from '../context';
import { openDatabase } from '../db/connection';
import { HttpError } from '../http/errors';
import { createLogger } from '../logger';
import type { MailMessage, Mailer } from '../mail/mailer';
import { DataVersions } from '../services/data-version';
import { Jobs } from './jobs';
import { createInlinePool } from './pool';
import type { ProgressMessage, SerializedError, TaskMessage, TaskOutcome, WorkerSetup } from './protocol';
import { taskSpec } from './tasks';

const setup = workerData as WorkerSetup;

/**
 * Heavy work yields the CPU to the requests: on Linux, setpriority(0) applies to the calling
 * thread only, so this worker runs at a lower priority (nice) than the main thread, which then
 * answers at once even when every core is busy with tasks (decision record 0011). Elsewhere it
 * would lower the whole process, so it is left alone.
 */
function lowerPriority(nice: number): void {
  if (process.platform !== 'linux' || nice <= 0) return;
  try {
    os.setPriority(0, Math.min(19, os.getPriority(0) + nice));
  } catch {
    // Not permitted here: the worker keeps the process's priority.
  }
}
lowerPriority(setup.nice ?? 0);

interface Current {
  bumped: number[];
  mail: MailMessage[];
}
let current: Current = { bumped: [], mail: [] };
let ctx: AppContext | null = null;

function context(): AppContext {
  if (ctx) return ctx;
  const { db, sqlite } = openDatabase(setup.databasePath);
  const logger = createLogger(setup.env);
  // No session key here: workers never sign or check sessions.
  const config = loadConfig({ databasePath: setup.databasePath, env: setup.env, sessionSecret: new Uint8Array(32) });
  const mailer: Mailer | undefined = setup.mailer
    ? {
        local: setup.mailer.local,
        async send(message) {
          current.mail.push(message);
        },
        async close() {},
      }
    : undefined;
  const dataVersions = new DataVersions();
  dataVersions.onChange((federationId) => current.bumped.push(federationId));
  const base = { db, sqlite, config, logger, mailer, dataVersions, jobs: new Jobs(sqlite, logger) };
  const made: AppContext = { ...base, pool: createInlinePool(() => made) };
  ctx = made;
  return made;
}

function serialize(error: unknown): SerializedError {
  if (error instanceof HttpError) {
    return { status: error.status, code: error.code, message: error.message, details: error.details, headers: error.headers };
  }
  const e = error instanceof Error ? error : new Error(String(error));
  return { status: null, code: (e as { code?: string }).code ?? null, message: e.message, stack: e.stack };
}

/** Runs one task (piscina runs one at a time per worker: concurrentTasksPerWorker is 1). */
export default async function runTask(message: TaskMessage): Promise<TaskOutcome> {
  const app = context();
  current = { bumped: [], mail: [] };
  const port = message.progress;
  let lastSent = 0;
  let lastPhase = '';
  const reporter = {
    report(phase: ProgressMessage['phase'], done: number, total: number) {
      if (!port) return;
      const now = Date.now();
      if (phase === lastPhase && now - lastSent < 50 && done < total) return;
      lastSent = now;
      lastPhase = phase;
      port.postMessage({ phase, done, total } satisfies ProgressMessage);
    },
  };
  try {
    app.dataVersions.follow(message.federationId, message.version);
    const value = await taskSpec(message.name).run(app, message.payload, { reporter });
    return { ok: true, value, bumped: current.bumped, mail: current.mail, threadId };
  } catch (error) {
    return { ok: false, error: serialize(error), bumped: current.bumped, mail: current.mail, threadId };
  } finally {
    port?.close();
  }
}

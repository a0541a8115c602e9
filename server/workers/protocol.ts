/**
 * What crosses the boundary between the main thread and a worker thread (structured clone).
 */
import type { MessagePort } from 'node:worker_threads';
import type { MailMessage } from '../mail/mailer';

export interface TaskMessage {
  name: string;
  payload: unknown;
  federationId: number;
  /** The federation's data version on the main thread when the task was asked for. */
  version: number;
  /** Progress reports of the task go out on this port (imports). */
  progress: MessagePort | null;
}

export interface SerializedError {
  status: number | null;
  code: string | null;
  message: string;
  details?: unknown;
  headers?: Record<string, string>;
  stack?: string;
}

export interface TaskOutcome {
  ok: boolean;
  value?: unknown;
  error?: SerializedError;
  /** Federations whose data the task changed: the main thread bumps their data version. */
  bumped: number[];
  /** E-mail the task sent: the main thread hands it to the app's mailer. */
  mail: MailMessage[];
  threadId: number;
}

export interface ProgressMessage {
  phase: 'reading' | 'checking' | 'writing' | 'reverting';
  done: number;
  total: number;
}

/** What every worker is started with. */
export interface WorkerSetup {
  databasePath: string;
  env: 'development' | 'production' | 'test';
  /** Whether the app has a mailer (messages are relayed to it), and whether it is the local outbox. */
  mailer: { local: boolean } | null;
  /** Nice steps the worker lowers its own thread's priority by (set by the pool). */
  nice?: number;
}

/**
 * A real server process (node --import tsx server/main.ts) for tests of what only a process
 * shows: the start-up checks, the lock file, backups while it writes.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';

export const root = path.resolve(import.meta.dirname, '../..');

export async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const server = net.createServer().listen(0, () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

export interface ServerProcess {
  proc: ChildProcess;
  base: string;
  output(): string;
}

/** Environment for a child: this process's, without what the test runner set that could leak in. */
function childEnv(env: Record<string, string | undefined>): NodeJS.ProcessEnv {
  const base: NodeJS.ProcessEnv = { ...process.env };
  for (const name of [
    'NODE_ENV',
    'SESSION_SECRET',
    'SMTP_URL',
    'PUBLIC_ORIGIN',
    'SEED_DEMO',
    'DATABASE_PATH',
    'PORT',
    'VITEST',
    'VITEST_POOL_ID',
    'VITEST_WORKER_ID',
  ])
    delete base[name];
  return { ...base, LOG_LEVEL: 'info', ...env };
}

/** Starts the server; resolves once /api/health answers, or rejects with its output when it exits. */
export async function startServer(env: Record<string, string | undefined>, args: string[] = []): Promise<ServerProcess> {
  const port = Number(env.PORT ?? (await freePort()));
  const proc = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts', ...args], {
    cwd: root,
    env: childEnv({ ...env, PORT: String(port) }),
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  proc.stdout.on('data', (d: Buffer) => (output += d.toString()));
  proc.stderr.on('data', (d: Buffer) => (output += d.toString()));
  const base = `http://localhost:${port}`;
  for (let i = 0; i < 600; i++) {
    if (proc.exitCode !== null) throw new ServerExited(proc.exitCode, output);
    try {
      const res = await fetch(`${base}/api/health`);
      if (res.ok) return { proc, base, output: () => output };
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  proc.kill('SIGKILL');
  throw new Error(`the server did not start: ${output}`);
}

export class ServerExited extends Error {
  readonly code: number;
  readonly output: string;
  constructor(code: number, output: string) {
    super(`the server exited with code ${code}: ${output}`);
    this.code = code;
    this.output = output;
  }
}

interface Finished {
  code: number | null;
  stdout: string;
  stderr: string;
}

/**
 * Runs a child to its end without blocking this process's event loop (a blocked loop would let
 * pooled keep-alive connections to a running server go stale unnoticed).
 */
function runToEnd(args: string[], env: Record<string, string | undefined>, input: string): Promise<Finished> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, args, { cwd: root, env: childEnv(env), stdio: ['pipe', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    const timer = setTimeout(() => child.kill('SIGKILL'), 120_000);
    child.on('error', reject);
    child.on('close', (code) => {
      clearTimeout(timer);
      resolve({ code, stdout, stderr });
    });
    child.stdin.end(input);
  });
}

/** Runs the server to its exit (for starts that must be refused) and returns the code and output. */
export async function runServerToExit(
  env: Record<string, string | undefined>,
  args: string[] = [],
): Promise<{ code: number | null; output: string }> {
  const result = await runToEnd(['--import', 'tsx', 'server/main.ts', ...args], env, '');
  return { code: result.code, output: `${result.stdout}${result.stderr}` };
}

export async function stopServer(server: ServerProcess | null, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
  if (!server) return;
  const { proc } = server;
  if (proc.exitCode !== null || proc.signalCode !== null) return;
  const exited = new Promise((r) => proc.once('exit', r));
  proc.kill(signal);
  await exited;
}

/** Runs `panelwise …` (bin/panelwise.js) with the given environment and standard input. */
export function panelwise(args: string[], env: Record<string, string | undefined>, input = ''): Promise<Finished> {
  return runToEnd([path.join(root, 'bin/panelwise.js'), ...args], env, input);
}

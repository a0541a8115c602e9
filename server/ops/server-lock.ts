/**
 * The lock file a running server keeps beside its database (`<database>.pid`): its process id,
 * host and start time. `panelwise restore` refuses while it names a live process, so a database
 * is never replaced under a server that has it open. A file left by a killed server names a dead
 * process and is ignored (and replaced at the next start).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

export interface ServerLock {
  pid: number;
  host: string;
  startedAt: string;
  databasePath: string;
}

export function lockFileOf(databasePath: string): string {
  return `${path.resolve(databasePath)}.pid`;
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    // EPERM: the process exists but belongs to another user.
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readLock(file: string): ServerLock | null {
  try {
    const lock = JSON.parse(fs.readFileSync(file, 'utf8')) as Partial<ServerLock>;
    if (typeof lock.pid !== 'number' || typeof lock.host !== 'string') return null;
    return { pid: lock.pid, host: lock.host, startedAt: String(lock.startedAt ?? ''), databasePath: String(lock.databasePath ?? '') };
  } catch {
    return null;
  }
}

/**
 * The server that holds the database, or null. A lock written on another host cannot be checked
 * from here and counts as held (the operator removes the file once that server is stopped).
 */
export function serverHolding(databasePath: string): ServerLock | null {
  if (databasePath === ':memory:') return null;
  const lock = readLock(lockFileOf(databasePath));
  if (!lock) return null;
  if (lock.host !== os.hostname()) return lock;
  if (lock.pid === process.pid) return null;
  return alive(lock.pid) ? lock : null;
}

/** Writes this process's lock file; the returned function removes it (only if it is still ours). */
export function acquireServerLock(databasePath: string): { release(): void; replaced: ServerLock | null } {
  if (databasePath === ':memory:') return { release() {}, replaced: null };
  const file = lockFileOf(databasePath);
  const replaced = serverHolding(databasePath);
  const lock: ServerLock = {
    pid: process.pid,
    host: os.hostname(),
    startedAt: new Date().toISOString(),
    databasePath: path.resolve(databasePath),
  };
  fs.writeFileSync(file, `${JSON.stringify(lock)}\n`, { mode: 0o644 });
  return {
    replaced,
    release() {
      const current = readLock(file);
      if (current?.pid === process.pid && current.host === lock.host) fs.rmSync(file, { force: true });
    },
  };
}

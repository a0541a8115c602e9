/**
 * A crash in the middle of a large import: a real server process (node --import tsx
 * server/main.ts on a temporary database, seeded with the demo) is killed with SIGKILL while it
 * writes a 300,000-rating commit. After a restart the database passes PRAGMA integrity_check and
 * the import is either wholly present or wholly absent; committing it again then works.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import BetterSqlite3 from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';
import { longCsv } from '../factories/import-csv';
import { root } from './imports/helpers';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-kill-'));
const databasePath = path.join(dir, 'kill.db');
let child: ChildProcess | null = null;

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const server = net.createServer().listen(0, () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

async function start(port: number): Promise<ChildProcess> {
  const proc = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: root,
    env: { ...process.env, PORT: String(port), DATABASE_PATH: databasePath, NODE_ENV: 'test', LOG_LEVEL: 'warn' },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  proc.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
  for (let i = 0; i < 300; i++) {
    if (proc.exitCode !== null) throw new Error(`the server exited: ${stderr}`);
    try {
      const res = await fetch(`http://localhost:${port}/api/health`);
      if (res.ok) return proc;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`the server did not start: ${stderr}`);
}

async function stop(proc: ChildProcess, signal: NodeJS.Signals): Promise<void> {
  if (proc.exitCode !== null || proc.signalCode !== null) return;
  const exited = new Promise((r) => proc.once('exit', r));
  proc.kill(signal);
  await exited;
}

const walSize = () => {
  try {
    return fs.statSync(`${databasePath}-wal`).size;
  } catch {
    return 0;
  }
};

afterAll(async () => {
  if (child) await stop(child, 'SIGKILL');
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('a server killed in the middle of an import', () => {
  it('leaves a sound database with the import wholly present or wholly absent', async () => {
    const port = await freePort();
    child = await start(port);
    const base = `http://localhost:${port}`;
    const signIn = await fetch(`${base}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ email: 'lead@demo.panelwise.test', password: 'panelwise-demo' }),
    });
    expect(signIn.status).toBe(201);
    const cookie = signIn.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');

    const form = new FormData();
    form.append('file', new Blob([longCsv({ ratings: 300_000, prefix: 'KILL-' })], { type: 'text/csv' }), 'large.csv');
    const dry = await fetch(`${base}/api/federations/kestrel-coast/imports`, { method: 'POST', body: form, headers: { cookie } });
    const dryBody = (await dry.json()) as {
      importId: number;
      outcome: string;
      counts: { assessments: { new: number }; ratings: { new: number } };
    };
    expect(dryBody.outcome).toBe('ready');
    const expected = dryBody.counts.assessments.new;
    expect(expected).toBe(100_000);

    // Commit, and kill the process as soon as the write transaction has put pages in the WAL.
    const baseline = walSize();
    let answered = false;
    const commit = fetch(`${base}/api/federations/kestrel-coast/imports/${dryBody.importId}/commit`, {
      method: 'POST',
      headers: { cookie },
    })
      .then(() => (answered = true))
      .catch(() => undefined);
    const started = Date.now();
    while (walSize() < baseline + 4 * 1024 * 1024 && Date.now() - started < 20_000 && !answered) await new Promise((r) => setTimeout(r, 5));
    expect(answered).toBe(false);
    await stop(child, 'SIGKILL');
    await commit;
    expect(answered).toBe(false);

    // Restart: recovery discards the unfinished transaction.
    child = await start(port);
    const db = new BetterSqlite3(databasePath, { readonly: true });
    try {
      expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
      expect(db.pragma('foreign_key_check')).toEqual([]);
      const present = db.prepare("select count(*) from assessments where external_id like 'KILL-%'").pluck().get() as number;
      const ratings = db
        .prepare("select count(*) from ratings r join assessments a on a.id = r.assessment_id where a.external_id like 'KILL-%'")
        .pluck()
        .get() as number;
      const status = db.prepare('select status from imports where id = ?').pluck().get(dryBody.importId);
      // Wholly present or wholly absent, with the import's status to match.
      if (status === 'committed') expect([present, ratings]).toEqual([expected, 300_000]);
      else expect([status, present, ratings]).toEqual(['staged', 0, 0]);
    } finally {
      db.close();
    }

    // The staged file survived: committing again writes it all.
    // The session key is kept beside the database, so the lead's cookie still works.
    const again = await fetch(`${base}/api/federations/kestrel-coast/imports/${dryBody.importId}/commit`, {
      method: 'POST',
      headers: { cookie },
    });
    expect(again.status).toBe(200);
    const after = new BetterSqlite3(databasePath, { readonly: true });
    try {
      expect(after.prepare("select count(*) from assessments where external_id like 'KILL-%'").pluck().get()).toBe(expected);
      expect(after.pragma('integrity_check', { simple: true })).toBe('ok');
    } finally {
      after.close();
    }
    await stop(child, 'SIGTERM');
    child = null;
  }, 180_000);
});

/**
 * A backup taken while a large import commits: a real server process (seeded with the demo)
 * commits a 200,000-rating import in one transaction while this process, through a second
 * connection, runs the online backup of `panelwise backup` (backupDatabase) again and again.
 * Every copy passes integrity_check and holds the import wholly or not at all. Then a restore
 * is refused while the server runs, and once it is stopped puts a copy back.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import BetterSqlite3 from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';
import { backupDatabase, inspectDatabase } from '../../server/ops/backup';
import { longCsv } from '../factories/import-csv';
import { panelwise, startServer, stopServer, type ServerProcess } from '../helpers/server-process';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-backup-'));
const databasePath = path.join(dir, 'live.db');
const env = { NODE_ENV: 'test', DATABASE_PATH: databasePath, LOG_LEVEL: 'warn' };
let server: ServerProcess | null = null;

afterAll(async () => {
  await stopServer(server, 'SIGKILL');
  fs.rmSync(dir, { recursive: true, force: true });
});

const RATINGS = 200_000;

function importedCounts(file: string, importId: number): { status: unknown; assessments: number; ratings: number } {
  const db = new BetterSqlite3(file, { readonly: true });
  try {
    return {
      status: db.prepare('select status from imports where id = ?').pluck().get(importId),
      assessments: db.prepare("select count(*) from assessments where external_id like 'BACKUP-%'").pluck().get() as number,
      ratings: db
        .prepare("select count(*) from ratings r join assessments a on a.id = r.assessment_id where a.external_id like 'BACKUP-%'")
        .pluck()
        .get() as number,
    };
  } finally {
    db.close();
  }
}

describe('a backup while an import commits', () => {
  it('is consistent: integrity_check ok and the import wholly in or wholly out', async () => {
    server = await startServer(env);
    const { base } = server;
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
    form.append('file', new Blob([longCsv({ ratings: RATINGS, prefix: 'BACKUP-' })], { type: 'text/csv' }), 'large.csv');
    const dry = await fetch(`${base}/api/federations/kestrel-coast/imports`, { method: 'POST', body: form, headers: { cookie } });
    const dryBody = (await dry.json()) as { importId: number; outcome: string; counts: { assessments: { new: number } } };
    expect(dryBody.outcome).toBe('ready');
    const expected = dryBody.counts.assessments.new;

    let answered = false;
    const commit = fetch(`${base}/api/federations/kestrel-coast/imports/${dryBody.importId}/commit`, {
      method: 'POST',
      headers: { cookie },
    }).then((r) => {
      answered = true;
      return r.status;
    });
    const copies: { file: string; startedDuringCommit: boolean }[] = [];
    for (let i = 0; !answered || copies.length < 2; i++) {
      const file = path.join(dir, `copy-${i}.db`);
      const startedDuringCommit = !answered;
      await backupDatabase(databasePath, file);
      copies.push({ file, startedDuringCommit });
      if (i > 200) break;
    }
    expect(await commit).toBe(200);
    const afterCommit = path.join(dir, 'after.db');
    await backupDatabase(databasePath, afterCommit);
    copies.push({ file: afterCommit, startedDuringCommit: false });
    // At least the first copy was taken while the commit was in flight.
    expect(copies[0].startedDuringCommit).toBe(true);

    for (const { file } of copies) {
      expect(inspectDatabase(file).integrity).toBe('ok');
      const counts = importedCounts(file, dryBody.importId);
      if (counts.status === 'committed') expect([counts.assessments, counts.ratings]).toEqual([expected, RATINGS]);
      else expect(counts).toEqual({ status: 'staged', assessments: 0, ratings: 0 });
    }
    expect(importedCounts(afterCommit, dryBody.importId).status).toBe('committed');

    // Restore: refused while the server holds the database; after it stops, a copy from before
    // the commit (or the last one) goes back in, and the server starts on it.
    const before = copies.find((c) => importedCounts(c.file, dryBody.importId).status === 'staged') ?? copies[0];
    const refused = await panelwise(['restore', before.file], env);
    expect(refused.code).toBe(1);
    expect(refused.stderr).toContain('holds');
    await stopServer(server);
    server = null;
    const restored = await panelwise(['restore', before.file], env);
    expect(restored.code, restored.stderr).toBe(0);
    expect(restored.stdout).toContain('integrity_check ok');
    expect(fs.existsSync(`${databasePath}-wal`)).toBe(false);
    const want = importedCounts(before.file, dryBody.importId);
    expect(importedCounts(databasePath, dryBody.importId)).toEqual(want);
    server = await startServer(env);
    expect((await fetch(`${server.base}/api/health`)).status).toBe(200);
    await stopServer(server);
    server = null;
  }, 400_000);
});

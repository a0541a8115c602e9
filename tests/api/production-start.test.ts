/**
 * A real server process started with NODE_ENV=production on an empty database: the environment
 * is checked (a short SESSION_SECRET refuses to start, one line per problem), the demo is not
 * seeded so its published credentials fail, the log says how to create the first site owner,
 * and `panelwise create-owner` does. A database with demo accounts that can sign in is refused
 * until `panelwise disable-demo`; a restore is refused while the server holds the database.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/password';
import { openDatabase } from '../../server/db/connection';
import { migrateToLatest } from '../../server/db/migrate';
import { panelwise, runServerToExit, startServer, stopServer, type ServerProcess } from '../helpers/server-process';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-production-'));
let server: ServerProcess | null = null;

afterAll(async () => {
  await stopServer(server, 'SIGKILL');
  fs.rmSync(dir, { recursive: true, force: true });
});

const production = (databasePath: string, extra: Record<string, string> = {}) => ({
  NODE_ENV: 'production',
  DATABASE_PATH: databasePath,
  SESSION_SECRET: crypto.randomBytes(32).toString('hex'),
  // A relay nobody listens on: nothing is sent in these tests, and nodemailer connects only to send.
  SMTP_URL: 'smtp://127.0.0.1:9',
  PUBLIC_ORIGIN: 'https://panelwise.example.org',
  ...extra,
});

const signIn = (base: string, email: string, password: string) =>
  fetch(`${base}/api/session`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });

describe('starting in production', () => {
  it('refuses a short SESSION_SECRET and a missing SMTP_URL, one clear line each, with a non-zero exit code', async () => {
    const databasePath = path.join(dir, 'refused.db');
    const { code, output } = await runServerToExit({ ...production(databasePath), SESSION_SECRET: 'x', SMTP_URL: '', PORT: 'eighty' });
    expect(code).not.toBe(0);
    expect(output).toContain('panelwise: SESSION_SECRET is 1 bytes long: use at least 32 random bytes');
    expect(output).toContain('panelwise: SMTP_URL must be set in production');
    expect(output).toContain('panelwise: PORT must be a whole number');
    // Nothing was created: the check comes before the database is opened.
    expect(fs.existsSync(databasePath)).toBe(false);
  }, 60_000);

  it('on an empty database: no demo, the demo credentials fail, the log names create-owner, which makes the first owner', async () => {
    const databasePath = path.join(dir, 'empty.db');
    const env = production(databasePath);
    server = await startServer(env);
    const { base } = server;
    expect(server.output()).toContain('panelwise create-owner EMAIL');

    for (const email of ['owner@demo.panelwise.test', 'lead@demo.panelwise.test']) {
      const response = await signIn(base, email, 'panelwise-demo');
      expect(response.status).toBe(401);
    }
    expect((await fetch(`${base}/api/federations/kestrel-coast/summary`)).status).toBe(401);

    // The lock file names the server; a restore is refused while it runs.
    const lock = JSON.parse(fs.readFileSync(`${databasePath}.pid`, 'utf8')) as { pid: number };
    expect(lock.pid).toBe(server.proc.pid);
    const backup = await panelwise(['backup', path.join(dir, 'empty-backup.db')], env);
    expect(backup.code, backup.stderr).toBe(0);
    expect(backup.stdout).toMatch(/wrote .*empty-backup\.db: .*integrity_check ok, 0 federation\(s\)/);
    const restore = await panelwise(['restore', path.join(dir, 'empty-backup.db')], env);
    expect(restore.code).toBe(1);
    expect(restore.stderr).toContain(`a Panelwise server (pid ${server.proc.pid}`);

    // The first site owner, from the command line; a weak password is refused first.
    const weak = await panelwise(['create-owner', 'head@federation.example.org'], env, 'aaaaaaaaaa\n');
    expect(weak.code).toBe(1);
    expect(weak.stderr).toContain('too easy to guess');
    const password = 'quiet-lantern-harbour-gravel';
    const created = await panelwise(
      ['create-owner', 'head@federation.example.org', '--name', 'Head of Classification'],
      env,
      `${password}\n`,
    );
    expect(created.code, created.stderr).toBe(0);
    expect(created.stdout).toContain('created the site owner head@federation.example.org');
    const owner = await signIn(base, 'head@federation.example.org', password);
    expect(owner.status).toBe(201);
    expect(((await owner.json()) as { user: { isOwner: boolean } }).user.isOwner).toBe(true);

    await stopServer(server);
    server = null;
    // A clean stop removes the lock file.
    expect(fs.existsSync(`${databasePath}.pid`)).toBe(false);
  }, 240_000);

  it('refuses a database whose demo accounts can sign in, until disable-demo removes their passwords', async () => {
    const databasePath = path.join(dir, 'had-demo.db');
    const { db } = openDatabase(databasePath);
    await migrateToLatest(db);
    await db
      .insertInto('users')
      .values({ email: 'lead@demo.panelwise.test', display_name: 'Demo Lead', password_hash: await hashPassword('panelwise-demo') })
      .execute();
    await db.destroy();
    const env = production(databasePath);

    const refused = await runServerToExit(env);
    expect(refused.code).not.toBe(0);
    expect(refused.output).toContain('demo account(s)');
    expect(refused.output).toContain('panelwise disable-demo');

    const disabled = await panelwise(['disable-demo'], env);
    expect(disabled.code, disabled.stderr).toBe(0);
    expect(disabled.stdout).toContain('removed the passwords of 1 demo account(s)');

    server = await startServer(env);
    expect((await signIn(server.base, 'lead@demo.panelwise.test', 'panelwise-demo')).status).toBe(401);
    await stopServer(server);
    server = null;
  }, 240_000);
});

import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/db/connection';
import { migrateDownToNothing, migrateToLatest, migratorFor } from '../../server/db/migrate';

function userTables(sqlite: ReturnType<typeof openDatabase>['sqlite']): string[] {
  return (
    sqlite
      .prepare(
        "select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like 'kysely_%' order by name",
      )
      .all() as { name: string }[]
  ).map((r) => r.name);
}

describe('migrations', () => {
  it('apply up and down one by one on a fresh database, leaving nothing behind', async () => {
    const { db, sqlite } = openDatabase(':memory:');
    const migrator = migratorFor(db);
    const all = await migrator.getMigrations();
    expect(all.length).toBeGreaterThan(0);
    const seen: string[][] = [];
    for (let i = 0; i < all.length; i++) {
      const result = await migrator.migrateUp();
      expect(result.error).toBeUndefined();
      seen.push(userTables(sqlite));
    }
    expect(seen.at(-1)).toEqual(
      expect.arrayContaining([
        'federations',
        'users',
        'memberships',
        'classifiers',
        'athletes',
        'events',
        'assessments',
        'ratings',
        'imports',
        'audit_log',
      ]),
    );
    for (let i = all.length - 1; i >= 0; i--) {
      const result = await migrator.migrateDown();
      expect(result.error).toBeUndefined();
      expect(userTables(sqlite)).toEqual(i > 0 ? seen[i - 1] : []);
    }
    await db.destroy();
  });

  it('migrate to latest, down to nothing, and up again', async () => {
    const { db, sqlite } = openDatabase(':memory:');
    await migrateToLatest(db);
    await migrateDownToNothing(db);
    expect(userTables(sqlite)).toEqual([]);
    await migrateToLatest(db);
    expect(userTables(sqlite).length).toBeGreaterThan(5);
    await db.destroy();
  });

  it('open the database with foreign keys on, WAL and a busy timeout', async () => {
    const os = await import('node:os');
    const path = await import('node:path');
    const file = path.join(os.tmpdir(), `panelwise-pragma-${process.pid}.db`);
    const { db, sqlite } = openDatabase(file);
    expect(sqlite.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(sqlite.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(sqlite.pragma('busy_timeout', { simple: true })).toBe(5000);
    await db.destroy();
    const fs = await import('node:fs');
    for (const suffix of ['', '-wal', '-shm']) fs.rmSync(file + suffix, { force: true });
  });

  it('moves stored research export files out of the database into gzip files beside it, and back on the way down', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-migrate-'));
    try {
      const { db, sqlite } = openDatabase(path.join(dir, 'panelwise.db'));
      const migrator = migratorFor(db);
      expect((await migrator.migrateTo('2026_12_02_0040_research_exports')).error).toBeUndefined();
      sqlite.prepare("insert into federations (slug, name) values ('invented', 'Invented Federation')").run();
      const insert = sqlite.prepare(
        "insert into research_exports (federation_id, request, min_athletes, csv, json, dictionary, expires_at) values (1, '{}', 5, ?, ?, ?, '2099-01-01T00:00:00.000Z')",
      );
      insert.run('assessment,classifier\r\nasm-b,clf-c\r\n', '{"rows":[]}', '{"format":"d"}');
      insert.run(null, null, null);
      expect((await migrator.migrateTo('2026_12_04_0140_research_export_files')).error).toBeUndefined();
      const rows = sqlite.prepare('select id, storage_key, stored_bytes, removed_at from research_exports order by id').all() as {
        id: number;
        storage_key: string | null;
        stored_bytes: number;
        removed_at: string | null;
      }[];
      expect(rows[0].storage_key).toMatch(/^[0-9a-f]{24}$/);
      expect(rows[0].removed_at).toBeNull();
      expect(rows[1].storage_key).toBeNull();
      expect(rows[1].removed_at).not.toBeNull();
      const csv = path.join(dir, 'exports', `export-1-${rows[0].storage_key}-csv.gz`);
      expect(zlib.gunzipSync(fs.readFileSync(csv)).toString('utf8')).toBe('assessment,classifier\r\nasm-b,clf-c\r\n');
      const onDisk = fs.readdirSync(path.join(dir, 'exports')).reduce((sum, f) => sum + fs.statSync(path.join(dir, 'exports', f)).size, 0);
      expect(rows[0].stored_bytes).toBe(onDisk);
      expect((await migrator.migrateTo('2026_12_02_0040_research_exports')).error).toBeUndefined();
      expect(sqlite.prepare('select csv from research_exports where id = 1').get()).toEqual({
        csv: 'assessment,classifier\r\nasm-b,clf-c\r\n',
      });
      await db.destroy();
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});

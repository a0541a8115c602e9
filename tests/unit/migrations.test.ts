import { describe, expect, it } from 'vitest';
import { openDatabase } from '../../server/db/connection';
import { migrateDownToNothing, migrateToLatest, migratorFor } from '../../server/db/migrate';

function userTables(sqlite: ReturnType<typeof openDatabase>['sqlite']): string[] {
  return (sqlite.prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%' and name not like 'kysely_%' order by name").all() as { name: string }[]).map(
    (r) => r.name,
  );
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
    expect(seen.at(-1)).toEqual(expect.arrayContaining(['federations', 'users', 'memberships', 'classifiers', 'athletes', 'events', 'assessments', 'ratings', 'imports', 'audit_log']));
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
});

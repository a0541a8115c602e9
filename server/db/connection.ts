import fs from 'node:fs';
import path from 'node:path';
import BetterSqlite3 from 'better-sqlite3';
import { Kysely, SqliteDialect } from 'kysely';
import type { Database } from './database';

export type Db = Kysely<Database>;

export interface OpenedDatabase {
  db: Db;
  /** The raw connection, for batched prepared statements in hot paths (imports). */
  sqlite: BetterSqlite3.Database;
  close(): Promise<void>;
}

/**
 * Opens the SQLite file (":memory:" for a throw-away database) in WAL mode with foreign keys on
 * and a busy timeout, so concurrent readers never see a half-written import.
 */
export function openDatabase(file: string): OpenedDatabase {
  if (file !== ':memory:') fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const sqlite = new BetterSqlite3(file);
  sqlite.pragma('journal_mode = WAL');
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma('busy_timeout = 5000');
  sqlite.pragma('synchronous = NORMAL');
  const db = new Kysely<Database>({ dialect: new SqliteDialect({ database: sqlite }) });
  return {
    db,
    sqlite,
    async close() {
      await db.destroy();
    },
  };
}

export function defaultDatabasePath(): string {
  return process.env.DATABASE_PATH ?? path.join('data', 'panelwise.db');
}

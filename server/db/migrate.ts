import { promises as fs } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { FileMigrationProvider, type MigrationResultSet, Migrator, NO_MIGRATIONS } from 'kysely';
import type { Db } from './connection';

export const migrationsFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../migrations');

export function migratorFor(db: Db): Migrator {
  return new Migrator({
    db,
    provider: new FileMigrationProvider({ fs, path, migrationFolder: migrationsFolder }),
  });
}

function unwrap(result: MigrationResultSet): void {
  if (result.error) {
    const failed = result.results?.find((r) => r.status === 'Error');
    const where = failed ? ` (migration ${failed.migrationName})` : '';
    throw new Error(`Migration failed${where}: ${String((result.error as Error).message ?? result.error)}`);
  }
}

/** Applies every pending migration. */
export async function migrateToLatest(db: Db): Promise<void> {
  unwrap(await migratorFor(db).migrateToLatest());
}

/** Undoes every migration, newest first. */
export async function migrateDownToNothing(db: Db): Promise<void> {
  unwrap(await migratorFor(db).migrateTo(NO_MIGRATIONS));
}

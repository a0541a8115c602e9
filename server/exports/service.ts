import fs from 'node:fs';
import { sql, type Selectable } from 'kysely';
import type {
  ExportCounts,
  ExportFile,
  ExportOptions,
  ExportRequest,
  ExportSettings,
  ExportSettingsView,
  ExportView,
  StudyView,
} from '../../shared/schemas/exports';
import type { FederationAccess } from '../auth/access';
import type { Db } from '../db/connection';
import type { ResearchStudyTable } from '../db/database';
import { HttpError, notFound } from '../http/errors';
import { audit } from '../services/audit';
import { seasonOf } from './build';
import { buildExport, EXPORT_KEEP_DAYS } from './create';
import { randomSecret } from './pseudonyms';
import { exportSettings, NO_EVENT_LEVEL } from './scope';
import { exportFilePath, exportsDirectory, removeExportFiles, type ExportStorageContext } from './storage';
import { ASSESSMENT_KINDS } from '../../shared/schemas/common';

export { EXPORT_KEEP_DAYS } from './create';
export { DEFAULT_MIN_ATHLETES } from '../services/research-cells';

function studyView(row: Selectable<ResearchStudyTable>): StudyView {
  return { id: row.id, name: row.name, purpose: row.purpose, createdAt: row.created_at, closedAt: row.closed_at };
}

export async function listStudies(db: Db, federationId: number, openOnly: boolean): Promise<StudyView[]> {
  let query = db.selectFrom('research_studies').selectAll().where('federation_id', '=', federationId);
  if (openOnly) query = query.where('closed_at', 'is', null);
  return (await query.orderBy('created_at', 'desc').orderBy('id', 'desc').execute()).map(studyView);
}

/** What the build form may offer. Researchers get no individual events: they choose by season and level. */
export async function exportOptions(db: Db, access: FederationAccess): Promise<ExportOptions> {
  const federationId = access.federation.id;
  const dates = await db
    .selectFrom('assessments')
    .select(sql<string>`substr(assessed_on, 1, 7)`.as('month'))
    .distinct()
    .where('federation_id', '=', federationId)
    .execute();
  const seasons = [...new Set(dates.map((d) => seasonOf(`${d.month}-01`)))].sort();
  const levels = await db
    .selectFrom('events')
    .select('level')
    .distinct()
    .where('federation_id', '=', federationId)
    .orderBy('level')
    .execute();
  const withoutEvent = await db
    .selectFrom('assessments')
    .select('id')
    .where('federation_id', '=', federationId)
    .where('event_id', 'is', null)
    .limit(1)
    .executeTakeFirst();
  const categories = await db
    .selectFrom('athletes')
    .select('category')
    .distinct()
    .where('federation_id', '=', federationId)
    .orderBy('category')
    .execute();
  const events =
    access.role === 'lead'
      ? (
          await db
            .selectFrom('events')
            .select(['id', 'code', 'name', 'starts_on', 'level'])
            .where('federation_id', '=', federationId)
            .orderBy('starts_on')
            .orderBy('code')
            .execute()
        ).map((e) => ({
          id: e.id,
          code: e.code,
          name: e.name,
          season: e.starts_on ? seasonOf(e.starts_on) : '',
          level: e.level,
        }))
      : [];
  const settings = await exportSettings(db, federationId);
  return {
    seasons,
    eventLevels: [...levels.map((l) => l.level), ...(withoutEvent ? [NO_EVENT_LEVEL] : [])],
    categories: categories.map((c) => c.category),
    kinds: [...ASSESSMENT_KINDS],
    events,
    minAthletes: settings.minAthletes,
    studies: await listStudies(db, federationId, true),
  };
}

function exportView(
  row: {
    id: number;
    created_at: string;
    expires_at: string;
    request: string;
    min_athletes: number;
    counts: string;
    storage_key: string | null;
    stored_bytes: number;
    study_id: number | null;
    study_name: string | null;
  },
  federationSlug: string,
  now: Date,
): ExportView {
  const expired = Date.parse(row.expires_at) <= now.getTime() || row.storage_key === null;
  const base = `/federations/${encodeURIComponent(federationSlug)}/exports/${row.id}`;
  return {
    id: row.id,
    createdAt: row.created_at,
    expiresAt: row.expires_at,
    expired,
    request: JSON.parse(row.request) as ExportRequest,
    study: row.study_id !== null && row.study_name !== null ? { id: row.study_id, name: row.study_name } : null,
    minAthletes: row.min_athletes,
    counts: JSON.parse(row.counts) as ExportCounts,
    storedBytes: expired ? 0 : row.stored_bytes,
    files: expired ? {} : { csv: `${base}/csv`, json: `${base}/json`, dictionary: `${base}/dictionary` },
  };
}

/**
 * Builds an export (server/exports/create.ts: whole cells of at least k athletes, quota,
 * differencing, gzip files kept for EXPORT_KEEP_DAYS, audit). The per-export salt is used and
 * forgotten.
 */
export async function createExport(
  ctx: ExportStorageContext,
  access: FederationAccess,
  request: ExportRequest,
  now = new Date(),
): Promise<ExportView> {
  if (access.role !== 'lead' && request.scope.eventIds && request.scope.eventIds.length > 0) {
    throw new HttpError(403, 'forbidden', 'Researchers choose events by season and level, not one by one', [
      { path: 'scope.eventIds', message: 'Only a lead may choose individual events' },
    ]);
  }
  if (access.role === null || access.userId === null) throw new HttpError(403, 'forbidden', 'API tokens cannot make research exports');
  const built = await buildExport(ctx, {
    federation: {
      id: access.federation.id,
      name: access.federation.name,
      scaleMin: access.federation.scaleMin,
      scaleMax: access.federation.scaleMax,
    },
    userId: access.userId,
    role: access.role,
    request,
    now,
  });
  return exportView(
    {
      id: built.exportId,
      created_at: built.createdAt,
      expires_at: built.expiresAt,
      request: JSON.stringify(request),
      min_athletes: built.minAthletes,
      counts: JSON.stringify(built.counts),
      storage_key: built.storageKey,
      stored_bytes: built.storedBytes,
      study_id: built.study?.id ?? null,
      study_name: built.study?.name ?? null,
    },
    access.federation.slug,
    now,
  );
}

/** The caller's own exports, newest first (exports still being built are left out). */
export async function listMyExports(ctx: ExportStorageContext, access: FederationAccess, now = new Date()): Promise<ExportView[]> {
  const rows = await ctx.db
    .selectFrom('research_exports')
    .leftJoin('research_studies', 'research_studies.id', 'research_exports.study_id')
    .select([
      'research_exports.id',
      'research_exports.created_at',
      'research_exports.expires_at',
      'research_exports.request',
      'research_exports.min_athletes',
      'research_exports.counts',
      'research_exports.storage_key',
      'research_exports.stored_bytes',
      'research_exports.study_id',
      'research_studies.name as study_name',
    ])
    .where('research_exports.federation_id', '=', access.federation.id)
    .where('research_exports.user_id', '=', access.userId)
    .where((eb) => eb.or([eb('research_exports.storage_key', 'is not', null), eb('research_exports.removed_at', 'is not', null)]))
    .orderBy('research_exports.id', 'desc')
    .limit(200)
    .execute();
  return rows.map((row) => exportView(row, access.federation.slug, now));
}

const MEDIA_TYPES: Record<ExportFile, string> = {
  csv: 'text/csv; charset=utf-8',
  json: 'application/json; charset=utf-8',
  dictionary: 'application/json; charset=utf-8',
};

/**
 * One stored file of the caller's own export, as the path of its gzip-compressed file; 404 for
 * anyone else's, 410 once expired (its files are removed then, if the scheduled job has not yet).
 */
export async function exportFile(
  ctx: ExportStorageContext,
  access: FederationAccess,
  exportId: number,
  file: ExportFile,
  now = new Date(),
) {
  const row = await ctx.db
    .selectFrom('research_exports')
    .select(['id', 'user_id', 'storage_key', 'expires_at', 'counts'])
    .where('id', '=', exportId)
    .where('federation_id', '=', access.federation.id)
    .executeTakeFirst();
  if (!row || row.user_id === null || row.user_id !== access.userId) throw notFound(`Export ${exportId}`);
  const dir = exportsDirectory(ctx);
  const gone = () =>
    new HttpError(
      410,
      'gone',
      `Export ${exportId} expired on ${row.expires_at.slice(0, 10)}: exports can be downloaded for ${EXPORT_KEEP_DAYS} days; build it again`,
    );
  if (row.storage_key === null) throw gone();
  if (Date.parse(row.expires_at) <= now.getTime()) {
    await removeExportFiles(dir, row.id, row.storage_key);
    await ctx.db
      .updateTable('research_exports')
      .set({ storage_key: null, stored_bytes: 0, removed_at: now.toISOString() })
      .where('id', '=', row.id)
      .execute();
    throw gone();
  }
  const gzipPath = exportFilePath(dir, row.id, row.storage_key, file);
  const stat = await fs.promises.stat(gzipPath).catch(() => null);
  if (!stat) throw new HttpError(410, 'gone', `The files of export ${exportId} are no longer on the server; build it again`);
  await audit(ctx.db, {
    federationId: access.federation.id,
    userId: access.userId,
    action: 'export.download',
    entity: 'research_export',
    entityId: exportId,
    detail: { file, rows: (JSON.parse(row.counts) as ExportCounts).rows },
  });
  const suffix = file === 'csv' ? '.csv' : file === 'json' ? '.json' : '-dictionary.json';
  return { gzipPath, gzipBytes: stat.size, mediaType: MEDIA_TYPES[file], fileName: `research-export-${exportId}${suffix}` };
}

export async function settingsView(db: Db, federationId: number): Promise<ExportSettingsView> {
  const settings = await exportSettings(db, federationId);
  return {
    minAthletes: settings.minAthletes,
    maxExportsPerDay: settings.maxExportsPerDay,
    maxStoredMegabytes: settings.maxStoredMegabytes,
    studies: await listStudies(db, federationId, false),
  };
}

export async function updateSettings(db: Db, access: FederationAccess, next: ExportSettings): Promise<ExportSettingsView> {
  const before = await exportSettings(db, access.federation.id);
  await db.transaction().execute(async (trx) => {
    await trx
      .updateTable('research_export_settings')
      .set({
        min_athletes: next.minAthletes,
        max_exports_per_day: next.maxExportsPerDay ?? before.maxExportsPerDay,
        max_stored_megabytes: next.maxStoredMegabytes ?? before.maxStoredMegabytes,
        updated_at: new Date().toISOString(),
        updated_by: access.userId,
      })
      .where('federation_id', '=', access.federation.id)
      .execute();
    const detail: Record<string, { from: number; to: number }> = { minAthletes: { from: before.minAthletes, to: next.minAthletes } };
    if (next.maxExportsPerDay !== undefined) detail.maxExportsPerDay = { from: before.maxExportsPerDay, to: next.maxExportsPerDay };
    if (next.maxStoredMegabytes !== undefined) detail.maxStoredMegabytes = { from: before.maxStoredMegabytes, to: next.maxStoredMegabytes };
    await audit(trx, {
      federationId: access.federation.id,
      userId: access.userId,
      action: 'export.settings',
      entity: 'research_export_settings',
      entityId: access.federation.id,
      detail,
    });
  });
  return settingsView(db, access.federation.id);
}

export async function createStudy(db: Db, access: FederationAccess, input: { name: string; purpose?: string }): Promise<StudyView> {
  const taken = await db
    .selectFrom('research_studies')
    .select('id')
    .where('federation_id', '=', access.federation.id)
    .where('name', '=', input.name)
    .executeTakeFirst();
  if (taken) throw new HttpError(409, 'conflict', `A study named "${input.name}" already exists`, [{ path: 'name', message: 'is taken' }]);
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .insertInto('research_studies')
      .values({
        federation_id: access.federation.id,
        name: input.name,
        purpose: input.purpose || null,
        salt: randomSecret(),
        created_by: access.userId,
      })
      .returningAll()
      .executeTakeFirstOrThrow();
    await audit(trx, {
      federationId: access.federation.id,
      userId: access.userId,
      action: 'export.study.create',
      entity: 'research_study',
      entityId: row.id,
      detail: { name: row.name },
    });
    return studyView(row);
  });
}

export async function closeStudy(db: Db, access: FederationAccess, studyId: number): Promise<StudyView> {
  const row = await db
    .selectFrom('research_studies')
    .selectAll()
    .where('id', '=', studyId)
    .where('federation_id', '=', access.federation.id)
    .executeTakeFirst();
  if (!row) throw notFound(`Study ${studyId}`);
  if (row.closed_at) return studyView(row);
  return db.transaction().execute(async (trx) => {
    const closed = await trx
      .updateTable('research_studies')
      .set({ closed_at: new Date().toISOString() })
      .where('id', '=', studyId)
      .returningAll()
      .executeTakeFirstOrThrow();
    await audit(trx, {
      federationId: access.federation.id,
      userId: access.userId,
      action: 'export.study.close',
      entity: 'research_study',
      entityId: studyId,
      detail: { name: row.name },
    });
    return studyView(closed);
  });
}

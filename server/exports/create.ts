/**
 * Building one research export, as a callable entry point (`buildExport(ctx, params)`): what a
 * request handler or a worker thread runs with its own database connection.
 *
 * 1. The scope's ratings, without the cells (quarter × kind × category) of fewer than k
 *    athletes (server/services/research-cells.ts): their data never enters an export.
 * 2. A scope of fewer than k athletes is refused (422).
 * 3. In one immediate transaction: the researcher's quota (exports in 24 hours, megabytes kept),
 *    the comparison with every earlier export of the same maker or study (refused when it
 *    differs by 0 < n < k athletes: server/exports/differencing.ts), and the record of the
 *    export and of what it holds.
 * 4. The files rendered, gzip-compressed into the exports folder, and the size checked against
 *    the quota; then the row names its files and the audit log records it. On any failure the
 *    files and the row are removed again.
 */
import { sql, type Selectable } from 'kysely';
import type { ExportCounts, ExportRequest } from '../../shared/schemas/exports';
import type { Role, ResearchStudyTable } from '../db/database';
import type { Db } from '../db/connection';
import { HttpError } from '../http/errors';
import { audit } from '../services/audit';
import { cellKey, federationSmallCells, quarterOfIsoDate } from '../services/research-cells';
import { assessmentFingerprints, renderExport } from './build';
import { compareExports, type ExportMember } from './differencing';
import { randomSecret } from './pseudonyms';
import { exportSettings, scopeRatings } from './scope';
import { exportsDirectory, newStorageKey, removeExportFiles, writeExportFiles, type ExportStorageContext } from './storage';

/** Days an export's files can be downloaded again by its maker. */
export const EXPORT_KEEP_DAYS = 7;
const DAY_MS = 86_400_000;
const MB = 1024 * 1024;

export interface BuildExportParams {
  federation: { id: number; name: string; scaleMin: number; scaleMax: number };
  userId: number;
  role: Role;
  request: ExportRequest;
  now?: Date;
}

export interface BuildExportResult {
  exportId: number;
  createdAt: string;
  expiresAt: string;
  minAthletes: number;
  study: { id: number; name: string } | null;
  counts: ExportCounts;
  /** Absolute paths of the gzip-compressed files. */
  files: Record<'csv' | 'json' | 'dictionary', string>;
  storedBytes: number;
  storageKey: string;
}

const quotaError = (message: string) => new HttpError(429, 'rate_limited', message);

function formatMegabytes(bytes: number): string {
  return `${(bytes / MB).toFixed(bytes < 10 * MB ? 1 : 0)} MB`;
}

/** Runs fn inside BEGIN IMMEDIATE … COMMIT on one connection (serialised with every other writer). */
async function immediate<T>(db: Db, fn: (trx: Db) => Promise<T>): Promise<T> {
  return db.connection().execute(async (conn) => {
    await sql`begin immediate`.execute(conn);
    try {
      const result = await fn(conn);
      await sql`commit`.execute(conn);
      return result;
    } catch (error) {
      await sql`rollback`.execute(conn);
      throw error;
    }
  });
}

async function checkQuota(
  trx: Db,
  params: BuildExportParams,
  limits: { maxExportsPerDay: number; maxStoredMegabytes: number },
  now: Date,
): Promise<void> {
  if (params.role !== 'researcher') return;
  const since = new Date(now.getTime() - DAY_MS).toISOString();
  const recent = await trx
    .selectFrom('research_exports')
    .select(['created_at'])
    .where('federation_id', '=', params.federation.id)
    .where('user_id', '=', params.userId)
    .where('created_at', '>', since)
    .orderBy('created_at')
    .execute();
  if (recent.length >= limits.maxExportsPerDay) {
    const next = new Date(Date.parse(recent[0].created_at) + DAY_MS);
    throw quotaError(
      `You have made ${recent.length} exports in the last 24 hours, the most your federation's lead allows a researcher (${limits.maxExportsPerDay} a day). ` +
        `The next one is possible from ${next.toISOString().slice(11, 16)} UTC.`,
    );
  }
  const used = await storedBytesOf(trx, params.federation.id, params.userId);
  if (used >= limits.maxStoredMegabytes * MB) {
    throw quotaError(
      `Your exports take ${formatMegabytes(used)} of the ${limits.maxStoredMegabytes} MB your federation's lead allows a researcher to keep. ` +
        `Files are removed ${EXPORT_KEEP_DAYS} days after an export is made; build again after an older export has expired.`,
    );
  }
}

async function storedBytesOf(db: Db, federationId: number, userId: number): Promise<number> {
  const row = await db
    .selectFrom('research_exports')
    .select((eb) => eb.fn.coalesce(eb.fn.sum<number>('stored_bytes'), eb.lit(0)).as('bytes'))
    .where('federation_id', '=', federationId)
    .where('user_id', '=', userId)
    .where('storage_key', 'is not', null)
    .executeTakeFirstOrThrow();
  return Number(row.bytes);
}

/**
 * Refuses an export whose data differ from an earlier one of the same maker or study by
 * 0 < n < k athletes, or that shares identical assessments of 0 < n < k athletes with it.
 */
async function checkDifferencing(
  trx: Db,
  params: BuildExportParams,
  study: Selectable<ResearchStudyTable> | undefined,
  members: readonly ExportMember[],
  k: number,
): Promise<void> {
  const earlier = await trx
    .selectFrom('research_exports')
    .select(['id', 'user_id', 'study_id', 'counts', 'created_at'])
    .where('federation_id', '=', params.federation.id)
    .where((eb) => (study ? eb.or([eb('user_id', '=', params.userId), eb('study_id', '=', study.id)]) : eb('user_id', '=', params.userId)))
    .orderBy('id', 'desc')
    .execute();
  for (const row of earlier) {
    const theirs = await trx
      .selectFrom('research_export_assessments')
      .select(['assessment_id as assessmentId', 'athlete_id as athleteId', 'fingerprint'])
      .where('export_id', '=', row.id)
      .execute();
    const compared = compareExports(members, theirs);
    const differing = compared.differing.size;
    const shared = compared.shared.size;
    const which =
      row.user_id === params.userId
        ? `your export ${row.id} (made ${row.created_at.slice(0, 10)})`
        : `an earlier export of the study "${study!.name}"`;
    if (shared > 0 && shared < k) {
      throw new HttpError(
        422,
        'validation_failed',
        `This export would share the same assessments of ${shared} athlete${shared === 1 ? '' : 's'} only with ${which}, fewer than k = ${k}: ` +
          `set side by side, the two would single ${shared === 1 ? 'that athlete' : 'those athletes'} out. Choose a scope that overlaps it by at least ${k} athletes or not at all.`,
        [{ path: 'scope', message: `shares ${shared} athletes with an earlier export (fewer than k = ${k})` }],
      );
    }
    if (differing === 0 || differing >= k) continue;
    throw new HttpError(
      422,
      'validation_failed',
      `This export would differ from ${which} by ${differing} athlete${differing === 1 ? '' : 's'} only, fewer than k = ${k}: ` +
        `set side by side, the two would single ${differing === 1 ? 'that athlete' : 'those athletes'} out. ` +
        `Choose a scope that differs by at least ${k} athletes${row.user_id === params.userId ? `, or download export ${row.id} again while it is kept` : ''}.`,
      [{ path: 'scope', message: `differs from an earlier export by ${differing} athletes (fewer than k = ${k})` }],
    );
  }
}

/**
 * Builds an export end to end and returns where its files are. Throws HttpError for a refused
 * request (closed or unknown study 409/400, scope below k 422, differencing 422, quota 429).
 */
export async function buildExport(ctx: ExportStorageContext, params: BuildExportParams): Promise<BuildExportResult> {
  const { db } = ctx;
  const { federation, request } = params;
  const now = params.now ?? new Date();
  const settings = await exportSettings(db, federation.id);
  const k = settings.minAthletes;

  let study: Selectable<ResearchStudyTable> | undefined;
  if (request.studyId !== undefined && request.studyId !== null) {
    study = await db
      .selectFrom('research_studies')
      .selectAll()
      .where('id', '=', request.studyId)
      .where('federation_id', '=', federation.id)
      .executeTakeFirst();
    if (!study)
      throw new HttpError(400, 'validation_failed', 'The export request is not valid', [
        { path: 'studyId', message: `Study ${request.studyId} does not exist in this federation` },
      ]);
    if (study.closed_at) throw new HttpError(409, 'conflict', `The study "${study.name}" is closed: its stable key can no longer be used`);
  }

  // 1. Only whole cells of at least k athletes.
  const small = await federationSmallCells(db, federation.id, k);
  const ratings = (await scopeRatings(db, federation.id, request.scope)).filter(
    (r) => !small.has(cellKey(quarterOfIsoDate(r.assessedOn), r.kind, r.category)),
  );
  const athletes = new Set(ratings.map((r) => r.athleteRowId)).size;
  if (athletes < k) {
    throw new HttpError(422, 'validation_failed', `The scope holds ${athletes} athletes, fewer than k = ${k}: widen it`, [
      { path: 'scope', message: `fewer than ${k} athletes` },
    ]);
  }
  const fingerprints = assessmentFingerprints(ratings);
  const members: ExportMember[] = [];
  const seen = new Set<number>();
  for (const r of ratings) {
    if (seen.has(r.assessmentRowId)) continue;
    seen.add(r.assessmentRowId);
    members.push({ assessmentId: r.assessmentRowId, athleteId: r.athleteRowId, fingerprint: fingerprints.get(r.assessmentKey)! });
  }

  // 3. Quota, differencing and the record, serialised with every other export.
  const createdAt = now.toISOString();
  const expiresAt = new Date(now.getTime() + EXPORT_KEEP_DAYS * DAY_MS).toISOString();
  const exportId = await immediate(db, async (trx) => {
    await checkQuota(trx, params, settings, now);
    await checkDifferencing(trx, params, study, members, k);
    const inserted = await trx
      .insertInto('research_exports')
      .values({
        federation_id: federation.id,
        user_id: params.userId,
        study_id: study?.id ?? null,
        request: JSON.stringify(request),
        min_athletes: k,
        counts: JSON.stringify({ athletes }),
        created_at: createdAt,
        expires_at: expiresAt,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    for (let i = 0; i < members.length; i += 500) {
      const chunk = members
        .slice(i, i + 500)
        .map((m) => ({ export_id: inserted.id, assessment_id: m.assessmentId, athlete_id: m.athleteId, fingerprint: m.fingerprint }));
      await trx.insertInto('research_export_assessments').values(chunk).execute();
    }
    return inserted.id;
  });

  // 4. Files.
  const dir = exportsDirectory(ctx);
  const storageKey = newStorageKey();
  try {
    const built = renderExport({
      federation: { name: federation.name, scale: { min: federation.scaleMin, max: federation.scaleMax } },
      exportId,
      exportedAt: createdAt,
      request,
      k,
      key: settings.key,
      salt: study?.salt ?? randomSecret(),
      study: study ? { name: study.name } : null,
      ratings,
    });
    const written = await writeExportFiles(dir, exportId, storageKey, { csv: built.csv, json: built.json, dictionary: built.dictionary });
    if (params.role === 'researcher') {
      const used = await storedBytesOf(db, federation.id, params.userId);
      if (used + written.bytes > settings.maxStoredMegabytes * MB) {
        throw quotaError(
          `This export takes ${formatMegabytes(written.bytes)} compressed; with the ${formatMegabytes(used)} your exports already take, it would pass the ` +
            `${settings.maxStoredMegabytes} MB your federation's lead allows a researcher to keep. Narrow the scope or wait until an older export expires.`,
        );
      }
    }
    await db.transaction().execute(async (trx) => {
      await trx
        .updateTable('research_exports')
        .set({ counts: JSON.stringify(built.counts), storage_key: storageKey, stored_bytes: written.bytes })
        .where('id', '=', exportId)
        .execute();
      await audit(trx, {
        federationId: federation.id,
        userId: params.userId,
        action: 'export.create',
        entity: 'research_export',
        entityId: exportId,
        detail: {
          scope: request.scope,
          fields: request.fields,
          dateMode: request.dateMode,
          studyId: study?.id ?? null,
          k,
          rows: built.counts.rows,
          suppressed: built.counts.suppressed,
          bytes: written.bytes,
        },
      });
    });
    return {
      exportId,
      createdAt,
      expiresAt,
      minAthletes: k,
      study: study ? { id: study.id, name: study.name } : null,
      counts: built.counts,
      files: written.paths,
      storedBytes: written.bytes,
      storageKey,
    };
  } catch (error) {
    await removeExportFiles(dir, exportId, storageKey);
    await db.deleteFrom('research_export_assessments').where('export_id', '=', exportId).execute();
    await db.deleteFrom('research_exports').where('id', '=', exportId).execute();
    throw error;
  }
}

import { sql } from 'kysely';
import type { ExportCounts, ExportFile, ExportOptions, ExportRequest, ExportSettingsView, ExportView, StudyView } from '../../shared/schemas/exports';
import type { FederationAccess } from '../auth/access';
import type { Db } from '../db/connection';
import type { ResearchStudyTable } from '../db/database';
import { HttpError, notFound } from '../http/errors';
import { audit } from '../services/audit';
import type { Selectable } from 'kysely';
import { buildExport, seasonOf, type SourceRating } from './build';
import { randomSecret } from './pseudonyms';

/** Days an export's files can be downloaded again by its maker. */
export const EXPORT_KEEP_DAYS = 7;
export const DEFAULT_MIN_ATHLETES = 5;

const DAY_MS = 86_400_000;

/** The federation's export settings, created with a fresh pseudonym key on first use. */
export async function exportSettings(db: Db, federationId: number): Promise<{ key: Uint8Array; minAthletes: number }> {
  await db
    .insertInto('research_export_settings')
    .values({ federation_id: federationId, pseudonym_key: randomSecret(), min_athletes: DEFAULT_MIN_ATHLETES })
    .onConflict((oc) => oc.column('federation_id').doNothing())
    .execute();
  const row = await db.selectFrom('research_export_settings').select(['pseudonym_key', 'min_athletes']).where('federation_id', '=', federationId).executeTakeFirstOrThrow();
  return { key: new Uint8Array(Buffer.from(row.pseudonym_key, 'hex')), minAthletes: row.min_athletes };
}

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
  const levels = await db.selectFrom('events').select('level').distinct().where('federation_id', '=', federationId).orderBy('level').execute();
  const withoutEvent = await db.selectFrom('assessments').select('id').where('federation_id', '=', federationId).where('event_id', 'is', null).limit(1).executeTakeFirst();
  const categories = await db.selectFrom('athletes').select('category').distinct().where('federation_id', '=', federationId).orderBy('category').execute();
  const events =
    access.role === 'lead'
      ? (await db.selectFrom('events').select(['id', 'code', 'name', 'starts_on', 'level']).where('federation_id', '=', federationId).orderBy('starts_on').orderBy('code').execute()).map((e) => ({
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
    kinds: ['first', 'review', 'protest'],
    events,
    minAthletes: settings.minAthletes,
    studies: await listStudies(db, federationId, true),
  };
}

/** The level offered for assessments recorded without an event. */
export const NO_EVENT_LEVEL = '(no event)';

/** The ratings of an export's scope, with identities (server-side only). */
export async function scopeRatings(db: Db, federationId: number, scope: ExportRequest['scope']): Promise<SourceRating[]> {
  const levels = scope.eventLevels.filter((l) => l !== NO_EVENT_LEVEL);
  const includeNoEvent = scope.eventLevels.includes(NO_EVENT_LEVEL) && !(scope.eventIds && scope.eventIds.length > 0);
  let query = db
    .selectFrom('ratings')
    .innerJoin('assessments', 'assessments.id', 'ratings.assessment_id')
    .innerJoin('athletes', 'athletes.id', 'assessments.athlete_id')
    .innerJoin('classifiers', 'classifiers.id', 'ratings.classifier_id')
    .leftJoin('events', 'events.id', 'assessments.event_id')
    .select([
      'assessments.external_id as assessmentKey',
      'athletes.code as athleteKey',
      'events.code as eventKey',
      'classifiers.code as classifierKey',
      'assessments.assessed_on as assessedOn',
      'assessments.kind as kind',
      'athletes.category as category',
      'events.level as eventLevel',
      'ratings.sport_class as sportClass',
      'assessments.panel_class as panelClass',
    ])
    .where('assessments.federation_id', '=', federationId)
    .where('assessments.kind', 'in', scope.kinds)
    .where('athletes.category', 'in', scope.categories)
    .where((eb) => {
      const parts = [];
      if (levels.length > 0) parts.push(eb('events.level', 'in', levels));
      if (includeNoEvent) parts.push(eb('assessments.event_id', 'is', null));
      return parts.length > 0 ? eb.or(parts) : eb.val(false);
    });
  if (scope.eventIds && scope.eventIds.length > 0) query = query.where('assessments.event_id', 'in', scope.eventIds);
  const rows = await query.orderBy('assessments.id').orderBy('ratings.id').execute();
  const seasons = new Set(scope.seasons);
  return rows.filter((r) => seasons.has(seasonOf(r.assessedOn))) as SourceRating[];
}

function exportView(row: {
  id: number;
  created_at: string;
  expires_at: string;
  request: string;
  min_athletes: number;
  counts: string;
  csv: string | null;
  study_id: number | null;
  study_name: string | null;
}, federationSlug: string, now: Date): ExportView {
  const expired = Date.parse(row.expires_at) <= now.getTime() || row.csv === null;
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
    files: expired ? {} : { csv: `${base}/csv`, json: `${base}/json`, dictionary: `${base}/dictionary` },
  };
}

/**
 * Builds an export, stores its files for EXPORT_KEEP_DAYS and records it in the audit log, in
 * one transaction. The per-export salt is used and forgotten.
 */
export async function createExport(db: Db, access: FederationAccess, request: ExportRequest, now = new Date()): Promise<ExportView> {
  const federationId = access.federation.id;
  if (access.role !== 'lead' && request.scope.eventIds && request.scope.eventIds.length > 0) {
    throw new HttpError(403, 'forbidden', 'Researchers choose events by season and level, not one by one', [{ path: 'scope.eventIds', message: 'Only a lead may choose individual events' }]);
  }
  const settings = await exportSettings(db, federationId);
  let study: Selectable<ResearchStudyTable> | undefined;
  if (request.studyId !== undefined && request.studyId !== null) {
    study = await db.selectFrom('research_studies').selectAll().where('id', '=', request.studyId).where('federation_id', '=', federationId).executeTakeFirst();
    if (!study) throw new HttpError(400, 'validation_failed', 'The export request is not valid', [{ path: 'studyId', message: `Study ${request.studyId} does not exist in this federation` }]);
    if (study.closed_at) throw new HttpError(409, 'conflict', `The study "${study.name}" is closed: its stable key can no longer be used`);
  }
  const ratings = await scopeRatings(db, federationId, request.scope);
  const athletes = new Set(ratings.map((r) => r.athleteKey)).size;
  if (athletes < settings.minAthletes) {
    throw new HttpError(422, 'validation_failed', `The scope holds ${athletes} athletes, fewer than k = ${settings.minAthletes}: widen it`, [
      { path: 'scope', message: `fewer than ${settings.minAthletes} athletes` },
    ]);
  }

  // The files are built outside any transaction (a large export takes seconds, and a write
  // transaction would hold SQLite's one write lock all along): the export's id is reserved
  // first, and the row is written with its files in one short transaction at the end.
  const exportId = await reserveExportId(db);
  const createdAt = now.toISOString();
  const expiresAt = new Date(now.getTime() + EXPORT_KEEP_DAYS * DAY_MS).toISOString();
  const built = buildExport({
    federation: { name: access.federation.name, scale: { min: access.federation.scaleMin, max: access.federation.scaleMax } },
    exportId,
    exportedAt: createdAt,
    request,
    k: settings.minAthletes,
    key: settings.key,
    salt: study?.salt ?? randomSecret(),
    study: study ? { name: study.name } : null,
    ratings,
  });
  return db.transaction().execute(async (trx) => {
    await trx
      .insertInto('research_exports')
      .values({
        id: exportId,
        federation_id: federationId,
        user_id: access.userId,
        study_id: study?.id ?? null,
        request: JSON.stringify(request),
        min_athletes: settings.minAthletes,
        created_at: createdAt,
        expires_at: expiresAt,
        counts: JSON.stringify(built.counts),
        csv: built.csv,
        json: built.json,
        dictionary: built.dictionary,
      })
      .execute();
    await audit(trx, {
      federationId,
      userId: access.userId,
      action: 'export.create',
      entity: 'research_export',
      entityId: exportId,
      detail: { scope: request.scope, fields: request.fields, dateMode: request.dateMode, studyId: study?.id ?? null, k: settings.minAthletes, rows: built.counts.rows, suppressed: built.counts.suppressed },
    });
    return exportView(
      { id: exportId, created_at: createdAt, expires_at: expiresAt, request: JSON.stringify(request), min_athletes: settings.minAthletes, counts: JSON.stringify(built.counts), csv: built.csv, study_id: study?.id ?? null, study_name: study?.name ?? null },
      access.federation.slug,
      now,
    );
  });
}

/**
 * Takes the next id of research_exports without writing a row (SQLite's AUTOINCREMENT counter in
 * sqlite_sequence moves; an id reserved and not used is simply skipped).
 */
async function reserveExportId(db: Db): Promise<number> {
  // Single statements, each atomic, so that two connections never take the same id.
  for (let attempt = 0; attempt < 5; attempt++) {
    const moved = await sql<{ seq: number }>`update sqlite_sequence set seq = seq + 1 where name = 'research_exports' returning seq`.execute(db);
    if (moved.rows[0]) return moved.rows[0].seq;
    const first = await sql<{ seq: number }>`insert into sqlite_sequence (name, seq)
      select 'research_exports', coalesce(max(id), 0) + 1 from research_exports
       where not exists (select 1 from sqlite_sequence where name = 'research_exports')
      returning seq`.execute(db);
    if (first.rows[0]) return first.rows[0].seq;
  }
  throw new Error('Could not reserve an id for the research export');
}

/** Clears the files of expired exports of a federation (the rows stay as the record). */
async function clearExpired(db: Db, federationId: number, now: Date): Promise<void> {
  await db
    .updateTable('research_exports')
    .set({ csv: null, json: null, dictionary: null })
    .where('federation_id', '=', federationId)
    .where('expires_at', '<=', now.toISOString())
    .where('csv', 'is not', null)
    .execute();
}

/** The caller's own exports, newest first. */
export async function listMyExports(db: Db, access: FederationAccess, now = new Date()): Promise<ExportView[]> {
  await clearExpired(db, access.federation.id, now);
  const rows = await db
    .selectFrom('research_exports')
    .leftJoin('research_studies', 'research_studies.id', 'research_exports.study_id')
    .select([
      'research_exports.id',
      'research_exports.created_at',
      'research_exports.expires_at',
      'research_exports.request',
      'research_exports.min_athletes',
      'research_exports.counts',
      sql<string | null>`case when research_exports.csv is null then null else '' end`.as('csv'),
      'research_exports.study_id',
      'research_studies.name as study_name',
    ])
    .where('research_exports.federation_id', '=', access.federation.id)
    .where('research_exports.user_id', '=', access.userId)
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

/** One stored file of the caller's own export; 404 for anyone else's, 410 once expired. */
export async function exportFile(db: Db, access: FederationAccess, exportId: number, file: ExportFile, now = new Date()) {
  const row = await db
    .selectFrom('research_exports')
    .select(['id', 'user_id', 'csv', 'json', 'dictionary', 'expires_at', 'counts'])
    .where('id', '=', exportId)
    .where('federation_id', '=', access.federation.id)
    .executeTakeFirst();
  if (!row || row.user_id === null || row.user_id !== access.userId) throw notFound(`Export ${exportId}`);
  const content = row[file];
  if (Date.parse(row.expires_at) <= now.getTime() || content === null) {
    await clearExpired(db, access.federation.id, now);
    throw new HttpError(410, 'gone', `Export ${exportId} expired on ${row.expires_at.slice(0, 10)}: exports can be downloaded for ${EXPORT_KEEP_DAYS} days; build it again`);
  }
  await audit(db, {
    federationId: access.federation.id,
    userId: access.userId,
    action: 'export.download',
    entity: 'research_export',
    entityId: exportId,
    detail: { file, rows: (JSON.parse(row.counts) as ExportCounts).rows },
  });
  const suffix = file === 'csv' ? '.csv' : file === 'json' ? '.json' : '-dictionary.json';
  return { content, mediaType: MEDIA_TYPES[file], fileName: `research-export-${exportId}${suffix}` };
}

export async function settingsView(db: Db, federationId: number): Promise<ExportSettingsView> {
  const settings = await exportSettings(db, federationId);
  return { minAthletes: settings.minAthletes, studies: await listStudies(db, federationId, false) };
}

export async function updateSettings(db: Db, access: FederationAccess, minAthletes: number): Promise<ExportSettingsView> {
  const before = await exportSettings(db, access.federation.id);
  await db.transaction().execute(async (trx) => {
    await trx
      .updateTable('research_export_settings')
      .set({ min_athletes: minAthletes, updated_at: new Date().toISOString(), updated_by: access.userId })
      .where('federation_id', '=', access.federation.id)
      .execute();
    await audit(trx, { federationId: access.federation.id, userId: access.userId, action: 'export.settings', entity: 'research_export_settings', entityId: access.federation.id, detail: { minAthletes: { from: before.minAthletes, to: minAthletes } } });
  });
  return settingsView(db, access.federation.id);
}

export async function createStudy(db: Db, access: FederationAccess, input: { name: string; purpose?: string }): Promise<StudyView> {
  const taken = await db.selectFrom('research_studies').select('id').where('federation_id', '=', access.federation.id).where('name', '=', input.name).executeTakeFirst();
  if (taken) throw new HttpError(409, 'conflict', `A study named "${input.name}" already exists`, [{ path: 'name', message: 'is taken' }]);
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .insertInto('research_studies')
      .values({ federation_id: access.federation.id, name: input.name, purpose: input.purpose || null, salt: randomSecret(), created_by: access.userId })
      .returningAll()
      .executeTakeFirstOrThrow();
    await audit(trx, { federationId: access.federation.id, userId: access.userId, action: 'export.study.create', entity: 'research_study', entityId: row.id, detail: { name: row.name } });
    return studyView(row);
  });
}

export async function closeStudy(db: Db, access: FederationAccess, studyId: number): Promise<StudyView> {
  const row = await db.selectFrom('research_studies').selectAll().where('id', '=', studyId).where('federation_id', '=', access.federation.id).executeTakeFirst();
  if (!row) throw notFound(`Study ${studyId}`);
  if (row.closed_at) return studyView(row);
  return db.transaction().execute(async (trx) => {
    const closed = await trx.updateTable('research_studies').set({ closed_at: new Date().toISOString() }).where('id', '=', studyId).returningAll().executeTakeFirstOrThrow();
    await audit(trx, { federationId: access.federation.id, userId: access.userId, action: 'export.study.close', entity: 'research_study', entityId: studyId, detail: { name: row.name } });
    return studyView(closed);
  });
}

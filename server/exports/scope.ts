/**
 * What an export reads: the federation's export settings and the ratings of a scope.
 */
import type { ExportRequest } from '../../shared/schemas/exports';
import type { Db } from '../db/connection';
import { DEFAULT_MIN_ATHLETES } from '../services/research-cells';
import { seasonOf, type SourceRating } from './build';
import { randomSecret } from './pseudonyms';

export interface ExportSettingsRow {
  key: Uint8Array;
  minAthletes: number;
  maxExportsPerDay: number;
  maxStoredMegabytes: number;
}

/** A rating of a scope, with the database ids of its assessment and athlete (server-side only). */
export type ScopedRating = SourceRating & { assessmentRowId: number; athleteRowId: number };

/** The federation's export settings, created with a fresh pseudonym key on first use. */
export async function exportSettings(db: Db, federationId: number): Promise<ExportSettingsRow> {
  await db
    .insertInto('research_export_settings')
    .values({ federation_id: federationId, pseudonym_key: randomSecret(), min_athletes: DEFAULT_MIN_ATHLETES })
    .onConflict((oc) => oc.column('federation_id').doNothing())
    .execute();
  const row = await db
    .selectFrom('research_export_settings')
    .select(['pseudonym_key', 'min_athletes', 'max_exports_per_day', 'max_stored_megabytes'])
    .where('federation_id', '=', federationId)
    .executeTakeFirstOrThrow();
  return {
    key: new Uint8Array(Buffer.from(row.pseudonym_key, 'hex')),
    minAthletes: row.min_athletes,
    maxExportsPerDay: row.max_exports_per_day,
    maxStoredMegabytes: row.max_stored_megabytes,
  };
}

/** The level offered for assessments recorded without an event. */
export const NO_EVENT_LEVEL = '(no event)';

/** The ratings of an export's scope, with identities (server-side only). */
export async function scopeRatings(db: Db, federationId: number, scope: ExportRequest['scope']): Promise<ScopedRating[]> {
  const levels = scope.eventLevels.filter((l) => l !== NO_EVENT_LEVEL);
  const includeNoEvent = scope.eventLevels.includes(NO_EVENT_LEVEL) && !(scope.eventIds && scope.eventIds.length > 0);
  let query = db
    .selectFrom('ratings')
    .innerJoin('assessments', 'assessments.id', 'ratings.assessment_id')
    .innerJoin('athletes', 'athletes.id', 'assessments.athlete_id')
    .innerJoin('classifiers', 'classifiers.id', 'ratings.classifier_id')
    .leftJoin('events', 'events.id', 'assessments.event_id')
    .select([
      'assessments.id as assessmentRowId',
      'athletes.id as athleteRowId',
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
  return rows.filter((r) => seasons.has(seasonOf(r.assessedOn)));
}

import type { Db } from '../db/connection';
import type BetterSqlite3 from 'better-sqlite3';
import { hashPassword } from '../auth/password';
import { seedDemoExercises } from './exercises';
import { DEMO_SCENARIO, generateScenario, SECOND_DEMO_SCENARIO, type Scenario } from './generator';

export const DEMO_PASSWORD = 'panelwise-demo';

export const DEMO_ACCOUNTS = [
  { email: 'lead@demo.panelwise.test', displayName: 'Demo Lead', role: 'lead' as const },
  { email: 'classifier@demo.panelwise.test', displayName: 'Demo Classifier', role: 'classifier' as const, classifierCode: 'C12' },
  { email: 'researcher@demo.panelwise.test', displayName: 'Demo Researcher', role: 'researcher' as const },
];
export const DEMO_OWNER = { email: 'owner@demo.panelwise.test', displayName: 'Site Owner' };

/**
 * Writes a scenario as one committed import of source "seed", in one transaction, with
 * prepared statements. Returns the federation's id.
 */
export function writeScenario(sqlite: BetterSqlite3.Database, scenario: Scenario, userId: number | null = null): number {
  const run = sqlite.transaction(() => {
    const { federation } = scenario;
    const federationId = Number(
      sqlite
        .prepare('insert into federations (slug, name, scale_min, scale_max) values (?, ?, ?, ?)')
        .run(federation.slug, federation.name, federation.scale.min, federation.scale.max).lastInsertRowid,
    );
    const importId = Number(
      sqlite
        .prepare(
          "insert into imports (federation_id, user_id, source, file_name, status, counts, committed_at) values (?, ?, 'seed', 'demo scenario', 'committed', ?, strftime('%Y-%m-%dT%H:%M:%fZ','now'))",
        )
        .run(
          federationId,
          userId,
          JSON.stringify({
            assessments: scenario.assessments.length,
            ratings: scenario.assessments.reduce((n, a) => n + a.ratings.length, 0),
          }),
        ).lastInsertRowid,
    );
    const insertClassifier = sqlite.prepare(
      'insert into classifiers (federation_id, code, display_name, certification_level, import_id) values (?, ?, ?, ?, ?)',
    );
    const classifierIds = new Map<string, number>();
    for (const c of scenario.classifiers) {
      classifierIds.set(
        c.code,
        Number(insertClassifier.run(federationId, c.code, c.displayName, c.certificationLevel, importId).lastInsertRowid),
      );
    }
    const insertAthlete = sqlite.prepare(
      'insert into athletes (federation_id, code, display_name, category, import_id) values (?, ?, ?, ?, ?)',
    );
    const athleteIds = new Map<string, number>();
    for (const a of scenario.athletes)
      athleteIds.set(a.code, Number(insertAthlete.run(federationId, a.code, a.displayName, a.category, importId).lastInsertRowid));
    const insertEvent = sqlite.prepare(
      'insert into events (federation_id, code, name, starts_on, ends_on, level, import_id) values (?, ?, ?, ?, ?, ?, ?)',
    );
    const eventIds = new Map<string, number>();
    for (const e of scenario.events)
      eventIds.set(e.code, Number(insertEvent.run(federationId, e.code, e.name, e.startsOn, e.endsOn, e.level, importId).lastInsertRowid));
    const insertAssessment = sqlite.prepare(
      'insert into assessments (federation_id, external_id, athlete_id, event_id, assessed_on, kind, panel_class, import_id) values (?, ?, ?, ?, ?, ?, ?, ?)',
    );
    const insertRating = sqlite.prepare('insert into ratings (assessment_id, classifier_id, sport_class, import_id) values (?, ?, ?, ?)');
    for (const a of scenario.assessments) {
      const assessmentId = Number(
        insertAssessment.run(
          federationId,
          a.externalId,
          athleteIds.get(a.athleteCode),
          eventIds.get(a.eventCode),
          a.assessedOn,
          a.kind,
          a.panelClass,
          importId,
        ).lastInsertRowid,
      );
      for (const r of a.ratings) insertRating.run(assessmentId, classifierIds.get(r.classifierCode), r.sportClass, importId);
    }
    return federationId;
  });
  return run.immediate();
}

async function ensureUser(db: Db, email: string, displayName: string, passwordHash: string, isOwner = false): Promise<number> {
  const existing = await db.selectFrom('users').select('id').where('email', '=', email).executeTakeFirst();
  if (existing) return existing.id;
  const row = await db
    .insertInto('users')
    .values({ email, display_name: displayName, password_hash: passwordHash, is_owner: isOwner ? 1 : 0 })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

/** Whether the database holds no federation yet (a fresh install). */
export async function isEmpty(db: Db): Promise<boolean> {
  const row = await db
    .selectFrom('federations')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .executeTakeFirstOrThrow();
  return Number(row.n) === 0;
}

/**
 * Seeds the invented demo: the Kestrel Coast federation (about 300 athletes, 20 classifiers,
 * 2,000 assessments over four seasons), a small second federation, and the demo accounts, all
 * with the password `panelwise-demo`.
 */
export async function seedDemo(db: Db, sqlite: BetterSqlite3.Database): Promise<{ federationId: number }> {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const ownerId = await ensureUser(db, DEMO_OWNER.email, DEMO_OWNER.displayName, passwordHash, true);
  const federationId = writeScenario(sqlite, generateScenario(DEMO_SCENARIO), ownerId);
  const secondId = writeScenario(sqlite, generateScenario(SECOND_DEMO_SCENARIO), ownerId);
  let leadUserId: number | null = null;
  for (const account of DEMO_ACCOUNTS) {
    const userId = await ensureUser(db, account.email, account.displayName, passwordHash);
    await db.insertInto('memberships').values({ user_id: userId, federation_id: federationId, role: account.role }).execute();
    if (account.role === 'classifier') {
      await db
        .updateTable('classifiers')
        .set({ user_id: userId })
        .where('federation_id', '=', federationId)
        .where('code', '=', account.classifierCode)
        .execute();
    }
    if (account.role === 'lead') leadUserId = userId;
    // The lead also reads the second federation's figures, to show membership of several federations.
    if (account.role === 'lead')
      await db.insertInto('memberships').values({ user_id: userId, federation_id: secondId, role: 'researcher' }).execute();
  }
  await seedDemoExercises(db, federationId, leadUserId);
  return { federationId };
}

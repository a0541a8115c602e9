import type { Db } from '../db/connection';

/**
 * The demo's calibration exercises (invented text): one closed with results, on the 2.5/3.0 and
 * 1.0/1.5 boundaries, whose classifiers include the drifting C05 and the conservative C12 (the
 * two the demo's flags point at); and one open exercise assigned to the demo classifier (C12),
 * who has answered one case of five. The open one's dates follow the day of seeding.
 */
interface DemoCase {
  description: string;
  videoUrl: string | null;
  skills: string[];
  reference: number;
}

const CLOSED_CASES: DemoCase[] = [
  {
    description: 'Guard, left-side trunk rotation limited; pushes with a short stroke and stops by leaning back against the backrest.',
    videoUrl: 'https://video.example.invalid/kestrel/practice-01',
    skills: ['pushing', 'stopping', 'rebounding'],
    reference: 6,
  },
  {
    description:
      'Forward, reaches for rebounds above the head with one hand, the other hand on the wheel; recovers slowly after chair contact.',
    videoUrl: 'https://video.example.invalid/kestrel/practice-02',
    skills: ['rebounding', 'chair-contact', 'catching'],
    reference: 5,
  },
  {
    description: 'Centre, dribbles beside the chair with the trunk upright; passes chest-high with both hands without leaning forward.',
    videoUrl: null,
    skills: ['dribbling', 'passing', 'pushing'],
    reference: 6,
  },
  {
    description: 'Guard, no active trunk movement; catches only close to the body and uses the backrest for balance when shooting.',
    videoUrl: 'https://video.example.invalid/kestrel/practice-04',
    skills: ['catching', 'shooting', 'stopping'],
    reference: 2,
  },
  {
    description: 'Guard, partial forward lean with the hands on the wheels; returns upright without using the arms.',
    videoUrl: null,
    skills: ['pushing', 'stopping', 'passing'],
    reference: 3,
  },
  {
    description: 'Forward, rotates the trunk to both sides to pass; leans sideways into contact and stays balanced.',
    videoUrl: 'https://video.example.invalid/kestrel/practice-06',
    skills: ['passing', 'chair-contact', 'shooting'],
    reference: 6,
  },
];

/** Answers per classifier, case by case (half points), with the skills that decided them. */
const CLOSED_ANSWERS: Record<string, { cls: number; skills: string[]; reason: string | null }[]> = {
  C03: [
    { cls: 6, skills: ['pushing', 'rebounding'], reason: 'Rotation is limited, but the stop is controlled.' },
    { cls: 5, skills: ['rebounding', 'chair-contact'], reason: null },
    { cls: 6, skills: ['dribbling', 'passing'], reason: null },
    { cls: 2, skills: ['catching', 'stopping'], reason: null },
    { cls: 3, skills: ['pushing', 'stopping'], reason: null },
    { cls: 6, skills: ['passing', 'chair-contact'], reason: null },
  ],
  C05: [
    { cls: 7, skills: ['pushing'], reason: 'The stroke looks strong enough for the higher class.' },
    { cls: 6, skills: ['rebounding'], reason: 'Reaches high on the rebound.' },
    { cls: 6, skills: ['dribbling'], reason: null },
    { cls: 3, skills: ['catching'], reason: null },
    { cls: 4, skills: ['pushing'], reason: null },
    { cls: 7, skills: ['shooting'], reason: null },
  ],
  C07: [
    { cls: 6, skills: ['stopping', 'rebounding'], reason: null },
    { cls: 5, skills: ['chair-contact'], reason: 'Slow recovery after contact.' },
    { cls: 6, skills: ['passing'], reason: null },
    { cls: 2, skills: ['shooting'], reason: null },
    { cls: 3, skills: ['stopping'], reason: null },
    { cls: 6, skills: ['chair-contact', 'passing'], reason: null },
  ],
  C09: [
    { cls: 5, skills: ['stopping'], reason: 'Leans on the backrest to stop.' },
    { cls: 5, skills: ['chair-contact', 'catching'], reason: null },
    { cls: 6, skills: ['dribbling', 'passing'], reason: null },
    { cls: 2, skills: ['catching'], reason: null },
    { cls: 3, skills: ['pushing'], reason: null },
    { cls: 6, skills: ['passing'], reason: null },
  ],
  C12: [
    { cls: 5, skills: ['stopping'], reason: 'Uses the backrest to stop: the lower class.' },
    { cls: 4, skills: ['chair-contact'], reason: null },
    { cls: 5, skills: ['passing'], reason: 'No forward lean on the pass.' },
    { cls: 2, skills: ['catching'], reason: null },
    { cls: 2, skills: ['stopping'], reason: null },
    { cls: 6, skills: ['passing', 'chair-contact'], reason: null },
  ],
  C14: [
    { cls: 6, skills: ['pushing', 'stopping'], reason: null },
    { cls: 6, skills: ['rebounding'], reason: null },
    { cls: 6, skills: ['dribbling'], reason: null },
    { cls: 2, skills: ['stopping'], reason: null },
    { cls: 3, skills: ['passing'], reason: null },
    { cls: 6, skills: ['shooting', 'passing'], reason: null },
  ],
};

const OPEN_CASES: DemoCase[] = [
  {
    description: 'Forward, pushes with long strokes; leans forward to catch a bounce pass and returns upright with one hand on the wheel.',
    videoUrl: 'https://video.example.invalid/kestrel/practice-11',
    skills: ['pushing', 'catching'],
    reference: 6,
  },
  {
    description: 'Guard, trunk held against the backrest in every skill; shoots with the arms only.',
    videoUrl: null,
    skills: ['shooting', 'stopping'],
    reference: 2,
  },
  {
    description: 'Centre, rebounds with both arms above the head without holding the chair; leans sideways after contact and recovers.',
    videoUrl: 'https://video.example.invalid/kestrel/practice-13',
    skills: ['rebounding', 'chair-contact'],
    reference: 8,
  },
  {
    description: 'Guard, partial rotation to the right only; dribbles on the right side of the chair.',
    videoUrl: null,
    skills: ['dribbling', 'passing'],
    reference: 5,
  },
  {
    description: 'Forward, stops abruptly without losing balance; passes overhead with the trunk leaning forward.',
    videoUrl: null,
    skills: ['stopping', 'passing'],
    reference: 6,
  },
];

const DAY_MS = 86_400_000;
const isoDay = (t: number) => new Date(t).toISOString().slice(0, 10);

export async function seedDemoExercises(db: Db, federationId: number, leadUserId: number | null, now: Date = new Date()): Promise<void> {
  const roster = new Map(
    (await db.selectFrom('classifiers').select(['id', 'code']).where('federation_id', '=', federationId).execute()).map((c) => [
      c.code,
      c.id,
    ]),
  );
  const idOf = (code: string) => {
    const id = roster.get(code);
    if (id === undefined) throw new Error(`demo exercise: no classifier ${code}`);
    return id;
  };

  await db.transaction().execute(async (trx) => {
    const closed = await trx
      .insertInto('exercises')
      .values({
        federation_id: federationId,
        title: 'Winter practice: trunk control at 1.0/1.5 and 2.5/3.0',
        status: 'closed',
        opens_on: '2025-01-13',
        closes_on: '2025-02-02',
        source_kind: 'boundary',
        source_ref: '5',
        created_by: leadUserId,
        created_at: '2025-01-10T10:00:00.000Z',
        opened_at: '2025-01-13T09:00:00.000Z',
        closed_at: '2025-02-03T00:00:00.000Z',
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const caseIds: number[] = [];
    for (const [i, c] of CLOSED_CASES.entries()) {
      const row = await trx
        .insertInto('exercise_cases')
        .values({
          exercise_id: closed.id,
          position: i + 1,
          description: c.description,
          video_url: c.videoUrl,
          skills: JSON.stringify(c.skills),
          reference_class: c.reference,
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      caseIds.push(row.id);
    }
    for (const [code, answers] of Object.entries(CLOSED_ANSWERS)) {
      const flagged = code === 'C05' || code === 'C12';
      await trx
        .insertInto('exercise_assignments')
        .values({
          exercise_id: closed.id,
          classifier_id: idOf(code),
          had_open_flag: flagged ? 1 : 0,
          invited_at: '2025-01-13T09:00:00.000Z',
          finished_at: '2025-01-29T18:00:00.000Z',
          results_sent_at: '2025-02-03T00:00:00.000Z',
        })
        .execute();
      for (const [i, a] of answers.entries()) {
        await trx
          .insertInto('exercise_answers')
          .values({
            case_id: caseIds[i],
            classifier_id: idOf(code),
            sport_class: a.cls,
            skills: JSON.stringify(a.skills),
            reason: a.reason,
            updated_at: '2025-01-29T18:00:00.000Z',
          })
          .execute();
      }
    }

    const open = await trx
      .insertInto('exercises')
      .values({
        federation_id: federationId,
        title: 'Practice: rotation and reach at 2.5/3.0',
        status: 'open',
        opens_on: isoDay(now.getTime() - 3 * DAY_MS),
        closes_on: isoDay(now.getTime() + 14 * DAY_MS),
        source_kind: 'boundary',
        source_ref: '5',
        created_by: leadUserId,
        opened_at: new Date(now.getTime() - 3 * DAY_MS).toISOString(),
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    const openCaseIds: number[] = [];
    for (const [i, c] of OPEN_CASES.entries()) {
      const row = await trx
        .insertInto('exercise_cases')
        .values({
          exercise_id: open.id,
          position: i + 1,
          description: c.description,
          video_url: c.videoUrl,
          skills: JSON.stringify(c.skills),
          reference_class: c.reference,
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      openCaseIds.push(row.id);
    }
    for (const code of ['C02', 'C08', 'C12']) {
      await trx
        .insertInto('exercise_assignments')
        .values({
          exercise_id: open.id,
          classifier_id: idOf(code),
          had_open_flag: code === 'C12' ? 1 : 0,
          invited_at: new Date(now.getTime() - 3 * DAY_MS).toISOString(),
        })
        .execute();
    }
    // The demo classifier has answered the first case only.
    await trx
      .insertInto('exercise_answers')
      .values({
        case_id: openCaseIds[0],
        classifier_id: idOf('C12'),
        sport_class: 5,
        skills: JSON.stringify(['catching']),
        reason: 'Holds the wheel to return upright.',
      })
      .execute();
  });
}

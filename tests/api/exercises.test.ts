/**
 * Calibration exercises through the API and the service functions that take a clock: a lead
 * starts one from a boundary or a flag, creates and opens it (invitations in the local outbox),
 * classifiers answer, reminders two days before the close go to exactly those who have not
 * finished (once), the scheduler closes it and sends the results notices, scores come out, and a
 * flag is closed with a link to the exercise.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/password';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { createExerciseScheduler } from '../../server/services/exercise-scheduler';
import { closeInstant, sendDueReminders } from '../../server/services/exercises';
import type { ExerciseDetail } from '../../shared/schemas/exercises';
import { createTestApp, signedInAgent, tableCounts, type TestApp } from '../helpers/test-app';

const F = 'kestrel-coast';
const base = `/api/federations/${F}/exercises`;
const EMAIL = { C12: 'classifier@demo.panelwise.test', C01: 'c01@exercise.panelwise.test', C02: 'c02@exercise.panelwise.test' };
const DAY = 86_400_000;

let t: TestApp;
let lead: Awaited<ReturnType<typeof signedInAgent>>;
let agents: Record<'C12' | 'C01' | 'C02', Awaited<ReturnType<typeof signedInAgent>>>;
let federationId: number;

async function outbox(subject: RegExp): Promise<string[]> {
  const rows = await t.ctx.db.selectFrom('outbox_messages').select(['mail_to', 'subject']).orderBy('id').execute();
  return rows
    .filter((r) => subject.test(r.subject))
    .map((r) => r.mail_to)
    .sort();
}

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  federationId = (await t.ctx.db.selectFrom('federations').select('id').where('slug', '=', F).executeTakeFirstOrThrow()).id;
  const hash = await hashPassword(DEMO_PASSWORD);
  for (const code of ['C01', 'C02'] as const) {
    const user = await t.ctx.db
      .insertInto('users')
      .values({ email: EMAIL[code], display_name: `Classifier ${code}`, password_hash: hash })
      .returning('id')
      .executeTakeFirstOrThrow();
    await t.ctx.db.insertInto('memberships').values({ user_id: user.id, federation_id: federationId, role: 'classifier' }).execute();
    await t.ctx.db
      .updateTable('classifiers')
      .set({ user_id: user.id })
      .where('federation_id', '=', federationId)
      .where('code', '=', code)
      .execute();
  }
  lead = await signedInAgent(t.app, 'lead@demo.panelwise.test');
  agents = {
    C12: await signedInAgent(t.app, EMAIL.C12),
    C01: await signedInAgent(t.app, EMAIL.C01),
    C02: await signedInAgent(t.app, EMAIL.C02),
  };
});
afterAll(() => t.close());

describe('calibration exercises', () => {
  const closesOn = new Date(Date.now() + 10 * DAY).toISOString().slice(0, 10);
  const opensOn = new Date().toISOString().slice(0, 10);
  let id: number;
  let caseIds: number[];
  let c12FlagId: number;

  it('proposes a draft from a class boundary: cases where panels split there and the classifiers who split there', async () => {
    const res = await lead.get(`${base}/proposal?boundary=5`).expect(200);
    expect(res.body.source).toEqual({ kind: 'boundary', ref: '5' });
    expect(res.body.title).toBe('The 2.5/3.0 boundary');
    expect(res.body.cases.length).toBeGreaterThan(0);
    expect(res.body.cases[0].description).toMatch(/split between 2\.5 and 3\.0/);
    expect(res.body.classifierCodes.length).toBeGreaterThan(0);
    await lead.get(`${base}/proposal?boundary=9`).expect(400);
    await lead.get(`${base}/proposal?boundary=5&flag=1`).expect(400);
  });

  it('proposes a draft from a flag: the classifier who holds it', async () => {
    await lead.post(`/api/federations/${F}/analytics/flags/evaluate`).expect(200);
    const flags = (await lead.get(`/api/federations/${F}/analytics/flags`).expect(200)).body.flags as {
      id: number;
      classifierCode: string;
      status: string;
    }[];
    const flag = flags.find((f) => f.classifierCode === 'C12' && f.status !== 'closed');
    expect(flag, 'the demo’s conservative classifier C12 has an open flag').toBeDefined();
    c12FlagId = flag!.id;
    const res = await lead.get(`${base}/proposal?flag=${c12FlagId}`).expect(200);
    expect(res.body.classifierCodes).toEqual(['C12']);
    expect(res.body.source).toEqual({ kind: 'flag', ref: String(c12FlagId) });
    await lead.get(`${base}/proposal?flag=999999`).expect(404);
  });

  it('refuses a case whose video link is not http(s), naming the case and field, and writes nothing', async () => {
    const before = tableCounts(t.ctx);
    const res = await lead
      .post(base)
      .send({
        title: 'Bad link',
        opensOn,
        closesOn,
        classifierCodes: ['C12'],
        cases: [{ description: 'A case', videoUrl: 'javascript:alert(1)', skills: ['pushing'], referenceClass: 5 }],
      })
      .expect(400);
    expect(res.body.error.details).toContainEqual(
      expect.objectContaining({ path: 'cases.0.videoUrl', message: expect.stringMatching(/http\(s\)/) }),
    );
    const unknown = await lead
      .post(base)
      .send({
        title: 'X',
        opensOn,
        closesOn,
        classifierCodes: ['C99'],
        cases: [{ description: 'A', skills: ['pushing'], referenceClass: 5 }],
      })
      .expect(400);
    expect(unknown.body.error.message).toMatch(/"C99"/);
    const skills = await lead
      .post(base)
      .send({
        title: 'X',
        opensOn,
        closesOn,
        classifierCodes: ['C12'],
        cases: [{ description: 'A', skills: ['juggling'], referenceClass: 5 }],
      })
      .expect(400);
    expect(skills.body.error.details[0].path).toBe('cases.0.skills.0');
    expect(tableCounts(t.ctx)).toEqual(before);
  });

  it('creates a draft that no classifier sees, then opens it and invites the classifiers assigned', async () => {
    const res = await lead
      .post(base)
      .send({
        title: 'Boundary practice',
        opensOn,
        closesOn,
        classifierCodes: ['C12', 'C01', 'C02'],
        source: { kind: 'flag', ref: String(c12FlagId) },
        cases: [
          {
            description: 'Case one (invented).',
            videoUrl: 'https://video.example.invalid/one',
            skills: ['pushing', 'stopping'],
            referenceClass: 5,
          },
          { description: 'Case two (invented).', skills: ['rebounding'], referenceClass: 6 },
          { description: 'Case three (invented).', videoUrl: '', skills: ['chair-contact'], referenceClass: 8 },
        ],
      })
      .expect(201);
    const draft = res.body as ExerciseDetail;
    id = draft.id;
    caseIds = draft.caseList.map((c) => c.id);
    expect(draft.status).toBe('draft');
    expect(draft.caseList.map((c) => c.videoUrl)).toEqual(['https://video.example.invalid/one', null, null]);
    expect((await agents.C12.get(base).expect(200)).body.exercises.map((e: { id: number }) => e.id)).not.toContain(id);
    await agents.C12.get(`${base}/${id}`).expect(404);

    await lead.post(`${base}/${id}/open`).expect(200);
    expect(await outbox(/^Calibration exercise: Boundary practice$/)).toEqual([EMAIL.C01, EMAIL.C02, EMAIL.C12].sort());
    const detail = (await lead.get(`${base}/${id}`).expect(200)).body as ExerciseDetail;
    expect(detail.assignments!.find((a) => a.classifierCode === 'C12')!.hadOpenFlag).toBe(true);
    await lead
      .put(`${base}/${id}`)
      .send({
        title: 'Changed',
        opensOn,
        closesOn,
        classifierCodes: ['C12'],
        cases: [{ description: 'A', skills: ['pushing'], referenceClass: 5 }],
      })
      .expect(409);
  });

  it('saves answers as they go and lets them change until the close; a classifier sees only their own, and no reference class', async () => {
    const put = (who: keyof typeof agents, i: number, body: object) => agents[who].put(`${base}/${id}/answers/${caseIds[i]}`).send(body);
    await put('C12', 0, { sportClass: 6, skills: ['pushing'] }).expect(200);
    const changed = await put('C12', 0, { sportClass: 5, skills: ['stopping', 'pushing'], reason: 'Leans back to stop.' }).expect(200);
    expect(changed.body).toMatchObject({ answered: 1, finished: false, answer: { sportClass: 5, skills: ['pushing', 'stopping'] } });
    await put('C12', 1, { sportClass: 5, skills: ['rebounding'] }).expect(200);
    const last = await put('C12', 2, { sportClass: 8, skills: ['chair-contact'] }).expect(200);
    expect(last.body).toMatchObject({ answered: 3, finished: true });
    await put('C01', 0, { sportClass: 6, skills: ['shooting'], reason: 'SECRET-C01-REASON' }).expect(200);
    await put('C12', 0, { sportClass: 11 }).expect(400);
    await put('C12', 0, { sportClass: 10 }).expect(400); // off the federation's scale 1.0–4.5
    await agents.C12.put(`${base}/${id}/answers/999999`).send({ sportClass: 5 }).expect(404);

    const view = (await agents.C12.get(`${base}/${id}`).expect(200)).body as ExerciseDetail;
    expect(view.caseList.every((c) => !('referenceClass' in c))).toBe(true);
    expect(view.myAnswers!.map((a) => a.sportClass)).toEqual([5, 5, 8]);
    expect(view.assignments).toBeNull();
    expect(view.results).toBeNull();
    expect(JSON.stringify(view)).not.toContain('SECRET-C01-REASON');
    const list = (await agents.C12.get(base).expect(200)).body.exercises as { id: number; mine: unknown }[];
    expect(list.find((e) => e.id === id)!.mine).toEqual({ answered: 3, finished: true });
  });

  it('sends the reminder two days before the close to exactly those who have not finished, once, on a controlled clock', async () => {
    const closes = closeInstant(closesOn).getTime();
    const before = await outbox(/^Reminder:/);
    expect((await sendDueReminders(t.ctx, new Date(closes - 3 * DAY))).sent).toBe(0);
    expect((await sendDueReminders(t.ctx, new Date(closes - 2 * DAY - 60_000))).sent).toBe(0);
    expect(await outbox(/^Reminder:/)).toEqual(before);

    expect((await sendDueReminders(t.ctx, new Date(closes - 2 * DAY + 3_600_000))).sent).toBe(2);
    const reminders = await t.ctx.db
      .selectFrom('outbox_messages')
      .select(['mail_to', 'subject', 'text_body'])
      .where('subject', 'like', 'Reminder: “Boundary practice”%')
      .execute();
    // C01 answered one case of three, C02 none; C12 finished and gets no reminder.
    expect(reminders.map((r) => r.mail_to).sort()).toEqual([EMAIL.C01, EMAIL.C02].sort());
    expect(reminders.find((r) => r.mail_to === EMAIL.C01)!.text_body).toMatch(/answered 1 of 3 cases/);

    // Never twice: neither by the service nor by the scheduler's run.
    expect((await sendDueReminders(t.ctx, new Date(closes - DAY))).sent).toBe(0);
    const scheduler = createExerciseScheduler(t.ctx);
    expect(await scheduler.runOnce(new Date(closes - DAY / 2))).toEqual({ closed: 0, reminded: 0 });
    expect(
      (await t.ctx.db.selectFrom('outbox_messages').select('id').where('subject', 'like', 'Reminder: “Boundary practice”%').execute())
        .length,
    ).toBe(2);
  });

  it('the scheduler closes the exercise after its close date and sends the results notices; answers no longer change', async () => {
    const closes = closeInstant(closesOn).getTime();
    const scheduler = createExerciseScheduler(t.ctx);
    // The demo's open exercise closes later (14 days after seeding) and stays open.
    expect(await scheduler.runOnce(new Date(closes + 60_000))).toEqual({ closed: 1, reminded: 0 });
    expect(await outbox(/^Results are out: Boundary practice$/)).toEqual([EMAIL.C01, EMAIL.C02, EMAIL.C12].sort());
    await agents.C02.put(`${base}/${id}/answers/${caseIds[0]}`).send({ sportClass: 5 }).expect(409);
    await lead.post(`${base}/${id}/close`).expect(409);
    expect((await scheduler.runOnce(new Date(closes + 120_000))).closed).toBe(0);
  });

  it('scores each classifier against the references and shows the live-panel figures of the flagged classifier', async () => {
    const detail = (await lead.get(`${base}/${id}`).expect(200)).body as ExerciseDetail;
    expect(detail.status).toBe('closed');
    const c12 = detail.results!.classifiers.find((c) => c.classifierCode === 'C12')!;
    // C12 answered 2.5, 2.5, 4.0 against 2.5, 3.0, 4.0: exact 2/3, within half 3/3, bias −0.5/3 point.
    expect(c12.answered).toBe(3);
    expect(c12.exact.value).toBeCloseTo(2 / 3, 12);
    expect(c12.withinHalf.value).toBe(1);
    expect(c12.bias.value).toBeCloseTo(-1 / 6, 12);
    expect(c12.meanAbsolutePoints).toBeCloseTo(1 / 6, 12);
    const c01 = detail.results!.classifiers.find((c) => c.classifierCode === 'C01')!;
    expect(c01.answered).toBe(1);
    expect(detail.results!.classifiers.find((c) => c.classifierCode === 'C02')).toBeUndefined();
    // Case one: C12 2.5, C01 3.0 → split at 2.5/3.0.
    expect(detail.results!.cases[0]).toMatchObject({ split: true, boundary: 5, rangePoints: 0.5 });
    const ba = detail.results!.beforeAfter.find((b) => b.classifierCode === 'C12')!;
    expect(ba.before.n).toBe(40);
    expect(ba.after.n).toBe(0); // no live-panel ratings after today's close yet
    expect(ba.quarters.some((q) => q.phase === 'before')).toBe(true);

    // After the close a classifier sees the references, their own scores only, and the group's spread.
    const mine = (await agents.C12.get(`${base}/${id}`).expect(200)).body as ExerciseDetail;
    expect(mine.caseList.map((c) => c.referenceClass)).toEqual([5, 6, 8]);
    expect(mine.results!.classifiers.map((c) => c.classifierCode)).toEqual(['C12']);
    expect(mine.results!.beforeAfter).toEqual([]);
    expect(JSON.stringify(mine)).not.toContain('SECRET-C01-REASON');
  });

  it('closes the flag with a link to the exercise that answered it', async () => {
    await lead.post(`${base}/${id}/flags/${c12FlagId}/close`).send({ note: '' }).expect(400);
    const res = await lead
      .post(`${base}/${id}/flags/${c12FlagId}/close`)
      .send({ note: 'Practised the boundary; scores in line with the reference.' })
      .expect(200);
    expect(res.body.status).toBe('closed');
    expect(res.body.note).toMatch(new RegExp(`calibration exercise #${id}`));
    const detail = (await lead.get(`${base}/${id}`).expect(200)).body as ExerciseDetail;
    expect(detail.linkedFlags).toEqual([{ id: c12FlagId, classifierCode: 'C12', rule: expect.any(String) }]);
    // The open demo exercise cannot answer a flag yet.
    await lead.post(`${base}/2/flags/${c12FlagId}/close`).send({ note: 'Too early' }).expect(409);
  });

  it('shows the demo: one closed exercise with results and one open exercise the demo classifier has not finished', async () => {
    const list = (await agents.C12.get(base).expect(200)).body.exercises as { id: number; status: string; mine: { finished: boolean } }[];
    const demoOpen = list.find((e) => e.id === 2)!;
    expect(demoOpen.status).toBe('open');
    expect(demoOpen.mine.finished).toBe(false);
    const closed = (await lead.get(`${base}/1`).expect(200)).body as ExerciseDetail;
    expect(closed.status).toBe('closed');
    expect(closed.results!.classifiers).toHaveLength(6);
    expect(closed.results!.beforeAfter.map((b) => b.classifierCode)).toEqual(['C05', 'C12']);
    expect(closed.results!.beforeAfter[0].after.n).toBe(40);
    await signedInAgent(t.app, 'researcher@demo.panelwise.test').then((r) => r.get(base).expect(403));
  });
});

describe('the exercises scheduler', () => {
  it('repeats its pass while started, and after stop() (which waits for a run in progress) runs no more', async () => {
    let calls = 0;
    const scheduler = createExerciseScheduler(t.ctx, {
      intervalMs: 5,
      clock: () => {
        calls++;
        return new Date(Date.parse('2020-01-01T00:00:00Z'));
      },
    });
    scheduler.start();
    const deadline = Date.now() + 15_000;
    while (calls < 3 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
    await scheduler.stop();
    const after = calls;
    await new Promise((r) => setTimeout(r, 100));
    expect(after).toBeGreaterThanOrEqual(3);
    expect(calls, 'no run after stop()').toBe(after);
  });
});

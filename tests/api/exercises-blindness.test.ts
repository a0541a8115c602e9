/**
 * Blindness before the close, enforced by the API: every route a classifier can call — every GET
 * of the role × route matrix (tests/api/access/*), and the answer route — is requested as the demo
 * classifier while the demo's exercise 2 is open, with another classifier's answer in it. No
 * response may carry a reference class of that exercise's cases or an answer that is not the
 * caller's own.
 */
import fs from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, signedInAgent, type TestApp } from '../helpers/test-app';
import type { AccessEntry } from './access/types';

const F = 'kestrel-coast';
const MARKER = 'OTHER-CLASSIFIER-REASON-7f3a';

async function matrixEntries(): Promise<AccessEntry[]> {
  const folder = path.resolve(import.meta.dirname, 'access');
  const out: AccessEntry[] = [];
  for (const file of fs.readdirSync(folder).filter((f) => f.endsWith('.ts') && f !== 'types.ts')) {
    const m = (await import(pathToFileURL(path.join(folder, file)).href)) as { entries: AccessEntry[] };
    out.push(...m.entries);
  }
  return out;
}

/** Every object of a JSON value, depth first. */
function* objects(value: unknown): Generator<Record<string, unknown>> {
  if (Array.isArray(value)) for (const v of value) yield* objects(v);
  else if (value && typeof value === 'object') {
    yield value as Record<string, unknown>;
    for (const v of Object.values(value)) yield* objects(v);
  }
}

let t: TestApp;
let openCaseIds: Set<number>;
let ownAnswers: Map<number, number>;

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  const exercise = await t.ctx.db.selectFrom('exercises').select(['id', 'status']).where('id', '=', 2).executeTakeFirstOrThrow();
  expect(exercise.status).toBe('open');
  const cases = await t.ctx.db.selectFrom('exercise_cases').select('id').where('exercise_id', '=', 2).execute();
  openCaseIds = new Set(cases.map((c) => c.id));
  // Another classifier assigned to the open exercise answers every case, with a reason no one else writes.
  const other = await t.ctx.db.selectFrom('classifiers').select('id').where('code', '=', 'C02').executeTakeFirstOrThrow();
  for (const c of cases) {
    await t.ctx.db
      .insertInto('exercise_answers')
      .values({ case_id: c.id, classifier_id: other.id, sport_class: 9, skills: '["shooting"]', reason: MARKER })
      .execute();
  }
  const me = await t.ctx.db.selectFrom('classifiers').select('id').where('code', '=', 'C12').executeTakeFirstOrThrow();
  const mine = await t.ctx.db
    .selectFrom('exercise_answers')
    .select(['case_id', 'sport_class'])
    .where('classifier_id', '=', me.id)
    .where('case_id', 'in', [...openCaseIds])
    .execute();
  ownAnswers = new Map(mine.map((a) => [a.case_id, a.sport_class]));
  expect(ownAnswers.size).toBeGreaterThan(0);
});
afterAll(() => t.close());

function assertBlind(where: string, body: unknown): void {
  const text = JSON.stringify(body ?? null);
  expect(text, `${where}: another classifier's reason`).not.toContain(MARKER);
  for (const o of objects(body)) {
    // A case of the open exercise with its reference class.
    if (typeof o.id === 'number' && openCaseIds.has(o.id) && 'description' in o)
      expect('referenceClass' in o, `${where}: reference class of case ${o.id}`).toBe(false);
    if (typeof o.caseId === 'number' && openCaseIds.has(o.caseId)) {
      expect('referenceClass' in o, `${where}: reference class of case ${o.caseId}`).toBe(false);
      // An answer to a case of the open exercise: only the caller's own.
      if ('sportClass' in o)
        expect(o.sportClass, `${where}: an answer that is not the caller's`).toBe(ownAnswers.get(o.caseId) ?? o.sportClass);
      if ('sportClass' in o) expect(ownAnswers.has(o.caseId) || o.sportClass !== 9, `${where}: another's answer`).toBe(true);
      expect('counts' in o, `${where}: the spread of answers of an open case`).toBe(false);
    }
  }
}

describe('blindness before the close', () => {
  it('no GET route a classifier can call returns a reference class or another person’s answer', async () => {
    const agent = await signedInAgent(t.app, 'classifier@demo.panelwise.test');
    const gets = (await matrixEntries()).filter((e) => e.method === 'get' && e.expect.classifier === 200);
    expect(gets.length).toBeGreaterThan(5);
    const exercisePaths = gets.filter((e) => e.path.includes('/exercises'));
    expect(exercisePaths.map((e) => e.path)).toEqual(
      expect.arrayContaining([`/api/federations/:federation/exercises`, `/api/federations/:federation/exercises/:id`]),
    );
    for (const entry of gets) {
      const target = entry.path.replace(/:(\w+)/g, (_m, name: string) =>
        encodeURIComponent(entry.params?.[name] ?? (name === 'federation' ? F : '')),
      );
      const res = await agent.get(target);
      expect(res.status, target).toBe(200);
      assertBlind(target, res.body);
    }
    // The open exercise itself, and every id a classifier might try.
    for (const id of [1, 2, 3]) {
      const res = await agent.get(`/api/federations/${F}/exercises/${id}`);
      if (res.status === 200) assertBlind(`exercise ${id}`, res.body);
    }
  });

  it('the answer route answers with the caller’s own answer and progress only', async () => {
    const agent = await signedInAgent(t.app, 'classifier@demo.panelwise.test');
    const caseId = [...openCaseIds][1];
    const res = await agent.put(`/api/federations/${F}/exercises/2/answers/${caseId}`).send({ sportClass: 6, skills: ['passing'] });
    expect(res.status).toBe(200);
    ownAnswers.set(caseId, 6);
    assertBlind('PUT answer', res.body);
    expect(Object.keys(res.body).sort()).toEqual(['answer', 'answered', 'finished']);
  });

  it('a lead sees the reference classes and everyone’s answers (the check above can fail)', async () => {
    const agent = await signedInAgent(t.app, 'lead@demo.panelwise.test');
    const res = await agent.get(`/api/federations/${F}/exercises/2`).expect(200);
    expect(() => assertBlind('lead view', res.body)).toThrow();
  });
});

/**
 * Calibration exercises: a lead's practice cases with reference classes, answered blind by the
 * classifiers assigned, scored on close (server/analysis/exercise-scores.ts), with e-mail on
 * open, before the close and on close. Rules in docs/decisions/0010-calibration-exercises.md.
 *
 * Blindness: before the close, nothing here hands a classifier a reference class or anyone's
 * answers but their own (`exerciseDetail` builds the classifier's view without them).
 */
import { caseSpreads, othersMedian, panelBeforeAfter, raterScores, type ScoredAnswer } from '../analysis';
import type { FederationAccess } from '../auth/access';
import type { AppContext } from '../context';
import type { Transaction } from 'kysely';
import type { Database, ExerciseStatus } from '../db/database';
import { HttpError, notFound } from '../http/errors';
import { formatClass } from '../../shared/scale';
import {
  SKILLS,
  type AnswerView,
  type AssignmentView,
  type ClassifierScore,
  type ExerciseCaseView,
  type ExerciseDetail,
  type ExerciseList,
  type ExerciseProposal,
  type ExerciseResults,
  type ExerciseSource,
  type ExerciseSummary,
  type PanelWindow,
  type Skill,
} from '../../shared/schemas/exercises';
import { federationData } from './analytics-data';
import { audit } from './audit';
import { flagsOf, updateFlag } from './calibration-flags';

type Federation = FederationAccess['federation'];

export interface ParsedExerciseInput {
  title: string;
  opensOn: string;
  closesOn: string;
  cases: { description: string; videoUrl: string | null; skills: Skill[]; referenceClass: number }[];
  classifierCodes: string[];
  source?: ExerciseSource | null;
}

export interface ParsedAnswer {
  sportClass: number;
  skills: Skill[];
  reason: string | null;
}

/** Live-panel ratings on each side of an exercise that the before/after figures use. */
export const BEFORE_AFTER_WINDOW = 40;
/** Below this many classifiers assigned, a classifier is not shown the group's spread after the close. */
export const MIN_GROUP_FOR_SPREAD = 3;
const DAY_MS = 86_400_000;
const REMINDER_LEAD_MS = 2 * DAY_MS;

/** The instant an exercise closes: the end of its close date (UTC). */
export function closeInstant(closesOn: string): Date {
  return new Date(Date.parse(`${closesOn}T00:00:00.000Z`) + DAY_MS);
}

// ---------------------------------------------------------------------------------------------
// Reading

interface ExerciseRow {
  id: number;
  federation_id: number;
  title: string;
  status: ExerciseStatus;
  opens_on: string;
  closes_on: string;
  source_kind: 'flag' | 'boundary' | null;
  source_ref: string | null;
  opened_at: string | null;
  closed_at: string | null;
}

async function exerciseRow(ctx: AppContext, federationId: number, id: number): Promise<ExerciseRow> {
  const row = await ctx.db
    .selectFrom('exercises')
    .select(['id', 'federation_id', 'title', 'status', 'opens_on', 'closes_on', 'source_kind', 'source_ref', 'opened_at', 'closed_at'])
    .where('id', '=', id)
    .where('federation_id', '=', federationId)
    .executeTakeFirst();
  if (!row) throw notFound('The exercise');
  return row;
}

/** Per exercise: cases, assigned, finished. */
async function counts(ctx: AppContext, ids: number[]) {
  const out = new Map<number, { cases: number; assigned: number; finished: number }>();
  if (ids.length === 0) return out;
  for (const id of ids) out.set(id, { cases: 0, assigned: 0, finished: 0 });
  const cases = await ctx.db
    .selectFrom('exercise_cases')
    .select(['exercise_id', (eb) => eb.fn.countAll<number>().as('n')])
    .where('exercise_id', 'in', ids)
    .groupBy('exercise_id')
    .execute();
  for (const c of cases) out.get(c.exercise_id)!.cases = Number(c.n);
  const assigned = await ctx.db
    .selectFrom('exercise_assignments')
    .select(['exercise_id', 'finished_at'])
    .where('exercise_id', 'in', ids)
    .execute();
  for (const a of assigned) {
    const o = out.get(a.exercise_id)!;
    o.assigned++;
    if (a.finished_at) o.finished++;
  }
  return out;
}

async function answeredBy(ctx: AppContext, exerciseId: number, classifierId: number): Promise<number> {
  const row = await ctx.db
    .selectFrom('exercise_answers as a')
    .innerJoin('exercise_cases as c', 'c.id', 'a.case_id')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('c.exercise_id', '=', exerciseId)
    .where('a.classifier_id', '=', classifierId)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}

function summaryOf(
  row: ExerciseRow,
  c: { cases: number; assigned: number; finished: number },
  mine: ExerciseSummary['mine'],
): ExerciseSummary {
  return { id: row.id, title: row.title, status: row.status, opensOn: row.opens_on, closesOn: row.closes_on, ...c, mine };
}

/** The caller's exercises: every one for a lead; for a classifier, those assigned that are open or closed. */
export async function listExercises(ctx: AppContext, access: FederationAccess): Promise<ExerciseList> {
  let q = ctx.db
    .selectFrom('exercises as e')
    .select([
      'e.id',
      'e.federation_id',
      'e.title',
      'e.status',
      'e.opens_on',
      'e.closes_on',
      'e.source_kind',
      'e.source_ref',
      'e.opened_at',
      'e.closed_at',
    ])
    .where('e.federation_id', '=', access.federation.id);
  if (access.role !== 'lead') {
    if (access.classifierId === null) return { exercises: [], scale: { min: access.federation.scaleMin, max: access.federation.scaleMax } };
    q = q
      .innerJoin('exercise_assignments as x', 'x.exercise_id', 'e.id')
      .where('x.classifier_id', '=', access.classifierId)
      .where('e.status', '!=', 'draft');
  }
  const rows = (await q.orderBy('e.closes_on', 'desc').orderBy('e.id', 'desc').execute()) as ExerciseRow[];
  const c = await counts(
    ctx,
    rows.map((r) => r.id),
  );
  const out: ExerciseSummary[] = [];
  for (const row of rows) {
    let mine: ExerciseSummary['mine'] = null;
    if (access.role !== 'lead' && access.classifierId !== null) {
      const answered = await answeredBy(ctx, row.id, access.classifierId);
      mine = { answered, finished: answered >= c.get(row.id)!.cases };
    }
    out.push(summaryOf(row, c.get(row.id)!, mine));
  }
  return { exercises: out, scale: { min: access.federation.scaleMin, max: access.federation.scaleMax } };
}

interface CaseRow {
  id: number;
  position: number;
  description: string;
  video_url: string | null;
  skills: string;
  reference_class: number;
}

async function casesOf(ctx: AppContext, exerciseId: number): Promise<CaseRow[]> {
  return ctx.db
    .selectFrom('exercise_cases')
    .select(['id', 'position', 'description', 'video_url', 'skills', 'reference_class'])
    .where('exercise_id', '=', exerciseId)
    .orderBy('position')
    .execute();
}

interface AnswerRow {
  case_id: number;
  classifier_id: number;
  code: string;
  sport_class: number;
  skills: string;
  reason: string | null;
  updated_at: string;
}

async function answersOf(ctx: AppContext, exerciseId: number, classifierId?: number): Promise<AnswerRow[]> {
  let q = ctx.db
    .selectFrom('exercise_answers as a')
    .innerJoin('exercise_cases as c', 'c.id', 'a.case_id')
    .innerJoin('classifiers as k', 'k.id', 'a.classifier_id')
    .select(['a.case_id', 'a.classifier_id', 'k.code', 'a.sport_class', 'a.skills', 'a.reason', 'a.updated_at'])
    .where('c.exercise_id', '=', exerciseId);
  if (classifierId !== undefined) q = q.where('a.classifier_id', '=', classifierId);
  return q.orderBy('c.position').orderBy('k.code').execute();
}

const skillsOf = (json: string) => JSON.parse(json) as Skill[];

function answerView(a: AnswerRow): AnswerView {
  return { caseId: a.case_id, sportClass: a.sport_class, skills: skillsOf(a.skills), reason: a.reason, updatedAt: a.updated_at };
}

interface AssignmentRow {
  classifier_id: number;
  code: string;
  display_name: string;
  user_id: number | null;
  had_open_flag: number;
  finished_at: string | null;
  invited_at: string | null;
  reminded_at: string | null;
}

async function assignmentsOf(ctx: AppContext, exerciseId: number): Promise<AssignmentRow[]> {
  return ctx.db
    .selectFrom('exercise_assignments as x')
    .innerJoin('classifiers as k', 'k.id', 'x.classifier_id')
    .select([
      'x.classifier_id',
      'k.code',
      'k.display_name',
      'k.user_id',
      'x.had_open_flag',
      'x.finished_at',
      'x.invited_at',
      'x.reminded_at',
    ])
    .where('x.exercise_id', '=', exerciseId)
    .orderBy('k.code')
    .execute();
}

function panelWindow(w: ReturnType<typeof panelBeforeAfter>['before']): PanelWindow {
  return { ...w };
}

/** The scores of a closed exercise, for a lead (everything) or one classifier (their row, and spreads of groups large enough). */
async function resultsOf(
  ctx: AppContext,
  federation: Federation,
  row: ExerciseRow,
  viewer: { lead: true } | { lead: false; classifierId: number },
): Promise<ExerciseResults> {
  const cases = await casesOf(ctx, row.id);
  const answers = await answersOf(ctx, row.id);
  const assignments = await assignmentsOf(ctx, row.id);
  const scale = { min: federation.scaleMin, max: federation.scaleMax };
  const scored: ScoredAnswer[] = answers.map((a) => ({
    rater: a.code,
    caseId: a.case_id,
    sportClass: a.sport_class,
    skills: skillsOf(a.skills),
  }));
  const scores = raterScores(
    cases.map((c) => ({ id: c.id, reference: c.reference_class })),
    scored,
    scale,
  );
  const byCode = new Map(scores.map((s) => [s.rater, s]));
  const classifiers: ClassifierScore[] = [];
  for (const a of assignments) {
    const s = byCode.get(a.code);
    if (!s) continue;
    classifiers.push({
      classifierCode: a.code,
      classifierName: a.display_name,
      answered: s.answered,
      exact: s.exact,
      withinHalf: s.withinHalf,
      quadraticKappa: {
        value: s.quadraticKappa.value,
        se: s.quadraticKappa.se,
        ci95: s.quadraticKappa.ci95,
        n: s.quadraticKappa.n,
        reason: s.quadraticKappa.reason,
      },
      bias: s.bias,
      meanAbsolutePoints: s.meanAbsolutePoints,
      offByHalfPoint: s.offByHalfPoint,
      offByOnePoint: s.offByOnePoint,
    });
  }
  const spreads = caseSpreads(
    cases.map((c) => ({ id: c.id, reference: c.reference_class })),
    scored,
  ).map((s, i) => ({
    caseId: s.caseId,
    position: cases[i].position,
    referenceClass: s.reference,
    answers: s.answers,
    counts: s.counts,
    lowest: s.lowest,
    highest: s.highest,
    rangePoints: s.rangePoints,
    exactShare: s.exactShare,
    split: s.split,
    boundary: s.boundary,
    lower: s.lower as ExerciseResults['cases'][number]['lower'],
    upper: s.upper as ExerciseResults['cases'][number]['upper'],
  }));

  if (!viewer.lead) {
    const own = assignments.find((a) => a.classifier_id === viewer.classifierId);
    return {
      classifiers: classifiers.filter((c) => c.classifierCode === own?.code),
      cases: assignments.length >= MIN_GROUP_FOR_SPREAD ? spreads : [],
      beforeAfter: [],
      window: BEFORE_AFTER_WINDOW,
    };
  }

  const flagged = assignments.filter((a) => a.had_open_flag === 1);
  const beforeAfter: ExerciseResults['beforeAfter'] = [];
  if (flagged.length > 0) {
    const set = federationData(ctx, federation).set;
    const medians = othersMedian(set);
    const opened = row.opened_at?.slice(0, 10) ?? row.opens_on;
    const closed = row.closed_at?.slice(0, 10) ?? row.closes_on;
    for (const a of flagged) {
      const r = panelBeforeAfter(set, a.code, opened, closed, BEFORE_AFTER_WINDOW, medians);
      beforeAfter.push({
        classifierCode: a.code,
        classifierName: a.display_name,
        before: panelWindow(r.before),
        after: panelWindow(r.after),
        quarters: r.quarters,
      });
    }
  }
  return { classifiers, cases: spreads, beforeAfter, window: BEFORE_AFTER_WINDOW };
}

/**
 * One exercise as the caller may see it. A classifier sees only exercises assigned to them that
 * are open or closed; before the close, without reference classes and with their own answers only.
 */
export async function exerciseDetail(ctx: AppContext, access: FederationAccess, id: number): Promise<ExerciseDetail> {
  const row = await exerciseRow(ctx, access.federation.id, id);
  const lead = access.role === 'lead';
  let classifierId: number | null = null;
  if (!lead) {
    classifierId = access.classifierId;
    if (classifierId === null || row.status === 'draft') throw notFound('The exercise');
    const assigned = await ctx.db
      .selectFrom('exercise_assignments')
      .select('classifier_id')
      .where('exercise_id', '=', id)
      .where('classifier_id', '=', classifierId)
      .executeTakeFirst();
    if (!assigned) throw notFound('The exercise');
  }
  const closed = row.status === 'closed';
  const cases = await casesOf(ctx, id);
  const caseList: ExerciseCaseView[] = cases.map((c) => {
    const view: ExerciseCaseView = {
      id: c.id,
      position: c.position,
      description: c.description,
      videoUrl: c.video_url,
      skills: skillsOf(c.skills),
    };
    // Blindness: the reference class reaches a classifier only after the close.
    if (lead || closed) view.referenceClass = c.reference_class;
    return view;
  });
  const c = (await counts(ctx, [id])).get(id)!;
  let mine: ExerciseSummary['mine'] = null;
  let myAnswers: AnswerView[] | null = null;
  if (classifierId !== null) {
    const own = await answersOf(ctx, id, classifierId);
    myAnswers = own.map(answerView);
    mine = { answered: own.length, finished: own.length >= c.cases };
  }
  let assignments: AssignmentView[] | null = null;
  if (lead) {
    const answers = await answersOf(ctx, id);
    assignments = (await assignmentsOf(ctx, id)).map((a) => ({
      classifierCode: a.code,
      classifierName: a.display_name,
      hasAccount: a.user_id !== null,
      hadOpenFlag: a.had_open_flag === 1,
      answered: answers.filter((x) => x.classifier_id === a.classifier_id).length,
      finishedAt: a.finished_at,
      invitedAt: a.invited_at,
      remindedAt: a.reminded_at,
    }));
  }
  const results = closed
    ? await resultsOf(ctx, access.federation, row, lead ? { lead: true } : { lead: false, classifierId: classifierId! })
    : null;
  const linkedFlags = lead
    ? await ctx.db
        .selectFrom('exercise_flag_links as l')
        .innerJoin('calibration_flags as f', 'f.id', 'l.flag_id')
        .innerJoin('classifiers as k', 'k.id', 'f.classifier_id')
        .select(['f.id', 'k.code as classifierCode', 'f.rule'])
        .where('l.exercise_id', '=', id)
        .orderBy('f.id')
        .execute()
    : [];
  return {
    ...summaryOf(row, c, mine),
    scale: { min: access.federation.scaleMin, max: access.federation.scaleMax },
    source: row.source_kind && row.source_ref ? { kind: row.source_kind, ref: row.source_ref } : null,
    openedAt: row.opened_at,
    closedAt: row.closed_at,
    caseList,
    myAnswers,
    assignments,
    results,
    linkedFlags,
  };
}

// ---------------------------------------------------------------------------------------------
// Writing (leads)

async function classifierIdsFor(ctx: AppContext, federationId: number, codes: string[]): Promise<Map<string, number>> {
  const rows = await ctx.db
    .selectFrom('classifiers')
    .select(['id', 'code'])
    .where('federation_id', '=', federationId)
    .where('code', 'in', codes)
    .execute();
  const found = new Map(rows.map((r) => [r.code, r.id]));
  const missing = codes.map((code, i) => ({ code, i })).filter((x) => !found.has(x.code));
  if (missing.length > 0) {
    throw new HttpError(
      400,
      'validation_failed',
      `No classifier with the code ${missing.map((m) => `"${m.code}"`).join(', ')} in this federation`,
      missing.map((m) => ({ path: `classifierCodes.${m.i}`, message: `"${m.code}" is not on the roster` })),
    );
  }
  return found;
}

function checkScale(federation: Federation, input: ParsedExerciseInput): void {
  const bad = input.cases
    .map((c, i) => ({ c, i }))
    .filter(({ c }) => c.referenceClass < federation.scaleMin || c.referenceClass > federation.scaleMax)
    .map(({ c, i }) => ({
      path: `cases.${i}.referenceClass`,
      message: `${formatClass(c.referenceClass)} is off the scale ${formatClass(federation.scaleMin)}–${formatClass(federation.scaleMax)}`,
    }));
  if (bad.length > 0)
    throw new HttpError(
      400,
      'validation_failed',
      `Case ${bad.map((b) => Number(b.path.split('.')[1]) + 1).join(', ')}: the reference class is off the scale`,
      bad,
    );
}

/** Creates a draft exercise; nothing is sent until it opens. */
export async function createExercise(
  ctx: AppContext,
  federation: Federation,
  userId: number | null,
  input: ParsedExerciseInput,
): Promise<number> {
  checkScale(federation, input);
  const ids = await classifierIdsFor(ctx, federation.id, input.classifierCodes);
  return ctx.db.transaction().execute(async (trx) => {
    const { id } = await trx
      .insertInto('exercises')
      .values({
        federation_id: federation.id,
        title: input.title,
        opens_on: input.opensOn,
        closes_on: input.closesOn,
        source_kind: input.source?.kind ?? null,
        source_ref: input.source?.ref ?? null,
        created_by: userId,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await writeCasesAndAssignments(trx, id, input, ids);
    await audit(trx, {
      federationId: federation.id,
      userId,
      action: 'create',
      entity: 'exercise',
      entityId: id,
      detail: { cases: input.cases.length, classifiers: input.classifierCodes.length },
    });
    return id;
  });
}

async function writeCasesAndAssignments(trx: Transaction<Database>, id: number, input: ParsedExerciseInput, ids: Map<string, number>) {
  await trx
    .insertInto('exercise_cases')
    .values(
      input.cases.map((c, i) => ({
        exercise_id: id,
        position: i + 1,
        description: c.description,
        video_url: c.videoUrl,
        skills: JSON.stringify(c.skills),
        reference_class: c.referenceClass,
      })),
    )
    .execute();
  await trx
    .insertInto('exercise_assignments')
    .values(input.classifierCodes.map((code) => ({ exercise_id: id, classifier_id: ids.get(code)! })))
    .execute();
}

/** Replaces a draft's title, dates, cases and classifiers. */
export async function updateDraft(
  ctx: AppContext,
  federation: Federation,
  id: number,
  userId: number | null,
  input: ParsedExerciseInput,
): Promise<void> {
  const row = await exerciseRow(ctx, federation.id, id);
  if (row.status !== 'draft') throw new HttpError(409, 'conflict', 'Only a draft can be edited: this exercise is already open or closed');
  checkScale(federation, input);
  const ids = await classifierIdsFor(ctx, federation.id, input.classifierCodes);
  await ctx.db.transaction().execute(async (trx) => {
    await trx
      .updateTable('exercises')
      .set({
        title: input.title,
        opens_on: input.opensOn,
        closes_on: input.closesOn,
        source_kind: input.source?.kind ?? null,
        source_ref: input.source?.ref ?? null,
      })
      .where('id', '=', id)
      .execute();
    await trx.deleteFrom('exercise_cases').where('exercise_id', '=', id).execute();
    await trx.deleteFrom('exercise_assignments').where('exercise_id', '=', id).execute();
    await writeCasesAndAssignments(trx, id, input, ids);
    await audit(trx, { federationId: federation.id, userId, action: 'update', entity: 'exercise', entityId: id });
  });
}

async function federationOfExercise(ctx: AppContext, federationId: number) {
  return ctx.db.selectFrom('federations').select(['id', 'slug', 'name']).where('id', '=', federationId).executeTakeFirstOrThrow();
}

async function sendTo(ctx: AppContext, to: string, subject: string, text: string, federationSlug: string): Promise<boolean> {
  if (!ctx.mailer) {
    ctx.logger.warn({ to, subject }, 'no mailer: an exercise e-mail was not sent');
    return false;
  }
  try {
    await ctx.mailer.send({ to, subject, text, federation: federationSlug });
    return true;
  } catch (err) {
    ctx.logger.error({ err, to, subject }, 'an exercise e-mail could not be sent');
    return false;
  }
}

/** Assigned classifiers with an account in the federation (the only ones e-mail can reach). */
async function reachable(ctx: AppContext, exerciseId: number, federationId: number) {
  return ctx.db
    .selectFrom('exercise_assignments as x')
    .innerJoin('classifiers as k', 'k.id', 'x.classifier_id')
    .innerJoin('users as u', 'u.id', 'k.user_id')
    .innerJoin('memberships as m', (j) => j.onRef('m.user_id', '=', 'u.id').on('m.federation_id', '=', federationId).on('m.active', '=', 1))
    .select(['x.classifier_id', 'k.code', 'u.email', 'u.display_name', 'x.finished_at', 'x.reminded_at', 'x.results_sent_at'])
    .where('x.exercise_id', '=', exerciseId)
    .orderBy('k.code')
    .execute();
}

const link = (ctx: AppContext, slug: string, id: number) => `${ctx.config.publicOrigin}/f/${slug}/exercises/${id}`;

/**
 * Opens a draft: records which assigned classifiers have an open calibration flag (for the
 * before/after figures), and e-mails each assigned classifier an invitation.
 */
export async function openExercise(ctx: AppContext, federation: Federation, id: number, userId: number | null, now: Date): Promise<void> {
  const row = await exerciseRow(ctx, federation.id, id);
  if (row.status !== 'draft') throw new HttpError(409, 'conflict', `This exercise is ${row.status}, not a draft`);
  if (closeInstant(row.closes_on) <= now)
    throw new HttpError(409, 'conflict', `The close date ${row.closes_on} has passed: change it before opening`);
  const cases = (await counts(ctx, [id])).get(id)!;
  if (cases.cases === 0 || cases.assigned === 0)
    throw new HttpError(409, 'conflict', 'An exercise needs at least one case and one classifier to open');
  const flags = (await flagsOf(ctx, federation.id, { activeOnly: true })).filter((f) => f.status !== 'closed');
  const codes = await ctx.db.selectFrom('classifiers').select(['id', 'code']).where('federation_id', '=', federation.id).execute();
  const idOf = new Map(codes.map((c) => [c.code, c.id]));
  const flagOf = new Map<number, number>();
  for (const f of flags) {
    const cid = idOf.get(f.classifierCode);
    if (cid !== undefined && !flagOf.has(cid)) flagOf.set(cid, f.id);
  }
  const at = now.toISOString();
  await ctx.db.transaction().execute(async (trx) => {
    await trx.updateTable('exercises').set({ status: 'open', opened_at: at }).where('id', '=', id).execute();
    const assigned = await trx.selectFrom('exercise_assignments').select('classifier_id').where('exercise_id', '=', id).execute();
    for (const a of assigned) {
      const flagId = flagOf.get(a.classifier_id) ?? null;
      await trx
        .updateTable('exercise_assignments')
        .set({ flag_id: flagId, had_open_flag: flagId === null ? 0 : 1 })
        .where('exercise_id', '=', id)
        .where('classifier_id', '=', a.classifier_id)
        .execute();
    }
    await audit(trx, { federationId: federation.id, userId, action: 'open', entity: 'exercise', entityId: id });
  });
  const fed = await federationOfExercise(ctx, federation.id);
  for (const person of await reachable(ctx, id, federation.id)) {
    const text = [
      `Hello ${person.display_name},`,
      '',
      `${fed.name} invites you to a calibration exercise: “${row.title}” (${cases.cases} case${cases.cases === 1 ? '' : 's'}).`,
      `Answer each case with the class you would give, and tick the skills that decided it. Your answers are saved as you go and can be changed until ${row.closes_on} (end of day, UTC).`,
      'Until the close no one sees the reference classes; no other classifier sees your answers.',
      '',
      `Open the exercise: ${link(ctx, fed.slug, id)}`,
      '',
      'This is practice: the scores describe consistency with a reference, not a judgement of anyone’s classification.',
    ].join('\n');
    if (await sendTo(ctx, person.email, `Calibration exercise: ${row.title}`, text, fed.slug)) {
      await ctx.db
        .updateTable('exercise_assignments')
        .set({ invited_at: now.toISOString() })
        .where('exercise_id', '=', id)
        .where('classifier_id', '=', person.classifier_id)
        .execute();
    }
  }
}

/** Closes an open exercise and e-mails each assigned classifier that the results are out. */
export async function closeExercise(ctx: AppContext, federationId: number, id: number, userId: number | null, now: Date): Promise<void> {
  const closed = await ctx.db.transaction().execute(async (trx) => {
    const changed = await trx
      .updateTable('exercises')
      .set({ status: 'closed', closed_at: now.toISOString() })
      .where('id', '=', id)
      .where('federation_id', '=', federationId)
      .where('status', '=', 'open')
      .executeTakeFirst();
    if (Number(changed.numUpdatedRows) === 0) return false;
    await audit(trx, { federationId, userId, action: 'close', entity: 'exercise', entityId: id });
    return true;
  });
  if (!closed) {
    const row = await exerciseRow(ctx, federationId, id);
    throw new HttpError(409, 'conflict', `This exercise is ${row.status}: only an open exercise can be closed`);
  }
  await sendResults(ctx, federationId, id, now);
}

async function sendResults(ctx: AppContext, federationId: number, id: number, now: Date): Promise<void> {
  const fed = await federationOfExercise(ctx, federationId);
  const row = await exerciseRow(ctx, federationId, id);
  for (const person of await reachable(ctx, id, federationId)) {
    if (person.results_sent_at) continue;
    const text = [
      `Hello ${person.display_name},`,
      '',
      `The calibration exercise “${row.title}” of ${fed.name} has closed. The reference classes and your scores are now shown with the exercise:`,
      link(ctx, fed.slug, id),
      '',
      'Agreement with a reference describes consistency with the senior panel’s class for these cases; it is practice, not a finding about anyone’s classification.',
    ].join('\n');
    if (await sendTo(ctx, person.email, `Results are out: ${row.title}`, text, fed.slug)) {
      await ctx.db
        .updateTable('exercise_assignments')
        .set({ results_sent_at: now.toISOString() })
        .where('exercise_id', '=', id)
        .where('classifier_id', '=', person.classifier_id)
        .execute();
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Answering (classifiers)

/** Saves (or changes) a classifier's answer to one case while the exercise is open. */
export async function saveAnswer(
  ctx: AppContext,
  access: FederationAccess,
  id: number,
  caseId: number,
  answer: ParsedAnswer,
  now: Date,
): Promise<{ answer: AnswerView; answered: number; finished: boolean }> {
  const classifierId = access.classifierId;
  if (classifierId === null) throw new HttpError(403, 'forbidden', 'Your account is not linked to a classifier of this federation');
  const row = await exerciseRow(ctx, access.federation.id, id);
  const assigned = await ctx.db
    .selectFrom('exercise_assignments')
    .select('finished_at')
    .where('exercise_id', '=', id)
    .where('classifier_id', '=', classifierId)
    .executeTakeFirst();
  if (!assigned || row.status === 'draft') throw notFound('The exercise');
  if (row.status === 'closed' || closeInstant(row.closes_on) <= now)
    throw new HttpError(409, 'conflict', 'The exercise has closed: answers can no longer change');
  const theCase = await ctx.db
    .selectFrom('exercise_cases')
    .select('id')
    .where('id', '=', caseId)
    .where('exercise_id', '=', id)
    .executeTakeFirst();
  if (!theCase) throw notFound('The case');
  const { scaleMin, scaleMax } = access.federation;
  if (answer.sportClass < scaleMin || answer.sportClass > scaleMax) {
    throw new HttpError(
      400,
      'validation_failed',
      `The class ${formatClass(answer.sportClass)} is off the scale ${formatClass(scaleMin)}–${formatClass(scaleMax)}`,
      [{ path: 'sportClass', message: `${answer.sportClass} is off the scale` }],
    );
  }
  const at = now.toISOString();
  const skills = JSON.stringify(SKILLS.filter((s) => answer.skills.includes(s)));
  const result = await ctx.db.transaction().execute(async (trx) => {
    await trx
      .insertInto('exercise_answers')
      .values({
        case_id: caseId,
        classifier_id: classifierId,
        sport_class: answer.sportClass,
        skills,
        reason: answer.reason,
        updated_at: at,
      })
      .onConflict((oc) =>
        oc
          .columns(['case_id', 'classifier_id'])
          .doUpdateSet({ sport_class: answer.sportClass, skills, reason: answer.reason, updated_at: at }),
      )
      .execute();
    const answered = Number(
      (
        await trx
          .selectFrom('exercise_answers as a')
          .innerJoin('exercise_cases as c', 'c.id', 'a.case_id')
          .select((eb) => eb.fn.countAll<number>().as('n'))
          .where('c.exercise_id', '=', id)
          .where('a.classifier_id', '=', classifierId)
          .executeTakeFirstOrThrow()
      ).n,
    );
    const total = Number(
      (
        await trx
          .selectFrom('exercise_cases')
          .select((eb) => eb.fn.countAll<number>().as('n'))
          .where('exercise_id', '=', id)
          .executeTakeFirstOrThrow()
      ).n,
    );
    const finished = answered >= total;
    if (finished && !assigned.finished_at) {
      await trx
        .updateTable('exercise_assignments')
        .set({ finished_at: at })
        .where('exercise_id', '=', id)
        .where('classifier_id', '=', classifierId)
        .execute();
    }
    return { answered, finished };
  });
  return {
    answer: { caseId, sportClass: answer.sportClass, skills: JSON.parse(skills) as Skill[], reason: answer.reason, updatedAt: at },
    ...result,
  };
}

// ---------------------------------------------------------------------------------------------
// Time: reminders and closing (the scheduler calls these; tests pass the clock)

/**
 * E-mails a reminder to each assigned classifier who has not answered every case of an open
 * exercise once its close is two days away or less. A reminder is claimed (reminded_at set)
 * before it is sent, so none goes twice; a failed send releases the claim for the next run.
 */
export async function sendDueReminders(ctx: AppContext, now: Date): Promise<{ sent: number }> {
  const open = await ctx.db
    .selectFrom('exercises')
    .select(['id', 'federation_id', 'title', 'closes_on'])
    .where('status', '=', 'open')
    .execute();
  let sent = 0;
  for (const ex of open) {
    const closes = closeInstant(ex.closes_on).getTime();
    if (now.getTime() < closes - REMINDER_LEAD_MS || now.getTime() >= closes) continue;
    const fed = await federationOfExercise(ctx, ex.federation_id);
    const total = (await counts(ctx, [ex.id])).get(ex.id)!.cases;
    for (const person of await reachable(ctx, ex.id, ex.federation_id)) {
      if (person.finished_at || person.reminded_at) continue;
      const claim = await ctx.db
        .updateTable('exercise_assignments')
        .set({ reminded_at: now.toISOString() })
        .where('exercise_id', '=', ex.id)
        .where('classifier_id', '=', person.classifier_id)
        .where('reminded_at', 'is', null)
        .executeTakeFirst();
      if (Number(claim.numUpdatedRows) === 0) continue;
      const answered = await answeredBy(ctx, ex.id, person.classifier_id);
      const text = [
        `Hello ${person.display_name},`,
        '',
        `The calibration exercise “${ex.title}” closes at the end of ${ex.closes_on} (UTC). You have answered ${answered} of ${total} case${total === 1 ? '' : 's'}.`,
        `Finish it here: ${link(ctx, fed.slug, ex.id)}`,
      ].join('\n');
      if (await sendTo(ctx, person.email, `Reminder: “${ex.title}” closes on ${ex.closes_on}`, text, fed.slug)) sent++;
      else
        await ctx.db
          .updateTable('exercise_assignments')
          .set({ reminded_at: null })
          .where('exercise_id', '=', ex.id)
          .where('classifier_id', '=', person.classifier_id)
          .execute();
    }
  }
  return { sent };
}

/** Closes every open exercise whose close date has passed, and sends the results notices. */
export async function closeDueExercises(ctx: AppContext, now: Date): Promise<{ closed: number }> {
  const open = await ctx.db.selectFrom('exercises').select(['id', 'federation_id', 'closes_on']).where('status', '=', 'open').execute();
  let closed = 0;
  for (const ex of open) {
    if (closeInstant(ex.closes_on) > now) continue;
    await closeExercise(ctx, ex.federation_id, ex.id, null, now);
    closed++;
  }
  return { closed };
}

// ---------------------------------------------------------------------------------------------
// Flags

/** Closes a calibration flag with a note and a link to the exercise that answered it. */
export async function closeFlagWithExercise(
  ctx: AppContext,
  federation: Federation,
  id: number,
  flagId: number,
  userId: number | null,
  note: string,
) {
  const row = await exerciseRow(ctx, federation.id, id);
  if (row.status !== 'closed')
    throw new HttpError(409, 'conflict', 'Link a flag to an exercise once the exercise has closed and its results are known');
  const assigned = await ctx.db
    .selectFrom('calibration_flags as f')
    .innerJoin('exercise_assignments as x', (j) => j.onRef('x.classifier_id', '=', 'f.classifier_id').on('x.exercise_id', '=', id))
    .select('f.id')
    .where('f.id', '=', flagId)
    .where('f.federation_id', '=', federation.id)
    .executeTakeFirst();
  if (!assigned) throw notFound('A flag of a classifier assigned to this exercise');
  const flag = await updateFlag(ctx, federation.id, flagId, userId, {
    status: 'closed',
    note: `${note} (calibration exercise #${id}: ${row.title})`,
  });
  await ctx.db.transaction().execute(async (trx) => {
    await trx
      .insertInto('exercise_flag_links')
      .values({ flag_id: flagId, exercise_id: id, linked_by: userId })
      .onConflict((oc) => oc.column('flag_id').doUpdateSet({ exercise_id: id, linked_by: userId, linked_at: new Date().toISOString() }))
      .execute();
    await audit(trx, { federationId: federation.id, userId, action: 'flag.linked', entity: 'exercise', entityId: id, detail: { flagId } });
  });
  return flag;
}

// ---------------------------------------------------------------------------------------------
// Proposals: an exercise started from a flag or a class boundary

const PROPOSED_CASES = 8;
const PROPOSED_CLASSIFIERS = 6;

/**
 * A draft to start from: cases from the federation's assessments where the panel split at the
 * boundary (reference class proposed: the panel's final class, for the lead to confirm with the
 * senior panel), and the classifiers who split there most (for a boundary) or who hold the flag.
 */
export async function proposeExercise(
  ctx: AppContext,
  federation: Federation,
  query: { flag?: number; boundary?: number },
): Promise<ExerciseProposal> {
  const data = federationData(ctx, federation);
  const set = data.set;
  const q = set.q;
  // Per classifier and boundary j (between class index j and j + 1): ratings on the other side of the panel's final class.
  const splits = new Map<string, Int32Array>();
  for (let p = 0; p < set.ratingCount; p++) {
    const a = set.ratingAssessment[p];
    const panel = set.panelClass[a];
    const mine = set.ratingClass[p];
    if (panel < 0 || Math.abs(panel - mine) !== 1) continue;
    const code = set.classifierCodes[set.ratingClassifier[p]];
    let row = splits.get(code);
    if (!row) splits.set(code, (row = new Int32Array(q)));
    row[Math.min(panel, mine)]++;
  }
  let boundaryIndex: number;
  let classifierCodes: string[];
  let source: ExerciseSource;
  let title: string;
  if (query.flag !== undefined) {
    const flag = (await flagsOf(ctx, federation.id, { activeOnly: false })).find((f) => f.id === query.flag);
    if (!flag) throw notFound('The flag');
    const row = splits.get(flag.classifierCode) ?? new Int32Array(q);
    boundaryIndex = 0;
    for (let j = 1; j + 1 < q; j++) if (row[j] > row[boundaryIndex]) boundaryIndex = j;
    classifierCodes = [flag.classifierCode];
    source = { kind: 'flag', ref: String(flag.id) };
    title = `Calibration for ${flag.classifierCode}: the ${formatClass(set.scale.min + boundaryIndex)}/${formatClass(set.scale.min + boundaryIndex + 1)} boundary`;
  } else {
    const b = query.boundary!;
    if (b < set.scale.min || b >= set.scale.max)
      throw new HttpError(400, 'validation_failed', `The boundary ${formatClass(b)} is not the lower class of a boundary on the scale`);
    boundaryIndex = b - set.scale.min;
    classifierCodes = [...splits.entries()]
      .filter(([, row]) => row[boundaryIndex] > 0)
      .sort((x, y) => y[1][boundaryIndex] - x[1][boundaryIndex] || (x[0] < y[0] ? -1 : 1))
      .slice(0, PROPOSED_CLASSIFIERS)
      .map(([code]) => code);
    source = { kind: 'boundary', ref: String(b) };
    title = `The ${formatClass(b)}/${formatClass(b + 1)} boundary`;
  }
  const lower = set.scale.min + boundaryIndex;
  const cases: ExerciseProposal['cases'] = [];
  for (let a = set.assessmentCount - 1; a >= 0 && cases.length < PROPOSED_CASES; a--) {
    let hasLower = false;
    let hasUpper = false;
    for (let p = set.ratingStart[a]; p < set.ratingStart[a + 1]; p++) {
      if (set.ratingClass[p] === boundaryIndex) hasLower = true;
      if (set.ratingClass[p] === boundaryIndex + 1) hasUpper = true;
    }
    if (!hasLower || !hasUpper) continue;
    const panel = set.panelClass[a];
    const reference = panel >= 0 ? set.scale.min + panel : lower;
    const date = new Date(set.day[a] * DAY_MS).toISOString().slice(0, 10);
    cases.push({
      description: `Assessment ${set.assessmentIds[a]} of ${date}: the panel split between ${formatClass(lower)} and ${formatClass(lower + 1)}. Describe what the video shows before sending.`,
      videoUrl: null,
      skills: [...SKILLS],
      referenceClass: reference,
    });
  }
  return {
    title,
    source,
    boundary: lower,
    cases,
    classifierCodes,
    note: 'Proposed reference classes are the panels’ final classes: confirm each with the senior panel before opening.',
  };
}

/**
 * Calibration flags: the lead's thresholds, their evaluation on the federation's ratings
 * (through the agreement engine), their persistence with a status of the lead's (open →
 * acknowledged → closed with a note), and an e-mail to the federation's leads when new flags open.
 *
 * Three rules with fixed ids, each a written statistical test with Benjamini–Hochberg control
 * across the roster (server/analysis/calibration-rules.ts; decision record 0008 gives the
 * simulated false-flag rates and power):
 * - bias: a persistent lean from the rest of the panel over the last `biasWindow` ratings;
 * - drift: a change in the classifier's own level relative to their own earlier ratings
 *   (change-point permutation test on all ratings, or those after a closed drift flag);
 * - agreement: same-class agreement with the rest of the panel below the other classifiers'.
 *
 * Flags stay true: every evaluation (after each data change, after new thresholds, and before
 * flags are read at a data version not yet evaluated) refreshes the evidence of open and
 * acknowledged flags. A flag whose condition no longer holds keeps its status but is marked
 * "no longer met" with the date, the reason and today's figures (never the old ones); it is
 * met again when the condition returns. A closed flag is not raised again on the same ratings:
 * bias and agreement open a new one only on ratings newer than the closed flag's evidence, and
 * drift is then tested on the ratings after it.
 */
import { dayToIsoDate, evaluateCalibration, isoDateToDay, type ClassifierCalibration } from '../analysis';
import type { AppContext } from '../context';
import { HttpError, notFound } from '../http/errors';
import {
  DEFAULT_FLAG_THRESHOLDS,
  FLAG_RULES,
  FLAG_RULE_LABELS,
  flagThresholdsSchema,
  type CalibrationFlag,
  type EvaluateResponse,
  type FlagEvidence,
  type FlagRule,
  type FlagThresholds,
  type FlagUpdate,
} from '../../shared/schemas/analytics';
import { federationData } from './analytics-data';
import { audit, auditSync } from './audit';
import { dataVersion, onDataChange } from './data-version';

// ---------------------------------------------------------------------------------------------
// Thresholds

export async function thresholdsOf(ctx: AppContext, federationId: number): Promise<FlagThresholds> {
  const row = await ctx.db
    .selectFrom('calibration_thresholds')
    .select('thresholds')
    .where('federation_id', '=', federationId)
    .executeTakeFirst();
  if (!row) return { ...DEFAULT_FLAG_THRESHOLDS };
  const parsed = flagThresholdsSchema.safeParse({ ...DEFAULT_FLAG_THRESHOLDS, ...(JSON.parse(row.thresholds) as object) });
  return parsed.success ? parsed.data : { ...DEFAULT_FLAG_THRESHOLDS };
}

export async function saveThresholds(
  ctx: AppContext,
  federationId: number,
  userId: number | null,
  thresholds: FlagThresholds,
): Promise<void> {
  await ctx.db.transaction().execute(async (trx) => {
    await trx
      .insertInto('calibration_thresholds')
      .values({ federation_id: federationId, thresholds: JSON.stringify(thresholds), updated_by: userId })
      .onConflict((oc) =>
        oc
          .column('federation_id')
          .doUpdateSet({ thresholds: JSON.stringify(thresholds), updated_by: userId, updated_at: new Date().toISOString() }),
      )
      .execute();
    await audit(trx, {
      federationId,
      userId,
      action: 'update',
      entity: 'calibration_thresholds',
      entityId: federationId,
      detail: { ...thresholds },
    });
  });
}

// ---------------------------------------------------------------------------------------------
// Reading flags

interface FlagRow {
  id: number;
  classifier_code: string;
  classifier_name: string;
  rule: FlagRule;
  status: CalibrationFlag['status'];
  note: string | null;
  evidence: string;
  still_met: number;
  opened_at: string;
  updated_at: string;
  evaluated_at: string;
  lapsed_at: string | null;
  lapse_reason: string | null;
}

function toFlag(r: FlagRow): CalibrationFlag {
  return {
    id: r.id,
    classifierCode: r.classifier_code,
    classifierName: r.classifier_name,
    rule: r.rule,
    status: r.status,
    note: r.note,
    evidence: JSON.parse(r.evidence) as FlagEvidence,
    stillMet: r.still_met === 1,
    lapsedAt: r.lapsed_at,
    lapseReason: r.lapse_reason,
    openedAt: r.opened_at,
    updatedAt: r.updated_at,
    evaluatedAt: r.evaluated_at,
  };
}

/** The federation's flags, newest first; `activeOnly` leaves out closed ones. */
export async function flagsOf(ctx: AppContext, federationId: number, options: { activeOnly: boolean }): Promise<CalibrationFlag[]> {
  let q = ctx.db
    .selectFrom('calibration_flags as f')
    .innerJoin('classifiers as c', 'c.id', 'f.classifier_id')
    .select([
      'f.id',
      'c.code as classifier_code',
      'c.display_name as classifier_name',
      'f.rule',
      'f.status',
      'f.note',
      'f.evidence',
      'f.still_met',
      'f.opened_at',
      'f.updated_at',
      'f.evaluated_at',
      'f.lapsed_at',
      'f.lapse_reason',
    ])
    .where('f.federation_id', '=', federationId);
  if (options.activeOnly) q = q.where('f.status', '!=', 'closed');
  const rows = (await q.orderBy('f.id', 'desc').execute()) as FlagRow[];
  return rows.map(toFlag);
}

export async function lastEvaluation(ctx: AppContext, federationId: number): Promise<string | null> {
  const row = await ctx.db
    .selectFrom('calibration_flags')
    .select((eb) => eb.fn.max('evaluated_at').as('at'))
    .where('federation_id', '=', federationId)
    .executeTakeFirst();
  return (row?.at as string | null | undefined) ?? null;
}

export async function updateFlag(
  ctx: AppContext,
  federationId: number,
  flagId: number,
  userId: number | null,
  update: FlagUpdate,
): Promise<CalibrationFlag> {
  const existing = await ctx.db
    .selectFrom('calibration_flags')
    .select(['id', 'status'])
    .where('id', '=', flagId)
    .where('federation_id', '=', federationId)
    .executeTakeFirst();
  if (!existing) throw notFound('The flag');
  if (existing.status === 'closed' && update.status !== 'closed') {
    throw new HttpError(409, 'conflict', 'A closed flag stays closed; a new flag opens if the condition is met again on newer ratings');
  }
  await ctx.db.transaction().execute(async (trx) => {
    await trx
      .updateTable('calibration_flags')
      .set({ status: update.status, note: update.note ?? null, status_by: userId, updated_at: new Date().toISOString() })
      .where('id', '=', flagId)
      .execute();
    await audit(trx, {
      federationId,
      userId,
      action: `flag.${update.status}`,
      entity: 'calibration_flag',
      entityId: flagId,
      detail: { note: update.note ?? null },
    });
  });
  const flags = await flagsOf(ctx, federationId, { activeOnly: false });
  return flags.find((f) => f.id === flagId)!;
}

// ---------------------------------------------------------------------------------------------
// Evaluation

interface Finding {
  rule: FlagRule;
  met: boolean;
  evidence: FlagEvidence;
  /** Why the condition does not hold (when not met). */
  why: string;
}

const fmt = (x: number, digits = 2) => x.toFixed(digits);
const signed = (x: number, digits = 2) => `${x > 0 ? '+' : x < 0 ? '−' : ''}${Math.abs(x).toFixed(digits)}`;
const pct = (x: number) => `${Math.round(100 * x)} %`;
const pText = (p: number | null) => (p === null ? 'not computed' : p < 0.001 ? '< 0.001' : `= ${p.toFixed(3)}`);
const points = (x: number) => `${fmt(Math.abs(x))} point${Math.abs(x) === 1 ? '' : 's'}`;
const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
const monthOf = (iso: string) => `${MONTHS[Number(iso.slice(5, 7)) - 1]} ${iso.slice(0, 4)}`;

/** Midway between two ISO dates (the estimated start of a change that happened between them). */
function midway(a: string, b: string): string {
  const x = isoDateToDay(a);
  const y = isoDateToDay(b);
  return x === null || y === null ? b : dayToIsoDate(Math.floor((x + y) / 2));
}

function windowText(n: number, total: number, from: string | null, to: string | null): string {
  const which = n >= total ? `all ${n} ratings` : `the last ${n} of ${total} ratings`;
  return from && to ? `${which} (${from} to ${to})` : which;
}

/** The three rules' figures for one classifier as flag evidence, met or not. */
export function findingsOf(v: ClassifierCalibration, th: FlagThresholds): Finding[] {
  const q = th.falseDiscoveryRate;
  const test = (pAdj: number | null) =>
    `Benjamini–Hochberg adjusted p ${pText(pAdj)} at a false-discovery rate of ${pct(q)} across the roster`;
  const out: Finding[] = [];

  const b = v.bias;
  const bWin = windowText(b.n, b.total, b.from, b.to);
  out.push({
    rule: 'bias',
    met: b.met,
    why:
      b.mean === null
        ? (b.reason ?? 'not enough ratings')
        : Math.abs(b.mean) < th.biasMin
          ? `the lean is ${points(b.mean)}, below the minimum of ${fmt(th.biasMin)}`
          : 'the lean is within what chance explains across the roster',
    evidence: {
      summary:
        b.mean === null
          ? `Not tested: ${b.reason ?? 'not enough ratings'}.`
          : `Over ${bWin}, ${b.mean >= 0 ? 'higher' : 'lower'} than the rest of the panel by ${points(b.mean)} on average ` +
            `(95 % CI ${signed(b.ci95![0])} to ${signed(b.ci95![1])}; t test, ${test(b.pAdjusted)}; minimum lean ${fmt(th.biasMin)}).`,
      plain:
        b.mean === null
          ? undefined
          : `In ${bWin.replace(/^the last/, 'your last').replace(/^all/, 'all your')}, you gave on average ${points(b.mean)} ${b.mean >= 0 ? 'higher' : 'lower'} than the other members of your panels.`,
      value: b.mean,
      ci95: b.ci95,
      threshold: th.biasMin,
      n: b.n,
      from: b.from,
      to: b.to,
      direction: b.mean === null || b.mean === 0 ? null : b.mean > 0 ? 'up' : 'down',
      total: b.total,
      p: b.p,
      pAdjusted: b.pAdjusted,
      falseDiscoveryRate: q,
    },
  });

  const d = v.drift;
  const hasChange = d.meanBefore !== null && d.meanAfter !== null && d.changeDate !== null && d.lastBefore !== null;
  const changeDate = hasChange ? midway(d.lastBefore!, d.changeDate!) : null;
  const size = hasChange ? d.meanAfter! - d.meanBefore! : null;
  out.push({
    rule: 'drift',
    met: d.met,
    why: !hasChange
      ? (d.reason ?? 'not enough ratings')
      : Math.abs(size!) < th.driftMin
        ? `the largest change of level is ${points(size!)}, below the minimum of ${fmt(th.driftMin)}`
        : 'no change of level beyond what chance explains across the roster',
    evidence: {
      summary: !hasChange
        ? `Not tested: ${d.reason ?? 'not enough ratings'}.`
        : `Over ${windowText(d.n, d.total, d.from, d.to)}: the strongest change of level is around ${changeDate} (between ${d.lastBefore} and ${d.changeDate}). ` +
          `Before it ${d.nBefore} ratings at ${signed(d.meanBefore!)} point from the rest of the panel on average, after it ${d.nAfter} at ${signed(d.meanAfter!)} ` +
          `(${size! >= 0 ? 'up' : 'down'} ${points(size!)}; permutation change-point test, ${test(d.pAdjusted)}; minimum change ${fmt(th.driftMin)}).`,
      plain: !hasChange
        ? undefined
        : `Compared with your own earlier ratings, your ratings moved ${size! >= 0 ? 'higher' : 'lower'} from about ${monthOf(changeDate!)}: ` +
          `before, ${points(d.meanBefore!)} ${d.meanBefore! >= 0 ? 'above' : 'below'} the rest of the panel on average (${d.nBefore} ratings); ` +
          `since, ${points(d.meanAfter!)} ${d.meanAfter! >= 0 ? 'above' : 'below'} (${d.nAfter} ratings).`,
      value: size,
      ci95: null,
      threshold: th.driftMin,
      n: d.n,
      from: d.from,
      to: d.to,
      direction: d.direction,
      total: d.total,
      p: d.p,
      pAdjusted: d.pAdjusted,
      falseDiscoveryRate: q,
      changeDate,
      changeBetween: hasChange ? [d.lastBefore!, d.changeDate!] : null,
      sizeBefore: d.meanBefore,
      sizeAfter: d.meanAfter,
      nBefore: d.nBefore,
      nAfter: d.nAfter,
    },
  });

  const a = v.agreement;
  const aWin = windowText(a.n, a.total, a.from, a.to);
  out.push({
    rule: 'agreement',
    met: a.met,
    why:
      a.rate === null || a.othersRate === null
        ? (a.reason ?? 'not enough ratings')
        : a.shortfall! < th.agreementGap
          ? `the same-class rate is ${pct(a.rate)} against ${pct(a.othersRate)}, less than ${pct(th.agreementGap)} below`
          : 'the shortfall is within what chance explains across the roster',
    evidence: {
      summary:
        a.rate === null || a.othersRate === null
          ? `Not tested: ${a.reason ?? 'not enough ratings'}.`
          : `Over ${aWin}, the other panel members gave the same class ${pct(a.rate)} of the time, against ${pct(a.othersRate)} between the other ` +
            `classifiers on the same dates (${a.shortfall! >= 0 ? 'short' : 'above'} by ${Math.abs(Math.round(100 * a.shortfall!))} percentage points; ` +
            `one-sided z test, ${test(a.pAdjusted)}; minimum shortfall ${pct(th.agreementGap)}).`,
      plain:
        a.rate === null || a.othersRate === null
          ? undefined
          : `In ${aWin.replace(/^the last/, 'your last').replace(/^all/, 'all your')}, the other members of your panels gave the same class as you ${pct(a.rate)} of the time; ` +
            `between other classifiers it was ${pct(a.othersRate)}.`,
      value: a.rate,
      ci95: a.ci95,
      threshold: th.agreementGap,
      n: a.n,
      from: a.from,
      to: a.to,
      direction: null,
      total: a.total,
      p: a.p,
      pAdjusted: a.pAdjusted,
      falseDiscoveryRate: q,
      othersRate: a.othersRate,
    },
  });
  return out;
}

/** Evidence when a classifier has no rating left in a panel (e.g. after a revert). */
function noRatings(rule: FlagRule, th: FlagThresholds): Finding {
  const threshold = rule === 'bias' ? th.biasMin : rule === 'drift' ? th.driftMin : th.agreementGap;
  return {
    rule,
    met: false,
    why: 'no rating in a panel of two or more is left',
    evidence: {
      summary: 'No rating in a panel of two or more.',
      value: null,
      ci95: null,
      threshold,
      n: 0,
      from: null,
      to: null,
      direction: null,
      total: 0,
    },
  };
}

interface LatestRow {
  id: number;
  status: string;
  evidence_through: string | null;
  still_met: number;
}

export interface EvaluateOptions {
  /** What changed, recorded with flags that stop holding (e.g. "an import was reverted"). */
  cause?: string;
}

/**
 * Evaluates every classifier of the federation on all of its ratings and updates the flags:
 * opens new ones, refreshes the evidence of open and acknowledged ones, and marks those whose
 * condition no longer holds (with today's figures and the reason). E-mails the leads about new
 * flags and flags that stopped holding, when the thresholds say so.
 */
export async function evaluateFlags(ctx: AppContext, federationId: number, options: EvaluateOptions = {}): Promise<EvaluateResponse> {
  const version = dataVersion(ctx, federationId);
  const federation = await ctx.db
    .selectFrom('federations')
    .select(['id', 'slug', 'name', 'scale_min as scaleMin', 'scale_max as scaleMax'])
    .where('id', '=', federationId)
    .executeTakeFirst();
  if (!federation) throw notFound('The federation');
  const th = await thresholdsOf(ctx, federationId);
  const data = federationData(ctx, federation);
  const set = data.set;
  const cause = options.cause ?? 'the data or the thresholds changed';

  const latest = ctx.sqlite.prepare(
    'select id, status, evidence_through, still_met from calibration_flags where classifier_id = ? and rule = ? order by id desc limit 1',
  );
  // A closed drift flag: test for a new change on the ratings after its evidence only.
  const driftSince = new Map<string, string>();
  for (const [code, roster] of data.classifiers) {
    const prev = latest.get(roster.id, 'drift') as LatestRow | undefined;
    if (prev && prev.status === 'closed' && prev.evidence_through) driftSince.set(code, prev.evidence_through);
  }
  const verdicts = evaluateCalibration(set, th, { driftSince });
  const findings = new Map<string, Finding[]>(verdicts.map((v) => [v.code, findingsOf(v, th)]));

  const now = new Date().toISOString();
  const opened: { code: string; name: string; rule: FlagRule; summary: string }[] = [];
  const lapsed: { code: string; name: string; rule: FlagRule; summary: string }[] = [];
  let updated = 0;
  const insert = ctx.sqlite.prepare(
    "insert into calibration_flags (federation_id, classifier_id, rule, status, evidence, evidence_through, still_met, opened_at, updated_at, evaluated_at) values (?, ?, ?, 'open', ?, ?, 1, ?, ?, ?)",
  );
  const refresh = ctx.sqlite.prepare(
    'update calibration_flags set evidence = ?, evidence_through = ?, still_met = 1, lapsed_at = null, lapse_reason = null, evaluated_at = ? where id = ?',
  );
  const lapse = ctx.sqlite.prepare(
    'update calibration_flags set evidence = ?, still_met = 0, lapsed_at = ?, lapse_reason = ?, evaluated_at = ? where id = ?',
  );
  const touch = ctx.sqlite.prepare('update calibration_flags set evidence = ?, evaluated_at = ? where id = ?');

  ctx.sqlite
    .transaction(() => {
      for (const [code, roster] of data.classifiers) {
        const all = findings.get(code);
        for (const rule of FLAG_RULES) {
          const finding = all?.find((f) => f.rule === rule) ?? noRatings(rule, th);
          const prev = latest.get(roster.id, rule) as LatestRow | undefined;
          const evidence = JSON.stringify(finding.evidence);
          if (finding.met) {
            const through = finding.evidence.to;
            if (prev && prev.status !== 'closed') {
              refresh.run(evidence, through, now, prev.id);
              updated++;
            } else if (
              rule !== 'drift' &&
              prev &&
              prev.status === 'closed' &&
              prev.evidence_through !== null &&
              through !== null &&
              through <= prev.evidence_through
            ) {
              // Closed on these very ratings: wait for newer ones.
            } else {
              insert.run(federationId, roster.id, rule, evidence, through, now, now, now);
              opened.push({ code, name: roster.name, rule, summary: finding.evidence.summary });
            }
          } else if (prev && prev.status !== 'closed') {
            if (prev.still_met === 1) {
              lapse.run(evidence, now, `No longer met after ${cause}: ${finding.why}.`, now, prev.id);
              lapsed.push({ code, name: roster.name, rule, summary: finding.why });
              updated++;
            } else touch.run(evidence, now, prev.id);
          }
        }
      }
      if (opened.length > 0)
        auditSync(ctx.sqlite, { federationId, action: 'flags.opened', entity: 'calibration_flag', detail: { count: opened.length } });
      if (lapsed.length > 0)
        auditSync(ctx.sqlite, {
          federationId,
          action: 'flags.lapsed',
          entity: 'calibration_flag',
          detail: { count: lapsed.length, cause },
        });
    })
    .immediate();
  markEvaluated(ctx, federationId, version);

  if ((opened.length > 0 || lapsed.length > 0) && th.notifyLead) await notifyLeads(ctx, federation, opened, lapsed);
  return { opened: opened.length, updated, lapsed: lapsed.length, evaluatedAt: now };
}

type Mention = { code: string; name: string; rule: FlagRule; summary: string };

async function notifyLeads(
  ctx: AppContext,
  federation: { id: number; slug: string; name: string },
  opened: Mention[],
  lapsed: Mention[],
): Promise<void> {
  const mailer = ctx.mailer;
  if (!mailer) {
    ctx.logger.warn(
      { federation: federation.slug, flags: opened.length, lapsed: lapsed.length },
      'calibration flags changed, but no mailer is configured',
    );
    return;
  }
  const leads = await ctx.db
    .selectFrom('memberships')
    .innerJoin('users', 'users.id', 'memberships.user_id')
    .select(['users.email'])
    .where('memberships.federation_id', '=', federation.id)
    .where('memberships.role', '=', 'lead')
    .where('memberships.active', '=', 1)
    .execute();
  const origin = ctx.config.publicOrigin;
  const link = `${origin}/f/${federation.slug}/flags`;
  const plural = (n: number) => (n === 1 ? '' : 's');
  const subject =
    opened.length > 0
      ? `${opened.length} new calibration flag${plural(opened.length)} in ${federation.name}`
      : `${lapsed.length} calibration flag${plural(lapsed.length)} no longer met in ${federation.name}`;
  const text = [
    ...(opened.length > 0
      ? [
          `Panelwise opened ${opened.length} calibration flag${plural(opened.length)} after the latest evaluation:`,
          '',
          ...opened.map((o) => `- ${o.code} (${o.name}): ${FLAG_RULE_LABELS[o.rule]}. ${o.summary}`),
          '',
        ]
      : []),
    ...(lapsed.length > 0
      ? [
          `No longer met (the flag stays until you close it; its figures are today's):`,
          '',
          ...lapsed.map((o) => `- ${o.code} (${o.name}): ${FLAG_RULE_LABELS[o.rule]}: ${o.summary}.`),
          '',
        ]
      : []),
    `Review them: ${link}`,
    '',
    'A flag is a prompt to look at the ratings, not a finding. Agreement statistics describe consistency between classifiers,',
    'not the correctness of any athlete’s class; decisions belong to the federation’s rules and licensed classifiers.',
  ].join('\n');
  for (const lead of leads) {
    try {
      await mailer.send({ to: lead.email, subject, text, federation: federation.slug });
    } catch (err) {
      ctx.logger.error({ err, to: lead.email }, 'could not send the calibration flags e-mail');
    }
  }
}

/** Per app: the data version each federation's flags were last evaluated at, and an evaluation in flight. */
const evaluatedAt = new WeakMap<AppContext, Map<number, { version: number; running?: Promise<unknown> }>>();

function stateOf(ctx: AppContext): Map<number, { version: number; running?: Promise<unknown> }> {
  let state = evaluatedAt.get(ctx);
  if (!state) evaluatedAt.set(ctx, (state = new Map<number, { version: number; running?: Promise<unknown> }>()));
  return state;
}

function markEvaluated(ctx: AppContext, federationId: number, version: number): void {
  const state = stateOf(ctx);
  const entry = state.get(federationId);
  if (entry) entry.version = version;
  else state.set(federationId, { version });
}

/**
 * Runs evaluateFlags off the request path, in the app's worker pool (server/workers/pool.ts):
 * the engine's figures on every rating are computed there; new flags' e-mail goes out from here.
 */
export function evaluateFlagsInPool(
  ctx: AppContext,
  federationId: number,
  options: { background?: boolean; cause?: string } = {},
): Promise<EvaluateResponse> {
  return ctx.pool.run('flags.evaluate', { federationId, cause: options.cause }, { federationId, background: options.background });
}

/**
 * Evaluates a federation's flags before they are shown whenever they were not yet evaluated at
 * the federation's current data version (after a restart, for data seeded without an import,
 * or when a read arrives before the background evaluation of a data change has finished), so
 * no page shows a flag on data that has changed since.
 */
export async function ensureEvaluated(ctx: AppContext, federationId: number): Promise<void> {
  const state = stateOf(ctx);
  for (let attempt = 0; attempt < 3; attempt++) {
    const entry = state.get(federationId);
    if (entry?.running) {
      await entry.running.catch(() => undefined);
      continue;
    }
    if (entry && entry.version === dataVersion(ctx, federationId)) return;
    await runEvaluation(ctx, federationId, 'a data change');
  }
}

/**
 * One evaluation at a time per federation, in the pool; callers share the one in flight. The
 * main thread records the data version it was asked at (the worker evaluates at least that one).
 */
export async function runEvaluation(
  ctx: AppContext,
  federationId: number,
  cause: string,
  options: { background?: boolean } = {},
): Promise<EvaluateResponse | undefined> {
  const state = stateOf(ctx);
  let entry = state.get(federationId);
  if (!entry) state.set(federationId, (entry = { version: -1 }));
  if (entry.running) {
    await entry.running;
    return undefined;
  }
  const version = dataVersion(ctx, federationId);
  const running = evaluateFlagsInPool(ctx, federationId, { cause, background: options.background });
  entry.running = running;
  try {
    const result = await running;
    markEvaluated(ctx, federationId, version);
    return result;
  } finally {
    entry.running = undefined;
  }
}

const registered = new WeakSet<AppContext>();

/** The durable background job that re-evaluates a federation's flags after its data changed. */
export const FLAG_EVALUATION_JOB = 'flags.evaluate';

/**
 * Re-evaluates a federation's flags after each data change (imports committed or reverted), in
 * the background: the job is tracked by `ctx.jobs` (tests await `ctx.jobs.idle()`) and recorded
 * in background_jobs until it has run, so an evaluation cut short by a restart runs again at the
 * next start; reads wait for it through `ensureEvaluated`. Call once per app; errors are logged,
 * never thrown into the import that changed the data.
 */
export function evaluateFlagsOnDataChange(ctx: AppContext): void {
  if (registered.has(ctx)) return;
  registered.add(ctx);
  ctx.jobs.define(FLAG_EVALUATION_JOB, async (federationId) => {
    const exists = await ctx.db.selectFrom('federations').select('id').where('id', '=', federationId).executeTakeFirst();
    if (exists) await runEvaluation(ctx, federationId, 'a data change (an import committed or reverted)', { background: true });
  });
  onDataChange(ctx, (federationId) => ctx.jobs.enqueue(FLAG_EVALUATION_JOB, federationId));
  ctx.jobs.resume(FLAG_EVALUATION_JOB);
}

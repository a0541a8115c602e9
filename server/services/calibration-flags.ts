/**
 * Calibration flags: the lead's thresholds, their evaluation on the federation's ratings
 * (through the agreement engine), their persistence with a status of the lead's (open →
 * acknowledged → closed with a note), and an e-mail to the federation's leads when new flags open.
 *
 * Rules (defaults in docs/dashboards.md):
 * - kappa: quadratically weighted kappa with the panel over the classifier's last `kappaWindow`
 *   ratings below `kappaMin`;
 * - bias: |mean signed deviation from the other panel members| over the last `biasWindow`
 *   ratings of `biasMax` points or more;
 * - drift: the engine's CUSUM (decision 0002, with `driftK`, `driftH`) alarmed within the
 *   classifier's last `driftWindow` ratings.
 * Kappa and bias need at least `minRatings` ratings in their window.
 *
 * A flag stays until the lead closes it. A closed flag is not raised again on the same ratings:
 * a new one opens only when the condition holds on ratings newer than the closed flag's evidence.
 */
import { classifierDrift, othersMedian, recentPanelComparison, type RatingSet } from '../analysis';
import type { AppContext } from '../context';
import { HttpError, notFound } from '../http/errors';
import {
  DEFAULT_FLAG_THRESHOLDS,
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
import { audit } from './audit';
import { onDataChange } from './data-version';

// ---------------------------------------------------------------------------------------------
// Thresholds

export async function thresholdsOf(ctx: AppContext, federationId: number): Promise<FlagThresholds> {
  const row = await ctx.db.selectFrom('calibration_thresholds').select('thresholds').where('federation_id', '=', federationId).executeTakeFirst();
  if (!row) return { ...DEFAULT_FLAG_THRESHOLDS };
  const parsed = flagThresholdsSchema.safeParse({ ...DEFAULT_FLAG_THRESHOLDS, ...(JSON.parse(row.thresholds) as object) });
  return parsed.success ? parsed.data : { ...DEFAULT_FLAG_THRESHOLDS };
}

export async function saveThresholds(ctx: AppContext, federationId: number, userId: number | null, thresholds: FlagThresholds): Promise<void> {
  await ctx.db.transaction().execute(async (trx) => {
    await trx
      .insertInto('calibration_thresholds')
      .values({ federation_id: federationId, thresholds: JSON.stringify(thresholds), updated_by: userId })
      .onConflict((oc) =>
        oc.column('federation_id').doUpdateSet({ thresholds: JSON.stringify(thresholds), updated_by: userId, updated_at: new Date().toISOString() }),
      )
      .execute();
    await audit(trx, { federationId, userId, action: 'update', entity: 'calibration_thresholds', entityId: federationId, detail: { ...thresholds } });
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

export async function updateFlag(ctx: AppContext, federationId: number, flagId: number, userId: number | null, update: FlagUpdate): Promise<CalibrationFlag> {
  const existing = await ctx.db.selectFrom('calibration_flags').select(['id', 'status']).where('id', '=', flagId).where('federation_id', '=', federationId).executeTakeFirst();
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
    await audit(trx, { federationId, userId, action: `flag.${update.status}`, entity: 'calibration_flag', entityId: flagId, detail: { note: update.note ?? null } });
  });
  const flags = await flagsOf(ctx, federationId, { activeOnly: false });
  return flags.find((f) => f.id === flagId)!;
}

// ---------------------------------------------------------------------------------------------
// Evaluation

interface Finding {
  rule: FlagRule;
  evidence: FlagEvidence;
}

const fmt = (x: number, digits = 2) => x.toFixed(digits);

/** The conditions met by one classifier under the thresholds (engine figures only). */
export function findingsFor(set: RatingSet, code: string, th: FlagThresholds, medians: Float64Array = othersMedian(set)): Finding[] {
  const out: Finding[] = [];
  const kw = recentPanelComparison(set, code, th.kappaWindow, medians);
  const kappa = kw.comparison?.quadraticKappaWithPanel;
  if (kw.n >= th.minRatings && kappa && kappa.value !== null && kappa.value < th.kappaMin) {
    out.push({
      rule: 'kappa',
      evidence: {
        summary: `Quadratically weighted kappa with the panel over the last ${kw.n} ratings is ${fmt(kappa.value)}, below ${fmt(th.kappaMin)}.`,
        value: kappa.value,
        ci95: kappa.ci95,
        threshold: th.kappaMin,
        n: kw.n,
        from: kw.from,
        to: kw.to,
        direction: null,
      },
    });
  }
  const bw = recentPanelComparison(set, code, th.biasWindow, medians);
  const bias = bw.comparison?.meanDeviation;
  if (bw.n >= Math.min(th.minRatings, th.biasWindow) && bias && bias.value !== null && Math.abs(bias.value) >= th.biasMax - 1e-12) {
    out.push({
      rule: 'bias',
      evidence: {
        summary: `Over the last ${bw.n} ratings, ${bias.value > 0 ? 'higher' : 'lower'} than the rest of the panel by ${fmt(Math.abs(bias.value))} point on average (threshold ${fmt(th.biasMax)}).`,
        value: bias.value,
        ci95: bias.ci95,
        threshold: th.biasMax,
        n: bw.n,
        from: bw.from,
        to: bw.to,
        direction: bias.value > 0 ? 'up' : 'down',
      },
    });
  }
  if (th.driftEnabled) {
    const drift = classifierDrift(set, code, { k: th.driftK, h: th.driftH });
    const last = drift.alarms[drift.alarms.length - 1];
    if (last && last.index >= drift.n - th.driftWindow) {
      out.push({
        rule: 'drift',
        evidence: {
          summary: `The change detector (CUSUM, k = ${fmt(th.driftK)}, h = ${fmt(th.driftH, 1)}) signalled a drift to rating ${last.direction === 'up' ? 'higher' : 'lower'} at rating ${last.index + 1} of ${drift.n}.`,
          value: last.statistic,
          ci95: null,
          threshold: th.driftH,
          n: drift.n,
          from: drift.dates[last.index] ?? null,
          to: drift.dates[drift.n - 1] ?? null,
          direction: last.direction,
        },
      });
    }
  }
  return out;
}

/**
 * Evaluates every classifier of the federation on all of its ratings and updates the flags:
 * opens new ones, refreshes the evidence of open and acknowledged ones, and marks those whose
 * condition no longer holds. E-mails the leads about new flags when the thresholds say so.
 */
export async function evaluateFlags(ctx: AppContext, federationId: number): Promise<EvaluateResponse> {
  let done = evaluatedOnce.get(ctx);
  if (!done) evaluatedOnce.set(ctx, (done = new Set()));
  done.add(federationId);
  const federation = await ctx.db
    .selectFrom('federations')
    .select(['id', 'slug', 'name', 'scale_min as scaleMin', 'scale_max as scaleMax'])
    .where('id', '=', federationId)
    .executeTakeFirst();
  if (!federation) throw notFound('The federation');
  const th = await thresholdsOf(ctx, federationId);
  const data = federationData(ctx, federation);
  const set = data.set;
  const medians = othersMedian(set);
  const used = new Set<string>();
  for (let p = 0; p < set.ratingCount; p++) used.add(set.classifierCodes[set.ratingClassifier[p]!]!);
  const findings = new Map<string, Finding[]>();
  for (const code of used) findings.set(code, findingsFor(set, code, th, medians));

  const now = new Date().toISOString();
  const opened: { code: string; name: string; rule: FlagRule; summary: string }[] = [];
  let updated = 0;
  const latest = ctx.sqlite.prepare(
    'select id, status, evidence_through, still_met from calibration_flags where classifier_id = ? and rule = ? order by id desc limit 1',
  );
  const insert = ctx.sqlite.prepare(
    "insert into calibration_flags (federation_id, classifier_id, rule, status, evidence, evidence_through, still_met, opened_at, updated_at, evaluated_at) values (?, ?, ?, 'open', ?, ?, 1, ?, ?, ?)",
  );
  const refresh = ctx.sqlite.prepare('update calibration_flags set evidence = ?, evidence_through = ?, still_met = 1, evaluated_at = ? where id = ?');
  const lapse = ctx.sqlite.prepare('update calibration_flags set still_met = 0, evaluated_at = ? where id = ?');
  const touch = ctx.sqlite.prepare('update calibration_flags set evaluated_at = ? where id = ?');

  ctx.sqlite.transaction(() => {
    for (const [code, roster] of data.classifiers) {
      const met = findings.get(code) ?? [];
      for (const rule of ['kappa', 'bias', 'drift'] as const) {
        const finding = met.find((f) => f.rule === rule);
        const prev = latest.get(roster.id, rule) as { id: number; status: string; evidence_through: string | null; still_met: number } | undefined;
        if (finding) {
          const through = finding.evidence.to;
          if (prev && prev.status !== 'closed') {
            refresh.run(JSON.stringify(finding.evidence), through, now, prev.id);
            updated++;
          } else if (prev && prev.status === 'closed' && prev.evidence_through !== null && through !== null && through <= prev.evidence_through) {
            // Closed on these very ratings: wait for newer ones.
          } else {
            insert.run(federationId, roster.id, rule, JSON.stringify(finding.evidence), through, now, now, now);
            opened.push({ code, name: roster.name, rule, summary: finding.evidence.summary });
          }
        } else if (prev && prev.status !== 'closed') {
          if (prev.still_met === 1) {
            lapse.run(now, prev.id);
            updated++;
          } else touch.run(now, prev.id);
        }
      }
    }
  }).immediate();

  if (opened.length > 0) {
    await audit(ctx.db, { federationId, action: 'flags.opened', entity: 'calibration_flag', detail: { count: opened.length } });
    if (th.notifyLead) await notifyLeads(ctx, federation, opened);
  }
  return { opened: opened.length, updated, evaluatedAt: now };
}

async function notifyLeads(
  ctx: AppContext,
  federation: { id: number; slug: string; name: string },
  opened: { code: string; name: string; rule: FlagRule; summary: string }[],
): Promise<void> {
  const mailer = ctx.mailer;
  if (!mailer) {
    ctx.logger.warn({ federation: federation.slug, flags: opened.length }, 'new calibration flags, but no mailer is configured');
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
  const subject = `${opened.length} new calibration flag${opened.length === 1 ? '' : 's'} in ${federation.name}`;
  const lines = opened.map((o) => `- ${o.code} (${o.name}): ${FLAG_RULE_LABELS[o.rule]}. ${o.summary}`);
  const text = [
    `Panelwise opened ${opened.length} calibration flag${opened.length === 1 ? '' : 's'} after the latest data change:`,
    '',
    ...lines,
    '',
    `Review them: ${link}`,
    '',
    'Agreement statistics describe consistency between classifiers, not the correctness of any athlete’s class.',
  ].join('\n');
  for (const lead of leads) {
    try {
      await mailer.send({ to: lead.email, subject, text });
    } catch (err) {
      ctx.logger.error({ err, to: lead.email }, 'could not send the calibration flags e-mail');
    }
  }
}

const evaluatedOnce = new WeakMap<AppContext, Set<number>>();

/**
 * Runs evaluateFlags off the request path, in the app's worker pool (server/workers/pool.ts):
 * the engine's figures on every rating are computed there; new flags' e-mail goes out from here.
 * Evaluations of one federation asked for at the same data version share one run.
 */
export function evaluateFlagsInPool(ctx: AppContext, federationId: number, options: { background?: boolean } = {}): Promise<EvaluateResponse> {
  return ctx.pool.run('flags.evaluate', { federationId }, { federationId, background: options.background });
}

/**
 * Evaluates a federation's flags once per process before they are first shown (after a
 * restart, or for data seeded without an import), so the lists are never stale by more than
 * one data change.
 */
export async function ensureEvaluated(ctx: AppContext, federationId: number): Promise<void> {
  let done = evaluatedOnce.get(ctx);
  if (!done) evaluatedOnce.set(ctx, (done = new Set()));
  if (done.has(federationId)) return;
  done.add(federationId);
  try {
    await evaluateFlagsInPool(ctx, federationId);
  } catch (error) {
    // Not evaluated after all (the pool was busy, say): the next view tries again.
    done.delete(federationId);
    throw error;
  }
}

const registered = new WeakSet<AppContext>();

/** The durable background job that re-evaluates a federation's flags after its data changed. */
export const FLAG_EVALUATION_JOB = 'flags.evaluate';

/**
 * Re-evaluates a federation's flags after each data change (imports), in the background: the
 * job is tracked by `ctx.jobs` (tests await `ctx.jobs.idle()`) and recorded in background_jobs
 * until it has run, so an evaluation cut short by a restart runs again at the next start. Call
 * once per app; errors are logged, never thrown into the import that changed the data.
 */
export function evaluateFlagsOnDataChange(ctx: AppContext): void {
  if (registered.has(ctx)) return;
  registered.add(ctx);
  ctx.jobs.define(FLAG_EVALUATION_JOB, async (federationId) => {
    const exists = await ctx.db.selectFrom('federations').select('id').where('id', '=', federationId).executeTakeFirst();
    if (exists) await evaluateFlagsInPool(ctx, federationId, { background: true });
  });
  onDataChange(ctx, (federationId) => ctx.jobs.enqueue(FLAG_EVALUATION_JOB, federationId));
  ctx.jobs.resume(FLAG_EVALUATION_JOB);
}

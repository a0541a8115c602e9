import { Router, type Request } from 'express';
import { z } from 'zod';
import { analyticsFiltersSchema, flagThresholdsSchema, flagUpdateSchema, type AnalyticsFilters } from '../../shared/schemas/analytics';
import { accessOf, requireAccess, type FederationAccess } from '../auth/access';
import type { AppContext } from '../context';
import { forbidden, HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import { classifierCodeOf, filterKey, MIN_ATHLETES_FOR_AGGREGATES, type ViewFilters } from '../services/analytics-data';
import { classifierDetail, classifierRows, myAgreement } from '../services/analytics';
import {
  ensureEvaluated,
  evaluateFlagsOnDataChange,
  flagsOf,
  lastEvaluation,
  runEvaluation,
  saveThresholds,
  thresholdsOf,
  updateFlag,
} from '../services/calibration-flags';
import { federationK, isResearchView } from '../services/research-cells';
import type { TaskName, TaskPayload, TaskResult } from '../workers/tasks';

/**
 * The agreement dashboards' API: /api/federations/:federation/analytics/…
 *
 * Who sees what (enforced here, whatever the client shows):
 * - lead: every view, the flags and their thresholds;
 * - classifier: federation-wide aggregates (overview, class boundaries, class drift without
 *   athletes) and their own figures (`/me`, `/classifiers/<own code>`); another classifier's
 *   figures → 403;
 * - researcher and read tokens: aggregates only; no view that names a classifier or an athlete
 *   (docs/decisions/0006-dashboards-who-sees-what.md).
 *
 * Every figure is computed in the worker pool (server/workers/pool.ts), shared between callers
 * asking for the same view at the same data version; flags are read here, as they change
 * without a data change.
 */
const base = '/federations/:federation/analytics';
const code = z.string().regex(/^[A-Za-z0-9._-]{1,64}$/, { message: 'is not a classifier code' });

function filtersOf(req: Request): AnalyticsFilters {
  return parseWith(analyticsFiltersSchema, req.query, 'filter query');
}

/** Filters finer than a cell, refused for researchers and read tokens (400, naming each field). */
const FINER_THAN_A_CELL = ['from', 'to', 'event'] as const;

/**
 * Researchers and read tokens filter by whole seasons and quarters, assessment kind and
 * category only: a day-level window or an event would cut a cell (quarter × kind × category)
 * and let two views be subtracted down to one athlete. Their figures start from the data
 * without the cells of fewer than k athletes (decision record 0007).
 */
function researchFiltersOf(ctx: AppContext, access: FederationAccess, filters: AnalyticsFilters): ViewFilters {
  const finer = FINER_THAN_A_CELL.filter((field) => filters[field] !== undefined);
  if (finer.length > 0) {
    throw new HttpError(
      400,
      'validation_failed',
      `Researchers filter by whole seasons and quarters, assessment kind and category; ${finer.join(', ')} cannot be used`,
      finer.map((path) => ({
        path,
        message:
          path === 'event'
            ? 'is not a filter for researchers: events are not shown to them'
            : 'is not a filter for researchers: choose a season or a quarter',
      })),
    );
  }
  return { ...filters, minCellAthletes: federationK(ctx.sqlite, access.federation.id) };
}

/**
 * Filters of a federation-wide aggregate view, for the caller: researchers and read tokens get
 * whole cells only (researchFiltersOf), and no one but a lead sees aggregates of fewer than
 * MIN_ATHLETES_FOR_AGGREGATES athletes.
 */
async function aggregateFiltersOf(ctx: AppContext, req: Request): Promise<ViewFilters> {
  const access = accessOf(req);
  const filters = filtersOf(req);
  if (access.role === 'lead') return filters;
  const view = isResearchView(access) ? researchFiltersOf(ctx, access, filters) : filters;
  const athletes = await athletesOf(ctx, access, view);
  if (athletes > 0 && athletes < MIN_ATHLETES_FOR_AGGREGATES) {
    throw new HttpError(
      422,
      'validation_failed',
      `These filters leave ${athletes} athletes; figures are shown for groups of at least ${MIN_ATHLETES_FOR_AGGREGATES}. Widen the filters.`,
    );
  }
  return view;
}

function federationOf(access: FederationAccess) {
  return { id: access.federation.id, scaleMin: access.federation.scaleMin, scaleMax: access.federation.scaleMax };
}

/** A view's figures from the pool, shared by every caller asking for the same key at the same data version. */
function figures<N extends TaskName>(
  ctx: AppContext,
  access: FederationAccess,
  name: N,
  payload: TaskPayload<N>,
  key: string,
): Promise<TaskResult<N>> {
  return ctx.pool.run(name, payload, { federationId: access.federation.id, key });
}

function athletesOf(ctx: AppContext, access: FederationAccess, filters: ViewFilters): Promise<number> {
  return figures(ctx, access, 'analytics.athletes', { federation: federationOf(access), filters }, filterKey(filters));
}

function classifierFiguresOf(ctx: AppContext, access: FederationAccess, filters: AnalyticsFilters) {
  return figures(ctx, access, 'analytics.classifiers', { federation: federationOf(access), filters }, filterKey(filters));
}

async function classifierDetailOf(ctx: AppContext, access: FederationAccess, filters: AnalyticsFilters, wanted: string) {
  const thresholds = await thresholdsOf(ctx, access.federation.id);
  const detail = await figures(
    ctx,
    access,
    'analytics.classifier',
    { federation: federationOf(access), filters, code: wanted, thresholds },
    `${wanted}|${filterKey(filters)}`,
  );
  return classifierDetail(ctx, access.federation.id, detail);
}

async function myAgreementOf(ctx: AppContext, access: FederationAccess, filters: AnalyticsFilters, mine: string) {
  const [detail, all] = await Promise.all([classifierDetailOf(ctx, access, filters, mine), classifierFiguresOf(ctx, access, filters)]);
  return myAgreement(detail, all);
}

async function ownCode(ctx: AppContext, access: FederationAccess): Promise<string> {
  if (access.role !== 'classifier' || access.classifierId === null)
    throw forbidden('Your account is not linked to a classifier of this federation');
  const found = await classifierCodeOf(ctx, access.classifierId);
  if (found === null) throw forbidden('Your account is not linked to a classifier of this federation');
  return found;
}

export function analyticsRouter(ctx: AppContext): Router {
  const router = Router();
  evaluateFlagsOnDataChange(ctx);

  const everyone = requireAccess(ctx, { roles: ['lead', 'classifier', 'researcher'], tokenScopes: ['read'] });
  const leadOnly = requireAccess(ctx, { roles: ['lead'] });
  const leadOrClassifier = requireAccess(ctx, { roles: ['lead', 'classifier'] });
  const classifierOnly = requireAccess(ctx, { roles: ['classifier'] });

  router.get(`${base}/filters`, everyone, async (req, res) => {
    const access = accessOf(req);
    if (!isResearchView(access)) {
      res.json(await figures(ctx, access, 'analytics.filters', { federation: federationOf(access) }, ''));
      return;
    }
    // Researchers and read tokens: no event list, and seasons of the data they may see (decision records 0006, 0007).
    const k = federationK(ctx.sqlite, access.federation.id);
    const options = await figures(ctx, access, 'analytics.research-filters', { federation: federationOf(access), k }, `research|${k}`);
    res.json({ ...options, events: [] });
  });

  router.get(`${base}/overview`, everyone, async (req, res) => {
    const access = accessOf(req);
    const filters = await aggregateFiltersOf(ctx, req);
    const overview = await figures(ctx, access, 'analytics.overview', { federation: federationOf(access), filters }, filterKey(filters));
    if (access.role === 'lead') await ensureEvaluated(ctx, access.federation.id);
    const openFlags = access.role === 'lead' ? await flagsOf(ctx, access.federation.id, { activeOnly: true }) : null;
    res.json({ ...overview, openFlags });
  });

  router.get(`${base}/classifiers`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const filters = filtersOf(req);
    await ensureEvaluated(ctx, access.federation.id);
    const [rows, severity] = await Promise.all([
      classifierFiguresOf(ctx, access, filters),
      figures(ctx, access, 'analytics.severity-network', { federation: federationOf(access), filters }, filterKey(filters)),
    ]);
    res.json({ classifiers: await classifierRows(ctx, access.federation.id, rows), ...severity });
  });

  router.get(`${base}/classifiers/:code`, leadOrClassifier, async (req, res) => {
    const access = accessOf(req);
    const wanted = parseWith(code, req.params.code, 'classifier code');
    const filters = filtersOf(req);
    await ensureEvaluated(ctx, access.federation.id);
    if (access.role === 'classifier') {
      if ((await ownCode(ctx, access)) !== wanted) throw forbidden('Classifiers see their own figures only');
      res.json(await myAgreementOf(ctx, access, filters, wanted));
      return;
    }
    res.json(await classifierDetailOf(ctx, access, filters, wanted));
  });

  router.get(`${base}/me`, classifierOnly, async (req, res) => {
    const access = accessOf(req);
    const mine = await ownCode(ctx, access);
    await ensureEvaluated(ctx, access.federation.id);
    const filters = filtersOf(req);
    const mineFigures = await myAgreementOf(ctx, access, filters, mine);
    // The federation's spread is an aggregate: not shown for groups that are too small.
    const athletes = await athletesOf(ctx, access, filters);
    res.json(
      athletes < MIN_ATHLETES_FOR_AGGREGATES
        ? { ...mineFigures, distribution: { quadraticKappa: [], bias: [], exactWithPanel: [] } }
        : mineFigures,
    );
  });

  router.get(`${base}/pairs`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const filters = filtersOf(req);
    res.json(
      await figures(
        ctx,
        access,
        'analytics.pairs',
        { federation: federationOf(access), filters },
        `${filterKey(filters)}|${filters.minShared ?? ''}`,
      ),
    );
  });

  router.get(`${base}/pairs/:a/:b`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const a = parseWith(code, req.params.a, 'classifier code');
    const b = parseWith(code, req.params.b, 'classifier code');
    const filters = filtersOf(req);
    res.json(
      await figures(
        ctx,
        access,
        'analytics.pair',
        { federation: federationOf(access), filters, a, b },
        `${a}|${b}|${filterKey(filters)}|${filters.minShared ?? ''}`,
      ),
    );
  });

  router.get(`${base}/boundaries`, everyone, async (req, res) => {
    const access = accessOf(req);
    const filters = await aggregateFiltersOf(ctx, req);
    res.json(await figures(ctx, access, 'analytics.boundaries', { federation: federationOf(access), filters }, filterKey(filters)));
  });

  router.get(`${base}/drift/raters`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const filters = filtersOf(req);
    const thresholds = await thresholdsOf(ctx, access.federation.id);
    res.json(
      await figures(
        ctx,
        access,
        'analytics.rater-drift',
        { federation: federationOf(access), filters, thresholds },
        `${JSON.stringify(thresholds)}|${filterKey(filters)}`,
      ),
    );
  });

  router.get(`${base}/drift/classes`, everyone, async (req, res) => {
    const access = accessOf(req);
    const filters = await aggregateFiltersOf(ctx, req);
    const withChanges = access.role === 'lead';
    res.json(
      await figures(
        ctx,
        access,
        'analytics.class-drift',
        { federation: federationOf(access), filters, withChanges },
        `${withChanges}|${filterKey(filters)}`,
      ),
    );
  });

  router.get(`${base}/flags`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    await ensureEvaluated(ctx, access.federation.id);
    res.json({
      flags: await flagsOf(ctx, access.federation.id, { activeOnly: false }),
      evaluatedAt: await lastEvaluation(ctx, access.federation.id),
    });
  });

  router.post(`${base}/flags/evaluate`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const result = await runEvaluation(ctx, access.federation.id, 'an evaluation on demand');
    // An evaluation already running answered for this one: report the flags as they now stand.
    res.json(
      result ?? { opened: 0, updated: 0, evaluatedAt: (await lastEvaluation(ctx, access.federation.id)) ?? new Date().toISOString() },
    );
  });

  router.patch(`${base}/flags/:id`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const id = Number(req.params.id);
    if (!Number.isInteger(id) || id <= 0)
      throw new HttpError(400, 'validation_failed', `The flag id "${String(req.params.id)}" is not a number`);
    const update = parseWith(flagUpdateSchema, req.body);
    res.json(await updateFlag(ctx, access.federation.id, id, access.userId, update));
  });

  router.get(`${base}/flag-settings`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    res.json(await thresholdsOf(ctx, access.federation.id));
  });

  router.put(`${base}/flag-settings`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const thresholds = parseWith(flagThresholdsSchema, req.body);
    await saveThresholds(ctx, access.federation.id, access.userId, thresholds);
    // New thresholds apply at once; flags they no longer meet say so.
    await runEvaluation(ctx, access.federation.id, 'the thresholds were changed');
    res.json(thresholds);
  });

  return router;
}

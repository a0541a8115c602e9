import { Router } from 'express';
import type { AppContext } from '../context';
import { ApiDescription, type RouteDoc } from '../openapi/registry';
import { accessRouteDocs } from './access.openapi';
import { analyticsRouteDocs } from './analytics.openapi';
import { exercisesRouteDocs } from './exercises.openapi';
import { exportsRouteDocs } from './exports.openapi';
import { foundationRouteDocs } from './foundation.openapi';
import { importsRouteDocs } from './imports.openapi';
import { accessLinksRouter } from './access-links';
import { analyticsRouter } from './analytics';
import { exercisesRouter } from './exercises';
import { exportsRouter } from './exports';
import { federationsRouter } from './federations';
import { healthRouter } from './health';
import { importsRouter } from './imports';
import { membersRouter } from './members';
import { openApiRouter } from './openapi';
import { ownerRouter } from './owner';
import { sessionRouter } from './session';

/** Every route's OpenAPI description, one list per feature (`<feature>.openapi.ts`). */
export const apiRouteDocs: readonly RouteDoc[] = [
  ...foundationRouteDocs,
  ...accessRouteDocs,
  ...exportsRouteDocs,
  ...analyticsRouteDocs,
  ...importsRouteDocs,
  ...exercisesRouteDocs,
];

/**
 * Every API router, mounted under /api. Add a feature's router here and its descriptions to
 * `apiRouteDocs`; the route × role matrix and the OpenAPI tests walk this router, so a route
 * without an access entry or without a complete description fails the tests.
 */
export function apiRouter(ctx: AppContext, description = new ApiDescription(apiRouteDocs)): Router {
  const router = Router();
  router.use(healthRouter(ctx));
  router.use(sessionRouter(ctx));
  router.use(accessLinksRouter(ctx));
  router.use(membersRouter(ctx));
  router.use(ownerRouter(ctx));
  router.use(federationsRouter(ctx));
  router.use(exportsRouter(ctx));
  router.use(analyticsRouter(ctx));
  router.use(exercisesRouter(ctx));
  router.use(importsRouter(ctx));
  router.use(openApiRouter(ctx, description));
  return router;
}

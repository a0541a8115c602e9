import { Router } from 'express';
import type { AppContext } from '../context';
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

/**
 * Every API router, mounted under /api. Add a feature's router here; the route × role matrix
 * test walks this router, so a new route without an access entry fails the tests.
 */
export function apiRouter(ctx: AppContext): Router {
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
  router.use(openApiRouter(ctx));
  return router;
}

import { Router } from 'express';
import type { AppContext } from '../context';
import type { ApiDescription } from '../openapi/registry';

/** GET /api/openapi.json: the OpenAPI 3.1 document of the app's described routes (open to all). */
export function openApiRouter(ctx: AppContext, description: ApiDescription): Router {
  const router = Router();
  let cached: Record<string, unknown> | null = null;
  router.get('/openapi.json', (_req, res) => {
    cached ??= description.document({ title: 'Panelwise API', version: ctx.config.version });
    res.json(cached);
  });
  return router;
}

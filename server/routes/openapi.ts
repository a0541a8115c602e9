import { Router } from 'express';
import type { AppContext } from '../context';
import '../openapi/foundation-routes';
import '../openapi/pending-routes';
import { buildOpenApiDocument, registerRoute } from '../openapi/registry';

/** GET /api/openapi.json: the OpenAPI 3.1 document of every registered route (open to all). */
export function openApiRouter(ctx: AppContext): Router {
  const router = Router();
  let cached: Record<string, unknown> | null = null;
  router.get('/openapi.json', (_req, res) => {
    cached ??= buildOpenApiDocument({ title: 'Panelwise API', version: ctx.config.version });
    res.json(cached);
  });
  return router;
}

registerRoute({
  method: 'get',
  path: '/api/openapi.json',
  summary: 'This OpenAPI 3.1 document',
  tags: ['Foundation'],
  security: 'none',
  responses: { 200: { description: 'The document' } },
});

import { Router } from 'express';
import type { AppContext } from '../context';

export function healthRouter(ctx: AppContext): Router {
  const router = Router();
  router.get('/health', (_req, res) => {
    res.json({ status: 'ok', version: ctx.config.version });
  });
  return router;
}

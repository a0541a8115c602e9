import { Router } from 'express';
import { accessOf, requireAccess } from '../auth/access';
import type { AppContext } from '../context';
import { federationSummary } from '../services/federation-summary';

export function federationsRouter(ctx: AppContext): Router {
  const router = Router();

  /** Counts for the federation's overview; open to every role (no identities in it). */
  router.get(
    '/federations/:federation/summary',
    requireAccess(ctx, { roles: ['lead', 'classifier', 'researcher'], tokenScopes: ['read'] }),
    async (req, res) => {
      res.json(await federationSummary(ctx, accessOf(req)));
    },
  );

  return router;
}

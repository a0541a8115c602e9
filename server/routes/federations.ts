import { Router } from 'express';
import type { FederationSummary } from '../../shared/schemas/federation';
import { accessOf, requireAccess } from '../auth/access';
import type { AppContext } from '../context';

export function federationsRouter(ctx: AppContext): Router {
  const router = Router();

  /** Counts for the federation's overview; open to every role (no identities in it). */
  router.get('/federations/:federation/summary', requireAccess(ctx, { roles: ['lead', 'classifier', 'researcher'], tokenScopes: ['read'] }), async (req, res) => {
    const { federation } = accessOf(req);
    const count = async (table: 'athletes' | 'classifiers' | 'events' | 'assessments') =>
      Number((await ctx.db.selectFrom(table).select((eb) => eb.fn.countAll<number>().as('n')).where('federation_id', '=', federation.id).executeTakeFirstOrThrow()).n);
    const ratings = await ctx.db
      .selectFrom('ratings')
      .innerJoin('assessments', 'assessments.id', 'ratings.assessment_id')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('assessments.federation_id', '=', federation.id)
      .executeTakeFirstOrThrow();
    const span = await ctx.db
      .selectFrom('assessments')
      .select((eb) => [eb.fn.min('assessed_on').as('first'), eb.fn.max('assessed_on').as('last')])
      .where('federation_id', '=', federation.id)
      .executeTakeFirstOrThrow();
    const body: FederationSummary = {
      federation: { slug: federation.slug, name: federation.name, scale: { min: federation.scaleMin, max: federation.scaleMax } },
      counts: {
        athletes: await count('athletes'),
        classifiers: await count('classifiers'),
        events: await count('events'),
        assessments: await count('assessments'),
        ratings: Number(ratings.n),
      },
      firstAssessment: (span.first as string | null) ?? null,
      lastAssessment: (span.last as string | null) ?? null,
    };
    res.json(body);
  });

  return router;
}

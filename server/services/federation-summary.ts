/** The federation's counts for its overview (no identities in them). */
import type { FederationSummary } from '../../shared/schemas/federation';
import { dayToIsoDate } from '../analysis';
import type { FederationAccess } from '../auth/access';
import type { AppContext } from '../context';
import { federationData, researchBaseSet } from './analytics-data';
import { federationK, isResearchView } from './research-cells';

/**
 * Counts of athletes, classifiers, events, assessments and ratings, and the first and last
 * assessment. Researchers and read tokens get the counts and the first and last month of the
 * data they may see (the federation without its cells of fewer than k athletes), never a date.
 */
export async function federationSummary(ctx: AppContext, access: FederationAccess): Promise<FederationSummary> {
  const { federation } = access;
  const count = async (table: 'athletes' | 'classifiers' | 'events' | 'assessments') =>
    Number(
      (
        await ctx.db
          .selectFrom(table)
          .select((eb) => eb.fn.countAll<number>().as('n'))
          .where('federation_id', '=', federation.id)
          .executeTakeFirstOrThrow()
      ).n,
    );
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
    firstAssessment: span.first ?? null,
    lastAssessment: span.last ?? null,
  };
  if (isResearchView(access)) {
    const data = federationData(ctx, { id: federation.id, scaleMin: federation.scaleMin, scaleMax: federation.scaleMax });
    const set = researchBaseSet(ctx, data, federation.id, federationK(ctx.sqlite, federation.id));
    let first = Infinity;
    let last = -Infinity;
    for (let a = 0; a < set.assessmentCount; a++) {
      first = Math.min(first, set.day[a]);
      last = Math.max(last, set.day[a]);
    }
    body.counts.assessments = set.assessmentCount;
    body.counts.ratings = set.ratingCount;
    body.firstAssessment = set.assessmentCount > 0 ? dayToIsoDate(first).slice(0, 7) : null;
    body.lastAssessment = set.assessmentCount > 0 ? dayToIsoDate(last).slice(0, 7) : null;
  }
  return body;
}

import { z } from 'zod';

export const federationSummarySchema = z.object({
  federation: z.object({ slug: z.string(), name: z.string(), scale: z.object({ min: z.number(), max: z.number() }) }),
  counts: z.object({
    athletes: z.number(),
    classifiers: z.number(),
    events: z.number(),
    assessments: z.number(),
    ratings: z.number(),
  }),
  /** ISO date for leads and classifiers; month (YYYY-MM) for researchers and read tokens. */
  firstAssessment: z.string().nullable(),
  lastAssessment: z.string().nullable(),
});
export type FederationSummary = z.infer<typeof federationSummarySchema>;

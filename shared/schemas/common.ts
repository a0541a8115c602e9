import { z } from 'zod';

export const roleSchema = z.enum(['lead', 'classifier', 'researcher']);
export type Role = z.infer<typeof roleSchema>;

/** The kinds of assessment, in this order everywhere (an index into it is a kind's code in typed arrays). */
export const ASSESSMENT_KINDS = ['first', 'review', 'protest'] as const;
export const assessmentKindSchema = z.enum(ASSESSMENT_KINDS);
/** "first, review, protest", for messages. */
export const ASSESSMENT_KINDS_LIST = ASSESSMENT_KINDS.join(', ');
export type AssessmentKind = z.infer<typeof assessmentKindSchema>;

/** Words people read for each assessment kind. */
export const ASSESSMENT_KIND_LABELS: Record<AssessmentKind, string> = {
  first: 'First classification',
  review: 'Review',
  protest: 'Protest',
};

export const isoDateSchema = z.iso.date();

/** The one error shape every API route answers with. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

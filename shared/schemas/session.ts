import { z } from 'zod';
import { roleSchema } from './common';

export const signInSchema = z.object({
  email: z.email({ message: 'Enter an e-mail address' }).trim().toLowerCase(),
  password: z.string().min(1, { message: 'Enter your password' }).max(200),
});
export type SignIn = z.infer<typeof signInSchema>;

export const membershipSchema = z.object({
  federation: z.object({ id: z.number(), slug: z.string(), name: z.string() }),
  role: roleSchema,
  classifierCode: z.string().nullable(),
});
export type MembershipView = z.infer<typeof membershipSchema>;

export const sessionSchema = z.object({
  user: z.object({ id: z.number(), email: z.string(), displayName: z.string(), isOwner: z.boolean() }),
  memberships: z.array(membershipSchema),
  /** E-mail stays in the local Outbox (development, tests, demo): the Outbox pages are available. */
  localMail: z.boolean().optional(),
});
export type SessionView = z.infer<typeof sessionSchema>;

/** GET /api/session when nobody is signed in (200, so the app's probe is not an error). */
export const signedOutSchema = z.object({ user: z.null(), memberships: z.array(membershipSchema).length(0) });
export type SignedOutView = z.infer<typeof signedOutSchema>;

import { z } from 'zod';
import { roleSchema } from './common';

/**
 * Payloads of sign-in's companions: invitations, password resets, members, API tokens, the
 * site owner's federations and the local Outbox.
 */

export const PASSWORD_MIN = 10;

export const emailSchema = z.email({ message: 'Enter an e-mail address' }).trim().toLowerCase().max(254);

export const newPasswordSchema = z
  .string()
  .min(PASSWORD_MIN, { message: `Use at least ${PASSWORD_MIN} characters` })
  .max(200, { message: 'Use at most 200 characters' });

export const displayNameSchema = z
  .string()
  .trim()
  .min(1, { message: 'Enter your name' })
  .max(120, { message: 'Use at most 120 characters' });

export const classifierCodeSchema = z.string().trim().min(1).max(40);

// --- invitations ---------------------------------------------------------------------------------

export const inviteSchema = z
  .object({
    email: emailSchema,
    role: roleSchema,
    /** For a classifier: the roster entry (classifier code) to link the account to. */
    classifierCode: classifierCodeSchema.optional(),
  })
  .refine((v) => v.role !== 'classifier' || !!v.classifierCode, {
    path: ['classifierCode'],
    message: 'Choose the roster entry of the classifier',
  })
  .refine((v) => v.role === 'classifier' || !v.classifierCode, {
    path: ['classifierCode'],
    message: 'Only a classifier is linked to a roster entry',
  });
export type Invite = z.infer<typeof inviteSchema>;

export const invitationViewSchema = z.object({
  id: z.number(),
  email: z.string(),
  role: roleSchema,
  classifierCode: z.string().nullable(),
  invitedBy: z.string().nullable(),
  createdAt: z.string(),
  expiresAt: z.string(),
});
export type InvitationView = z.infer<typeof invitationViewSchema>;

/** What the invitation link shows before it is accepted. */
export const invitationPreviewSchema = z.object({
  email: z.string(),
  federation: z.object({ slug: z.string(), name: z.string() }),
  role: roleSchema,
  classifierCode: z.string().nullable(),
  /** The e-mail already has an account: accepting adds the membership. */
  existingUser: z.boolean(),
  expiresAt: z.string(),
});
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>;

export const acceptNewUserSchema = z
  .object({
    displayName: displayNameSchema,
    password: newPasswordSchema,
    confirmPassword: z.string(),
  })
  .refine((v) => v.password === v.confirmPassword, { path: ['confirmPassword'], message: 'The passwords do not match' });
export type AcceptNewUser = z.infer<typeof acceptNewUserSchema>;

/** The accept call: a name and password for a new account, nothing for an existing one. */
export const acceptInvitationSchema = z.union([acceptNewUserSchema, z.object({}).strict()]);

export const acceptResultSchema = z.object({
  federation: z.object({ slug: z.string(), name: z.string() }),
  role: roleSchema,
  /** A session was started (a new account); otherwise the user signs in as usual. */
  signedIn: z.boolean(),
});
export type AcceptResult = z.infer<typeof acceptResultSchema>;

// --- password resets -----------------------------------------------------------------------------

export const resetRequestSchema = z.object({ email: emailSchema });
export type ResetRequest = z.infer<typeof resetRequestSchema>;

export const resetPasswordSchema = z
  .object({ password: newPasswordSchema, confirmPassword: z.string() })
  .refine((v) => v.password === v.confirmPassword, { path: ['confirmPassword'], message: 'The passwords do not match' });
export type ResetPassword = z.infer<typeof resetPasswordSchema>;

// --- members -------------------------------------------------------------------------------------

export const memberViewSchema = z.object({
  userId: z.number(),
  email: z.string(),
  displayName: z.string(),
  role: roleSchema,
  active: z.boolean(),
  classifierCode: z.string().nullable(),
  since: z.string(),
});
export type MemberView = z.infer<typeof memberViewSchema>;

export const membersViewSchema = z.object({
  members: z.array(memberViewSchema),
  invitations: z.array(invitationViewSchema),
  /** Roster entries with no account linked yet, for inviting a classifier. */
  unlinkedClassifiers: z.array(z.object({ code: z.string(), displayName: z.string() })),
});
export type MembersView = z.infer<typeof membersViewSchema>;

export const memberUpdateSchema = z
  .object({
    role: roleSchema.optional(),
    active: z.boolean().optional(),
    classifierCode: classifierCodeSchema.nullable().optional(),
  })
  .strict()
  .refine((v) => v.role !== undefined || v.active !== undefined || v.classifierCode !== undefined, {
    message: 'Say what to change: role, active or classifierCode',
  });
export type MemberUpdate = z.infer<typeof memberUpdateSchema>;

// --- API tokens ----------------------------------------------------------------------------------

export const tokenScopeSchema = z.enum(['import', 'read']);
export type TokenScopeName = z.infer<typeof tokenScopeSchema>;

export const tokenCreateSchema = z.object({
  name: z.string().trim().min(1, { message: 'Name the system that uses the token' }).max(80, { message: 'Use at most 80 characters' }),
  scope: tokenScopeSchema,
});
export type TokenCreate = z.infer<typeof tokenCreateSchema>;

export const tokenViewSchema = z.object({
  id: z.number(),
  name: z.string(),
  scope: tokenScopeSchema,
  prefix: z.string(),
  createdBy: z.string().nullable(),
  createdAt: z.string(),
  lastUsedAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
});
export type TokenView = z.infer<typeof tokenViewSchema>;

/** The answer to creating a token: the only time the token itself is shown. */
export const createdTokenSchema = z.object({ token: z.string(), view: tokenViewSchema });
export type CreatedToken = z.infer<typeof createdTokenSchema>;

// --- the site owner ------------------------------------------------------------------------------

export const federationCreateSchema = z.object({
  slug: z
    .string()
    .trim()
    .toLowerCase()
    .regex(/^[a-z0-9](?:[a-z0-9-]{1,38}[a-z0-9])$/, { message: 'Use 3–40 lower-case letters, digits and hyphens' }),
  name: z.string().trim().min(3, { message: 'Use at least 3 characters' }).max(120),
  leadEmail: emailSchema,
});
export type FederationCreate = z.infer<typeof federationCreateSchema>;

/** The site owner invites a (further) lead to an existing federation, e.g. one left without a lead. */
export const leadInviteSchema = z.object({ email: emailSchema });
export type LeadInvite = z.infer<typeof leadInviteSchema>;

export const ownerFederationSchema = z.object({
  id: z.number(),
  slug: z.string(),
  name: z.string(),
  activeMembers: z.number(),
  leads: z.number(),
  pendingInvitations: z.number(),
  createdAt: z.string(),
});
export type OwnerFederation = z.infer<typeof ownerFederationSchema>;

// --- the local Outbox ----------------------------------------------------------------------------

export const outboxMessageSchema = z.object({
  id: z.number(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  links: z.array(z.string()),
  receivedAt: z.string(),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;

// --- response bodies described in OpenAPI ------------------------------------------------------

export const invitationCreatedSchema = z.object({ invitation: invitationViewSchema, mailSent: z.boolean() });
export const resetPreviewSchema = z.object({ email: z.string(), expiresAt: z.string() });
export const resetRequestedSchema = z.object({ message: z.string() });
export const tokenListSchema = z.object({ tokens: z.array(tokenViewSchema) });
export const outboxSchema = z.object({ messages: z.array(outboxMessageSchema) });
export const ownerFederationsSchema = z.object({ federations: z.array(ownerFederationSchema) });
export const federationCreatedSchema = z.object({
  federation: z.object({ id: z.number(), slug: z.string(), name: z.string() }),
  invitation: invitationViewSchema,
  mailSent: z.boolean(),
});

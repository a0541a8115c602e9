import type { AcceptNewUser, InvitationPreview, InvitationView, Invite } from '../../shared/schemas/access';
import { hashPassword } from '../auth/password';
import { hashSecret, inIso, newSecret, nowIso } from '../auth/secret-token';
import type { AppContext } from '../context';
import type { Role } from '../db/database';
import { HttpError } from '../http/errors';
import { linkMail, ROLE_WORDS } from '../mail/templates';
import { audit } from './audit';

/** An invitation link works once, for this long. */
export const INVITATION_DAYS = 7;

export const linkExpired = () => new HttpError(410, 'gone', 'This link has expired or was already used. Ask for a new one.');

interface FederationRef {
  id: number;
  slug: string;
  name: string;
}

async function classifierForLink(ctx: AppContext, federationId: number, code: string, forUserId: number | null) {
  const classifier = await ctx.db
    .selectFrom('classifiers')
    .select(['id', 'code', 'user_id'])
    .where('federation_id', '=', federationId)
    .where('code', '=', code)
    .executeTakeFirst();
  if (!classifier)
    throw new HttpError(400, 'validation_failed', `There is no classifier ${code} on the roster`, [
      { path: 'classifierCode', message: `No roster entry ${code}` },
    ]);
  if (classifier.user_id !== null && classifier.user_id !== forUserId) {
    throw new HttpError(409, 'conflict', `Classifier ${code} is already linked to an account`, [
      { path: 'classifierCode', message: `${code} already has an account` },
    ]);
  }
  return classifier;
}

export async function listInvitations(ctx: AppContext, federationId: number): Promise<InvitationView[]> {
  const rows = await ctx.db
    .selectFrom('invitations')
    .leftJoin('classifiers', 'classifiers.id', 'invitations.classifier_id')
    .leftJoin('users', 'users.id', 'invitations.invited_by')
    .select([
      'invitations.id',
      'invitations.email',
      'invitations.role',
      'classifiers.code',
      'users.display_name',
      'invitations.created_at',
      'invitations.expires_at',
    ])
    .where('invitations.federation_id', '=', federationId)
    .where('invitations.accepted_at', 'is', null)
    .where('invitations.revoked_at', 'is', null)
    .where('invitations.expires_at', '>', nowIso())
    .orderBy('invitations.created_at', 'desc')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    role: r.role,
    classifierCode: r.code ?? null,
    invitedBy: r.display_name ?? null,
    createdAt: r.created_at,
    expiresAt: r.expires_at,
  }));
}

/**
 * Creates an invitation to a federation with a role (and, for a classifier, the roster entry to
 * link), replacing any earlier pending one for the same address, and e-mails its link.
 */
export async function createInvitation(
  ctx: AppContext,
  federation: FederationRef,
  input: Invite,
  inviter: { id: number; displayName: string } | null,
): Promise<{ invitation: InvitationView; mailSent: boolean }> {
  const existing = await ctx.db.selectFrom('users').select('id').where('email', '=', input.email).executeTakeFirst();
  if (existing) {
    const membership = await ctx.db
      .selectFrom('memberships')
      .select(['active'])
      .where('user_id', '=', existing.id)
      .where('federation_id', '=', federation.id)
      .executeTakeFirst();
    if (membership?.active === 1)
      throw new HttpError(409, 'conflict', `${input.email} is already a member of this federation`, [
        { path: 'email', message: 'Already a member' },
      ]);
  }
  const classifier =
    input.role === 'classifier' && input.classifierCode
      ? await classifierForLink(ctx, federation.id, input.classifierCode, existing?.id ?? null)
      : null;
  const { token, hash } = newSecret();
  const expiresAt = inIso(INVITATION_DAYS * 24 * 3600 * 1000);
  const id = await ctx.db.transaction().execute(async (trx) => {
    await trx
      .updateTable('invitations')
      .set({ revoked_at: nowIso() })
      .where('federation_id', '=', federation.id)
      .where('email', '=', input.email)
      .where('accepted_at', 'is', null)
      .where('revoked_at', 'is', null)
      .execute();
    const row = await trx
      .insertInto('invitations')
      .values({
        federation_id: federation.id,
        email: input.email,
        role: input.role,
        classifier_id: classifier?.id ?? null,
        token_hash: hash,
        invited_by: inviter?.id ?? null,
        expires_at: expiresAt,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await audit(trx, {
      federationId: federation.id,
      userId: inviter?.id ?? null,
      action: 'invitation.create',
      entity: 'invitation',
      entityId: row.id,
      detail: { role: input.role, classifier: classifier?.code ?? null },
    });
    return row.id;
  });

  const link = `${ctx.config.publicOrigin}/invitations/${token}`;
  const roleWords = ROLE_WORDS[input.role] + (classifier ? ` (roster entry ${classifier.code})` : '');
  const mail = linkMail({
    greeting: 'Hello,',
    paragraphs: [
      `${inviter?.displayName ?? 'The site owner'} invites you to ${federation.name} on Panelwise as ${roleWords}.`,
      existing
        ? 'You already have a Panelwise account: accepting adds this federation to it.'
        : 'Accepting lets you choose your name and password.',
    ],
    action: 'Accept the invitation',
    link,
    footer: `The link works once and expires in ${INVITATION_DAYS} days. If you did not expect this invitation, ignore this e-mail.`,
  });
  let mailSent = false;
  if (ctx.mailer) {
    try {
      await ctx.mailer.send({
        to: input.email,
        subject: `Invitation to ${federation.name} on Panelwise`,
        ...mail,
        federation: federation.slug,
      });
      mailSent = true;
    } catch (error) {
      ctx.logger.error({ err: error, invitation: id }, 'the invitation e-mail could not be sent');
    }
  } else {
    ctx.logger.warn({ invitation: id }, 'no mailer: the invitation e-mail was not sent');
  }
  const [invitation] = (await listInvitations(ctx, federation.id)).filter((i) => i.id === id);
  if (!invitation) throw new HttpError(500, 'internal', 'The invitation was not stored');
  return { invitation, mailSent };
}

export async function revokeInvitation(ctx: AppContext, federationId: number, invitationId: number, actorId: number): Promise<void> {
  await ctx.db.transaction().execute(async (trx) => {
    const result = await trx
      .updateTable('invitations')
      .set({ revoked_at: nowIso() })
      .where('id', '=', invitationId)
      .where('federation_id', '=', federationId)
      .where('accepted_at', 'is', null)
      .where('revoked_at', 'is', null)
      .executeTakeFirst();
    if (Number(result.numUpdatedRows) === 0) throw new HttpError(404, 'not_found', 'No pending invitation with this id');
    await audit(trx, { federationId, userId: actorId, action: 'invitation.revoke', entity: 'invitation', entityId: invitationId });
  });
}

async function pendingInvitation(ctx: AppContext, token: string) {
  const row = await ctx.db
    .selectFrom('invitations')
    .innerJoin('federations', 'federations.id', 'invitations.federation_id')
    .leftJoin('classifiers', 'classifiers.id', 'invitations.classifier_id')
    .select([
      'invitations.id',
      'invitations.email',
      'invitations.role',
      'invitations.classifier_id',
      'invitations.expires_at',
      'invitations.accepted_at',
      'invitations.revoked_at',
      'classifiers.code',
      'federations.id as federationId',
      'federations.slug',
      'federations.name',
    ])
    .where('invitations.token_hash', '=', hashSecret(token))
    .executeTakeFirst();
  if (!row || row.accepted_at || row.revoked_at || row.expires_at <= nowIso()) throw linkExpired();
  return row;
}

export async function previewInvitation(ctx: AppContext, token: string): Promise<InvitationPreview> {
  const row = await pendingInvitation(ctx, token);
  const user = await ctx.db.selectFrom('users').select('id').where('email', '=', row.email).executeTakeFirst();
  return {
    email: row.email,
    federation: { slug: row.slug, name: row.name },
    role: row.role,
    classifierCode: row.code ?? null,
    existingUser: !!user,
    expiresAt: row.expires_at,
  };
}

/**
 * Accepts an invitation once: a new account gets its name and password; an existing account
 * gets the membership (re-activated with the invited role if it had been deactivated). The claim
 * of the link and every change are one transaction.
 */
export async function acceptInvitation(
  ctx: AppContext,
  token: string,
  newUser: AcceptNewUser | null,
): Promise<{ userId: number; sessionVersion: number; created: boolean; federation: { slug: string; name: string }; role: Role }> {
  const invitation = await pendingInvitation(ctx, token);
  const existing = await ctx.db
    .selectFrom('users')
    .select(['id', 'session_version'])
    .where('email', '=', invitation.email)
    .executeTakeFirst();
  if (!existing && !newUser) {
    throw new HttpError(400, 'validation_failed', 'Choose your name and password', [
      { path: 'displayName', message: 'Enter your name' },
      { path: 'password', message: 'Choose a password' },
    ]);
  }
  const passwordHash = !existing && newUser ? await hashPassword(newUser.password) : null;
  return ctx.db.transaction().execute(async (trx) => {
    const claimed = await trx
      .updateTable('invitations')
      .set({ accepted_at: nowIso() })
      .where('id', '=', invitation.id)
      .where('accepted_at', 'is', null)
      .where('revoked_at', 'is', null)
      .where('expires_at', '>', nowIso())
      .executeTakeFirst();
    if (Number(claimed.numUpdatedRows) !== 1) throw linkExpired();
    let userId: number;
    let sessionVersion: number;
    if (existing) {
      userId = existing.id;
      sessionVersion = existing.session_version;
    } else {
      const row = await trx
        .insertInto('users')
        .values({ email: invitation.email, display_name: newUser!.displayName, password_hash: passwordHash })
        .returning(['id', 'session_version'])
        .executeTakeFirstOrThrow();
      userId = row.id;
      sessionVersion = row.session_version;
    }
    await trx.updateTable('invitations').set({ accepted_by: userId }).where('id', '=', invitation.id).execute();
    await trx
      .insertInto('memberships')
      .values({ user_id: userId, federation_id: invitation.federationId, role: invitation.role, active: 1 })
      .onConflict((oc) => oc.columns(['user_id', 'federation_id']).doUpdateSet({ role: invitation.role, active: 1 }))
      .execute();
    if (invitation.classifier_id !== null) {
      const linked = await trx
        .updateTable('classifiers')
        .set({ user_id: userId })
        .where('id', '=', invitation.classifier_id)
        .where((eb) => eb.or([eb('user_id', 'is', null), eb('user_id', '=', userId)]))
        .executeTakeFirst();
      if (Number(linked.numUpdatedRows) !== 1)
        throw new HttpError(
          409,
          'conflict',
          `Classifier ${invitation.code} is already linked to another account; ask your lead for a new invitation`,
        );
    }
    await audit(trx, {
      federationId: invitation.federationId,
      userId,
      action: 'invitation.accept',
      entity: 'invitation',
      entityId: invitation.id,
      detail: { role: invitation.role, newAccount: !existing },
    });
    return {
      userId,
      sessionVersion,
      created: !existing,
      federation: { slug: invitation.slug, name: invitation.name },
      role: invitation.role,
    };
  });
}

import { hashPassword } from '../auth/password';
import { hashSecret, inIso, newSecret, nowIso } from '../auth/secret-token';
import type { AppContext } from '../context';
import { linkMail } from '../mail/templates';
import { audit } from './audit';
import { linkExpired } from './invitations';

/** A password-reset link works once, for this long. */
export const RESET_MINUTES = 60;

/**
 * Starts a password reset: when the address has an account, a single-use link is e-mailed and
 * earlier unused links stop working. The caller answers the same whether or not the account
 * exists, and calls this after answering, so timing tells nothing either.
 */
export async function requestPasswordReset(ctx: AppContext, email: string): Promise<void> {
  const user = await ctx.db.selectFrom('users').select(['id', 'email', 'display_name']).where('email', '=', email).executeTakeFirst();
  if (!user) return;
  const { token, hash } = newSecret();
  await ctx.db.transaction().execute(async (trx) => {
    await trx
      .updateTable('password_resets')
      .set({ used_at: nowIso() })
      .where('user_id', '=', user.id)
      .where('used_at', 'is', null)
      .execute();
    await trx
      .insertInto('password_resets')
      .values({ user_id: user.id, token_hash: hash, expires_at: inIso(RESET_MINUTES * 60 * 1000) })
      .execute();
    await audit(trx, { userId: user.id, action: 'password_reset.request', entity: 'user', entityId: user.id });
  });
  const link = `${ctx.config.publicOrigin}/reset-password/${token}`;
  const mail = linkMail({
    greeting: `Hello ${user.display_name},`,
    paragraphs: ['Someone (we hope you) asked to choose a new Panelwise password for this address.'],
    action: 'Choose a new password',
    link,
    footer: `The link works once and expires in ${RESET_MINUTES} minutes. If you did not ask for it, ignore this e-mail: your password stays as it is.`,
  });
  if (!ctx.mailer) {
    ctx.logger.warn('no mailer: the password-reset e-mail was not sent');
    return;
  }
  await ctx.mailer.send({ to: user.email, subject: 'Choose a new Panelwise password', ...mail });
}

async function pendingReset(ctx: AppContext, token: string) {
  const row = await ctx.db
    .selectFrom('password_resets')
    .innerJoin('users', 'users.id', 'password_resets.user_id')
    .select(['password_resets.id', 'password_resets.user_id', 'password_resets.expires_at', 'password_resets.used_at', 'users.email'])
    .where('password_resets.token_hash', '=', hashSecret(token))
    .executeTakeFirst();
  if (!row || row.used_at || row.expires_at <= nowIso()) throw linkExpired();
  return row;
}

export async function previewPasswordReset(ctx: AppContext, token: string): Promise<{ email: string; expiresAt: string }> {
  const row = await pendingReset(ctx, token);
  return { email: row.email, expiresAt: row.expires_at };
}

/**
 * Sets the new password once, and signs the account out everywhere (its session version moves
 * on and its sessions are revoked): whoever knew the old password is out.
 */
export async function completePasswordReset(ctx: AppContext, token: string, password: string): Promise<void> {
  const reset = await pendingReset(ctx, token);
  const passwordHash = await hashPassword(password);
  await ctx.db.transaction().execute(async (trx) => {
    const claimed = await trx
      .updateTable('password_resets')
      .set({ used_at: nowIso() })
      .where('id', '=', reset.id)
      .where('used_at', 'is', null)
      .where('expires_at', '>', nowIso())
      .executeTakeFirst();
    if (Number(claimed.numUpdatedRows) !== 1) throw linkExpired();
    await trx
      .updateTable('users')
      .set((eb) => ({ password_hash: passwordHash, session_version: eb('session_version', '+', 1) }))
      .where('id', '=', reset.user_id)
      .execute();
    await trx
      .updateTable('sessions')
      .set({ revoked_at: nowIso() })
      .where('user_id', '=', reset.user_id)
      .where('revoked_at', 'is', null)
      .execute();
    await audit(trx, { userId: reset.user_id, action: 'password_reset.complete', entity: 'user', entityId: reset.user_id });
  });
}

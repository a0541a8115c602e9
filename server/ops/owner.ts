/**
 * Site owners from the command line (`panelwise create-owner`), and switching off the demo
 * accounts of a database that is going to serve real people (`panelwise disable-demo`).
 */
import { emailSchema, displayNameSchema, newPasswordSchema } from '../../shared/schemas/access';
import { hashPassword } from '../auth/password';
import { passwordStrength } from '../auth/password-strength';
import type { Db } from '../db/connection';
import { audit } from '../services/audit';
import { DEMO_EMAIL_DOMAIN } from './demo-guard';
import { OpsError } from './backup';

export async function createOwner(
  db: Db,
  input: { email: string; displayName?: string; password: string },
  env: string,
): Promise<{ id: number; email: string }> {
  const email = emailSchema.safeParse(input.email);
  if (!email.success) throw new OpsError(`"${input.email}" is not an e-mail address`);
  if (env === 'production' && email.data.endsWith(DEMO_EMAIL_DOMAIN))
    throw new OpsError(`${DEMO_EMAIL_DOMAIN} is the demo's domain: use a real address in production`);
  const name = displayNameSchema.safeParse(input.displayName ?? email.data.split('@')[0]);
  if (!name.success) throw new OpsError(`the name is not valid: ${name.error.issues[0]?.message ?? ''}`);
  const length = newPasswordSchema.safeParse(input.password);
  if (!length.success) throw new OpsError(`the password is not valid: ${length.error.issues[0]?.message ?? ''}`);
  const strength = await passwordStrength(input.password, [email.data, name.data]);
  if (!strength.ok) throw new OpsError(strength.message);
  const existing = await db.selectFrom('users').select(['id', 'is_owner']).where('email', '=', email.data).executeTakeFirst();
  if (existing) {
    throw new OpsError(
      existing.is_owner === 1
        ? `${email.data} is already a site owner (to choose a new password, use "Forgot your password?" on the sign-in page)`
        : `${email.data} already has an account: choose another address for the site owner`,
    );
  }
  const passwordHash = await hashPassword(input.password);
  const row = await db.transaction().execute(async (trx) => {
    const created = await trx
      .insertInto('users')
      .values({ email: email.data, display_name: name.data, password_hash: passwordHash, is_owner: 1 })
      .returning('id')
      .executeTakeFirstOrThrow();
    await audit(trx, { userId: null, action: 'owner.create', entity: 'user', entityId: created.id, detail: { via: 'command line' } });
    return created;
  });
  return { id: row.id, email: email.data };
}

/** Removes the demo accounts' passwords and signs them out everywhere; the invented data stays. */
export async function disableDemoAccounts(db: Db): Promise<number> {
  return db.transaction().execute(async (trx) => {
    const users = await trx
      .selectFrom('users')
      .select('id')
      .where('email', 'like', `%${DEMO_EMAIL_DOMAIN}`)
      .where('password_hash', 'is not', null)
      .execute();
    if (users.length === 0) return 0;
    const ids = users.map((u) => u.id);
    await trx
      .updateTable('users')
      .set((eb) => ({ password_hash: null, session_version: eb('session_version', '+', 1) }))
      .where('id', 'in', ids)
      .execute();
    await trx
      .updateTable('sessions')
      .set({ revoked_at: new Date().toISOString() })
      .where('user_id', 'in', ids)
      .where('revoked_at', 'is', null)
      .execute();
    await audit(trx, { userId: null, action: 'demo.disable', entity: 'user', entityId: null, detail: { accounts: ids.length } });
    return ids.length;
  });
}

import type { MemberUpdate, MemberView, MembersView } from '../../shared/schemas/access';
import { nowIso } from '../auth/secret-token';
import type { AppContext } from '../context';
import type { Transaction } from 'kysely';
import type { Database, Role } from '../db/database';
import { HttpError } from '../http/errors';
import { audit } from './audit';
import { listInvitations } from './invitations';

type Trx = Transaction<Database>;

export async function listMembers(ctx: AppContext, federationId: number): Promise<MembersView> {
  const rows = await ctx.db
    .selectFrom('memberships')
    .innerJoin('users', 'users.id', 'memberships.user_id')
    .leftJoin('classifiers', (join) =>
      join.onRef('classifiers.user_id', '=', 'memberships.user_id').onRef('classifiers.federation_id', '=', 'memberships.federation_id'),
    )
    .select([
      'users.id',
      'users.email',
      'users.display_name',
      'memberships.role',
      'memberships.active',
      'memberships.created_at',
      'classifiers.code',
    ])
    .where('memberships.federation_id', '=', federationId)
    .orderBy('memberships.active', 'desc')
    .orderBy('users.display_name')
    .execute();
  const members: MemberView[] = rows.map((r) => ({
    userId: r.id,
    email: r.email,
    displayName: r.display_name,
    role: r.role,
    active: r.active === 1,
    classifierCode: r.code ?? null,
    since: r.created_at,
  }));
  const invitations = await listInvitations(ctx, federationId);
  const pendingIds = new Set(
    (
      await ctx.db
        .selectFrom('invitations')
        .select('classifier_id')
        .where('federation_id', '=', federationId)
        .where('accepted_at', 'is', null)
        .where('revoked_at', 'is', null)
        .where('expires_at', '>', nowIso())
        .execute()
    )
      .map((r) => r.classifier_id)
      .filter((id): id is number => id !== null),
  );
  const unlinked = await ctx.db
    .selectFrom('classifiers')
    .select(['id', 'code', 'display_name'])
    .where('federation_id', '=', federationId)
    .where('user_id', 'is', null)
    .where('active', '=', 1)
    .orderBy('code')
    .execute();
  return {
    members,
    invitations,
    unlinkedClassifiers: unlinked.filter((c) => !pendingIds.has(c.id)).map((c) => ({ code: c.code, displayName: c.display_name })),
  };
}

async function activeLeads(trx: Trx, federationId: number): Promise<number[]> {
  const rows = await trx
    .selectFrom('memberships')
    .select('user_id')
    .where('federation_id', '=', federationId)
    .where('role', '=', 'lead')
    .where('active', '=', 1)
    .execute();
  return rows.map((r) => r.user_id);
}

/**
 * A lead changes a member's role, roster link or activity. The federation always keeps an
 * active lead. A deactivated member loses the federation at once (every request checks the
 * membership); when it was their last active membership and they are not the site owner, their
 * sessions are ended too (session version raised, sessions revoked).
 */
export async function updateMember(
  ctx: AppContext,
  federationId: number,
  actorId: number,
  userId: number,
  update: MemberUpdate,
): Promise<MemberView> {
  await ctx.db.transaction().execute(async (trx) => {
    const membership = await trx
      .selectFrom('memberships')
      .select(['id', 'role', 'active'])
      .where('federation_id', '=', federationId)
      .where('user_id', '=', userId)
      .executeTakeFirst();
    if (!membership) throw new HttpError(404, 'not_found', 'This person is not a member of this federation');
    const role: Role = update.role ?? membership.role;
    const active = update.active ?? membership.active === 1;

    const leads = await activeLeads(trx, federationId);
    if (leads.includes(userId) && (role !== 'lead' || !active) && leads.length === 1) {
      throw new HttpError(409, 'conflict', 'The federation needs at least one active classification lead: make someone else lead first');
    }

    const linked = await trx
      .selectFrom('classifiers')
      .select(['id', 'code'])
      .where('federation_id', '=', federationId)
      .where('user_id', '=', userId)
      .executeTakeFirst();
    if (update.classifierCode !== undefined || role !== 'classifier') {
      const wanted = role === 'classifier' ? (update.classifierCode ?? null) : null;
      if (update.classifierCode && role !== 'classifier') {
        throw new HttpError(400, 'validation_failed', 'Only a classifier is linked to a roster entry', [
          { path: 'classifierCode', message: 'Only for the classifier role' },
        ]);
      }
      if (wanted !== (linked?.code ?? null)) {
        await trx
          .updateTable('classifiers')
          .set({ user_id: null })
          .where('federation_id', '=', federationId)
          .where('user_id', '=', userId)
          .execute();
        if (wanted) {
          const result = await trx
            .updateTable('classifiers')
            .set({ user_id: userId })
            .where('federation_id', '=', federationId)
            .where('code', '=', wanted)
            .where('user_id', 'is', null)
            .executeTakeFirst();
          if (Number(result.numUpdatedRows) !== 1) {
            const exists = await trx
              .selectFrom('classifiers')
              .select('id')
              .where('federation_id', '=', federationId)
              .where('code', '=', wanted)
              .executeTakeFirst();
            if (!exists)
              throw new HttpError(400, 'validation_failed', `There is no classifier ${wanted} on the roster`, [
                { path: 'classifierCode', message: `No roster entry ${wanted}` },
              ]);
            throw new HttpError(409, 'conflict', `Classifier ${wanted} is already linked to another account`, [
              { path: 'classifierCode', message: `${wanted} already has an account` },
            ]);
          }
        }
      }
    }
    if (role === 'classifier' && !update.classifierCode && !linked) {
      throw new HttpError(400, 'validation_failed', 'A classifier must be linked to a roster entry', [
        { path: 'classifierCode', message: 'Choose the roster entry' },
      ]);
    }

    await trx
      .updateTable('memberships')
      .set({ role, active: active ? 1 : 0 })
      .where('id', '=', membership.id)
      .execute();

    if (!active && membership.active === 1) {
      const others = await trx
        .selectFrom('memberships')
        .select('id')
        .where('user_id', '=', userId)
        .where('active', '=', 1)
        .executeTakeFirst();
      const user = await trx.selectFrom('users').select('is_owner').where('id', '=', userId).executeTakeFirstOrThrow();
      if (!others && user.is_owner !== 1) {
        await trx
          .updateTable('users')
          .set((eb) => ({ session_version: eb('session_version', '+', 1) }))
          .where('id', '=', userId)
          .execute();
        await trx
          .updateTable('sessions')
          .set({ revoked_at: nowIso() })
          .where('user_id', '=', userId)
          .where('revoked_at', 'is', null)
          .execute();
      }
    }
    await audit(trx, {
      federationId,
      userId: actorId,
      action: 'membership.update',
      entity: 'user',
      entityId: userId,
      detail: {
        from: { role: membership.role, active: membership.active === 1 },
        to: { role, active },
        classifierCode: update.classifierCode,
      },
    });
  });
  const view = (await listMembers(ctx, federationId)).members.find((m) => m.userId === userId);
  if (!view) throw new HttpError(500, 'internal', 'The membership was not found after the change');
  return view;
}

import type { CreatedToken, TokenCreate, TokenView } from '../../shared/schemas/access';
import type { TokenAuth } from '../auth/access';
import { hashSecret, newSecret, nowIso } from '../auth/secret-token';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import { audit } from './audit';

/** API tokens start with this, so secret scanners and people can recognise them. */
export const TOKEN_PREFIX = 'pwt_';
/** last_used_at is written at most this often per token. */
const LAST_USED_RESOLUTION_MS = 60_000;

export async function listApiTokens(ctx: AppContext, federationId: number): Promise<TokenView[]> {
  const rows = await ctx.db
    .selectFrom('api_tokens')
    .leftJoin('users', 'users.id', 'api_tokens.created_by')
    .select([
      'api_tokens.id',
      'api_tokens.name',
      'api_tokens.scope',
      'api_tokens.token_prefix',
      'users.display_name',
      'api_tokens.created_at',
      'api_tokens.last_used_at',
      'api_tokens.revoked_at',
    ])
    .where('api_tokens.federation_id', '=', federationId)
    .orderBy('api_tokens.revoked_at')
    .orderBy('api_tokens.created_at', 'desc')
    .execute();
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    scope: r.scope,
    prefix: r.token_prefix,
    createdBy: r.display_name ?? null,
    createdAt: r.created_at,
    lastUsedAt: r.last_used_at,
    revokedAt: r.revoked_at,
  }));
}

/** Creates a token for one federation and one scope; the token itself is returned this once only. */
export async function createApiToken(
  ctx: AppContext,
  federationId: number,
  input: TokenCreate,
  userId: number | null,
): Promise<CreatedToken> {
  const { token, hash } = newSecret(TOKEN_PREFIX);
  const row = await ctx.db.transaction().execute(async (trx) => {
    const created = await trx
      .insertInto('api_tokens')
      .values({
        federation_id: federationId,
        name: input.name,
        scope: input.scope,
        token_hash: hash,
        token_prefix: token.slice(0, TOKEN_PREFIX.length + 6),
        created_by: userId,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await audit(trx, {
      federationId,
      userId,
      action: 'api_token.create',
      entity: 'api_token',
      entityId: created.id,
      detail: { scope: input.scope, name: input.name },
    });
    return created;
  });
  const view = (await listApiTokens(ctx, federationId)).find((t) => t.id === row.id);
  if (!view) throw new HttpError(500, 'internal', 'The token was not stored');
  return { token, view };
}

export async function revokeApiToken(ctx: AppContext, federationId: number, tokenId: number, userId: number): Promise<void> {
  await ctx.db.transaction().execute(async (trx) => {
    const result = await trx
      .updateTable('api_tokens')
      .set({ revoked_at: nowIso() })
      .where('id', '=', tokenId)
      .where('federation_id', '=', federationId)
      .where('revoked_at', 'is', null)
      .executeTakeFirst();
    if (Number(result.numUpdatedRows) === 0) throw new HttpError(404, 'not_found', 'No active API token with this id');
    await audit(trx, { federationId, userId, action: 'api_token.revoke', entity: 'api_token', entityId: tokenId });
  });
}

/** The bearer resolver: a live token of a federation, with its scope; null for anything else. */
export async function resolveApiToken(ctx: AppContext, token: string): Promise<TokenAuth | null> {
  if (!token.startsWith(TOKEN_PREFIX) || token.length > 200) return null;
  const row = await ctx.db
    .selectFrom('api_tokens')
    .select(['id', 'federation_id', 'scope', 'last_used_at'])
    .where('token_hash', '=', hashSecret(token))
    .where('revoked_at', 'is', null)
    .executeTakeFirst();
  if (!row) return null;
  const now = new Date();
  if (!row.last_used_at || now.getTime() - Date.parse(row.last_used_at) > LAST_USED_RESOLUTION_MS) {
    await ctx.db.updateTable('api_tokens').set({ last_used_at: now.toISOString() }).where('id', '=', row.id).execute();
  }
  return { kind: 'token', tokenId: row.id, federationId: row.federation_id, scope: row.scope };
}

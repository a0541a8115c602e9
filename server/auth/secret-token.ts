import crypto from 'node:crypto';

/**
 * High-entropy secrets for e-mailed links and API tokens (32 random bytes). Only their sha256
 * is stored: with 256 bits of entropy a plain hash cannot be reversed by guessing, and it lets
 * the database find a token by an indexed equality lookup.
 */
export function newSecret(prefix = ''): { token: string; hash: string } {
  const token = prefix + crypto.randomBytes(32).toString('base64url');
  return { token, hash: hashSecret(token) };
}

export function hashSecret(token: string): string {
  return crypto.createHash('sha256').update(token, 'utf8').digest('hex');
}

export const nowIso = () => new Date().toISOString();
export const inIso = (ms: number) => new Date(Date.now() + ms).toISOString();

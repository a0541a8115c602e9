import crypto from 'node:crypto';
import { promisify } from 'node:util';

const scrypt = promisify(crypto.scrypt) as (
  password: string,
  salt: Buffer,
  keylen: number,
  options: crypto.ScryptOptions,
) => Promise<Buffer>;

/** scrypt cost parameters; recorded with each hash so they can be raised later. */
export const SCRYPT_PARAMS = { N: 2 ** 15, r: 8, p: 1, keylen: 32 } as const;

/** Format: scrypt$N$r$p$salt(base64url)$hash(base64url). */
export async function hashPassword(password: string, params = SCRYPT_PARAMS): Promise<string> {
  const salt = crypto.randomBytes(16);
  const hash = await scrypt(password, salt, params.keylen, {
    N: params.N,
    r: params.r,
    p: params.p,
    maxmem: 128 * params.N * params.r * 2,
  });
  return ['scrypt', params.N, params.r, params.p, salt.toString('base64url'), hash.toString('base64url')].join('$');
}

/** Timing-safe check of a password against a stored hash; false for a malformed hash. */
export async function verifyPassword(password: string, stored: string | null): Promise<boolean> {
  if (!stored) return false;
  const [scheme, n, r, p, saltText, hashText] = stored.split('$');
  if (scheme !== 'scrypt' || !saltText || !hashText) return false;
  const expected = Buffer.from(hashText, 'base64url');
  const N = Number(n);
  const R = Number(r);
  const actual = await scrypt(password, Buffer.from(saltText, 'base64url'), expected.length, {
    N,
    r: R,
    p: Number(p),
    maxmem: 128 * N * R * 2,
  });
  return actual.length === expected.length && crypto.timingSafeEqual(actual, expected);
}

/** Whether a stored hash uses weaker parameters than today's and should be re-hashed at sign-in. */
export function needsRehash(stored: string): boolean {
  const [, n] = stored.split('$');
  return Number(n) < SCRYPT_PARAMS.N;
}

let dummyHash: Promise<string> | undefined;
/** Spends the same time as a real check, so an unknown e-mail answers like a wrong password. */
export async function verifyAgainstDummy(password: string): Promise<false> {
  dummyHash ??= hashPassword('panelwise-dummy-password');
  await verifyPassword(password, await dummyHash);
  return false;
}

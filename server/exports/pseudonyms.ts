import crypto from 'node:crypto';

/**
 * Keyed pseudonyms for research exports.
 *
 * pseudonym = prefix + the first 64 bits of HMAC-SHA-256(key, entity ␟ salt ␟ natural key),
 * written four bits a letter in an alphabet of sixteen lowercase consonants.
 *
 * - The key is the federation's, generated on first use and kept server-side only.
 * - The salt is fresh for each export (and then thrown away) unless the export belongs to a
 *   study, whose stable salt makes that study's exports joinable with each other.
 * - The alphabet has no digits, no capitals and no vowels, so a pseudonym can never contain a
 *   code (C01, A0001, S2223-R1, KE-00001), a date or a name: a scan of an export for identities
 *   can look for raw substrings without false alarms.
 */
export const PSEUDONYM_ALPHABET = 'bcdfghjklmnpqrst';

export type PseudonymEntity = 'athlete' | 'classifier' | 'event' | 'assessment';

export const PSEUDONYM_PREFIXES: Record<PseudonymEntity, string> = {
  athlete: 'ath-',
  classifier: 'clf-',
  event: 'evt-',
  assessment: 'asm-',
};

/** Bits of the HMAC kept in a pseudonym. */
export const PSEUDONYM_BITS = 64;

/** A fresh random key or salt (256 bits, hex). */
export function randomSecret(): string {
  return crypto.randomBytes(32).toString('hex');
}

export function pseudonym(key: Uint8Array, salt: string, entity: PseudonymEntity, naturalKey: string): string {
  const mac = crypto.createHmac('sha256', key).update(`${entity}\u001f${salt}\u001f${naturalKey}`, 'utf8').digest();
  let out = PSEUDONYM_PREFIXES[entity];
  for (let i = 0; i < PSEUDONYM_BITS / 8; i++) {
    const byte = mac[i];
    out += PSEUDONYM_ALPHABET[byte >> 4] + PSEUDONYM_ALPHABET[byte & 15];
  }
  return out;
}

/**
 * Memoised pseudonyms for one export, refusing a collision (two natural keys with one pseudonym,
 * about 1 in 10^14 for a thousand keys) rather than merging two people.
 */
export function pseudonymiser(key: Uint8Array, salt: string): (entity: PseudonymEntity, naturalKey: string) => string {
  const memo = new Map<string, string>();
  const taken = new Map<string, string>();
  return (entity, naturalKey) => {
    const id = `${entity}\u001f${naturalKey}`;
    let p = memo.get(id);
    if (p === undefined) {
      p = pseudonym(key, salt, entity, naturalKey);
      const other = taken.get(p);
      if (other !== undefined && other !== id) throw new Error('Pseudonym collision: build the export again (a fresh salt is drawn)');
      taken.set(p, id);
      memo.set(id, p);
    }
    return p;
  };
}

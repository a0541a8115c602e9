import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { PSEUDONYM_ALPHABET, pseudonym, pseudonymiser, randomSecret } from '../../../server/exports/pseudonyms';

const key = new Uint8Array(Buffer.from('7f'.repeat(32), 'hex'));

describe('research export pseudonyms', () => {
  it('are HMAC-SHA-256 of the entity, salt and identifier, first 64 bits in sixteen consonants', async () => {
    // Reference value from Node's own crypto in another form: the hex digest's first 16 hex digits,
    // mapped digit by digit onto the alphabet.
    const crypto = await import('node:crypto');
    const hex = crypto.createHmac('sha256', Buffer.from(key)).update('athlete\u001fsalt-1\u001fA0001').digest('hex').slice(0, 16);
    const expected = 'ath-' + [...hex].map((h) => PSEUDONYM_ALPHABET[parseInt(h, 16)]).join('');
    expect(pseudonym(key, 'salt-1', 'athlete', 'A0001')).toBe(expected);
    expect(expected).toMatch(/^ath-[bcdfghjklmnpqrst]{16}$/);
  });

  it('are the same for the same key and salt, and unlinkable under another salt or key', () => {
    const codes = Array.from({ length: 300 }, (_, i) => `A${String(i + 1).padStart(4, '0')}`);
    const a = codes.map((c) => pseudonym(key, 'salt-1', 'athlete', c));
    const again = codes.map((c) => pseudonym(key, 'salt-1', 'athlete', c));
    const otherSalt = codes.map((c) => pseudonym(key, 'salt-2', 'athlete', c));
    const otherKey = codes.map((c) => pseudonym(new Uint8Array(32), 'salt-1', 'athlete', c));
    expect(again).toEqual(a);
    expect(new Set(a).size).toBe(300);
    expect(a.filter((p) => otherSalt.includes(p))).toEqual([]);
    expect(a.filter((p) => otherKey.includes(p))).toEqual([]);
    // The same identifier as another kind of entity gets another pseudonym.
    expect(pseudonym(key, 'salt-1', 'classifier', 'X').slice(4)).not.toBe(pseudonym(key, 'salt-1', 'athlete', 'X').slice(4));
  });

  it('never contain a digit, a capital or a vowel, so no code, date or name can appear inside one', () => {
    fc.assert(
      fc.property(fc.string(), fc.string(), (salt, id) => {
        const p = pseudonym(key, salt, 'assessment', id);
        return /^asm-[bcdfghjklmnpqrst]{16}$/.test(p);
      }),
      { numRuns: 500 },
    );
  });

  it('memoise per export and draw fresh 256-bit salts', () => {
    const p = pseudonymiser(key, 'salt');
    expect(p('event', 'S2223-R1')).toBe(p('event', 'S2223-R1'));
    expect(randomSecret()).toMatch(/^[0-9a-f]{64}$/);
    expect(randomSecret()).not.toBe(randomSecret());
  });
});

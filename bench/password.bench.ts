/**
 * Benchmark of the new-password check (server/auth/password-strength.ts) against its floor in
 * the same run: one scrypt hash of the same password (hashPassword, N = 2^15), which every
 * accepted password pays anyway. Also the estimator with Levenshtein matching on, which the
 * check leaves off, and the one-off cost of loading the dictionaries.
 *
 *   npx tsx bench/password.bench.ts
 *
 * Prints medians over the passwords below (ms) with their ratio to the scrypt floor and writes
 * bench/out/password.json.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { ZxcvbnFactory } from '@zxcvbn-ts/core';
import * as common from '@zxcvbn-ts/language-common';
import * as en from '@zxcvbn-ts/language-en';
import { hashPassword } from '../server/auth/password';
import { passwordStrength } from '../server/auth/password-strength';

const PASSWORDS = [
  'aaaaaaaaaa',
  'password123',
  'quiet-lantern-harbour-gravel',
  'juniperquill2026',
  'Tr0ub4dor&3x',
  'x'.repeat(200),
  'a1b2c3d4e5f6g7h8i9j0'.repeat(10),
  'correct horse battery staple',
];
const RUNS = Number(process.env.BENCH_RUNS ?? 5);

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

async function time(fn: () => unknown): Promise<number> {
  const t = performance.now();
  await fn();
  return performance.now() - t;
}

const loadMs = await time(() => passwordStrength('warm-up-the-dictionaries'));
const withLevenshtein = new ZxcvbnFactory({
  dictionary: { ...common.dictionary, ...en.dictionary },
  graphs: common.adjacencyGraphs,
  translations: en.translations,
  useLevenshteinDistance: true,
});

const check: number[] = [];
const levenshtein: number[] = [];
const scrypt: number[] = [];
for (let run = 0; run < RUNS; run++) {
  for (const p of PASSWORDS) {
    check.push(await time(() => passwordStrength(p, ['someone@example.test', 'Some One'])));
    scrypt.push(await time(() => hashPassword(p)));
    if (run === 0) levenshtein.push(await time(() => withLevenshtein.check(p)));
  }
}
const floor = median(scrypt);
const rows = [
  { name: 'scrypt hash (floor)', medianMs: floor, maxMs: Math.max(...scrypt), ratio: 1 },
  { name: 'strength check', medianMs: median(check), maxMs: Math.max(...check), ratio: median(check) / floor },
  {
    name: 'estimator with Levenshtein (not used)',
    medianMs: median(levenshtein),
    maxMs: Math.max(...levenshtein),
    ratio: median(levenshtein) / floor,
  },
];
console.log(`dictionaries loaded in ${loadMs.toFixed(0)} ms (once per process)`);
console.table(rows.map((r) => ({ ...r, medianMs: r.medianMs.toFixed(1), maxMs: r.maxMs.toFixed(1), ratio: r.ratio.toFixed(2) })));
const out = fileURLToPath(new URL('./out/', import.meta.url));
mkdirSync(out, { recursive: true });
writeFileSync(`${out}password.json`, JSON.stringify({ runs: RUNS, passwords: PASSWORDS.length, loadMs, rows }, null, 2));

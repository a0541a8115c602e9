/**
 * The strength rule for new passwords (invitation accept, password reset, `panelwise
 * create-owner`): at least PASSWORD_MIN characters (the shared schema, checked by the client
 * too) and a zxcvbn score of at least MIN_SCORE, estimated by @zxcvbn-ts/core 4.2 with the
 * common and English dictionaries, against the person's own e-mail, name and the product's
 * words. Score 3 means the estimator expects more than 10^8 guesses (zxcvbn-ts documentation,
 * "score"). The check runs on the server only: its dictionaries (several MB) stay out of the
 * client bundle, whose form shows the server's message.
 *
 * Levenshtein matching is off, the estimate covers the first 64 characters and tries at most 8
 * l33t substitutions: with the library's defaults one hostile 200-character password took
 * seconds of CPU on the event loop; with these bounds the worst of bench/password.bench.ts took
 * 0.66 s (median 58 ms) on a heavily loaded machine where one scrypt hash took 1.3 s. The routes
 * that check (invitation accept, password reset) need a valid e-mailed link and are rate limited.
 */
import type { ZxcvbnFactory } from '@zxcvbn-ts/core';
import { HttpError } from '../http/errors';

export const MIN_SCORE = 3;
/**
 * zxcvbn gives each part of a password a floor of guesses, so a password made of the person's
 * own words still reaches score 3 (10^8) by that floor alone. When the estimate uses the
 * person's or the site's words, at least 10^10 guesses are required instead.
 */
export const MIN_GUESSES_LOG10_WITH_PERSONAL_WORDS = 10;

/** Words anyone would try first against this site. */
const SITE_WORDS = ['panelwise', 'classifier', 'classification', 'wheelchair', 'basketball', 'federation', 'demo'];

let factory: Promise<ZxcvbnFactory> | undefined;

/** The estimator, loaded on first use (its dictionaries take a few hundred ms to load). */
function estimator(): Promise<ZxcvbnFactory> {
  factory ??= Promise.all([import('@zxcvbn-ts/core'), import('@zxcvbn-ts/language-common'), import('@zxcvbn-ts/language-en')]).then(
    ([core, common, en]) =>
      new core.ZxcvbnFactory({
        dictionary: { ...common.dictionary, ...en.dictionary },
        graphs: common.adjacencyGraphs,
        translations: en.translations,
        useLevenshteinDistance: false,
        // Bounds on the work per check (the estimator runs on the event loop): the first 64
        // characters are estimated (a longer password is strong by its length), and at most 8
        // l33t substitutions are tried.
        maxLength: 64,
        l33tMaxSubstitutions: 8,
      }),
  );
  return factory;
}

/** Loads the estimator now (the server does so before it listens, so no request waits for the dictionaries). */
export async function loadPasswordEstimator(): Promise<void> {
  await estimator();
}

export interface StrengthVerdict {
  ok: boolean;
  score: number;
  /** Why it is refused and what to do, in one or two sentences; empty when ok. */
  message: string;
}

/** The person's own words: the e-mail's local part and domain words, and the name's words. */
function personalWords(inputs: readonly string[]): string[] {
  const words = new Set<string>();
  for (const input of inputs) {
    const lower = input.toLowerCase().trim();
    if (!lower) continue;
    words.add(lower);
    for (const part of lower.split(/[^a-z0-9]+/)) if (part.length >= 3) words.add(part);
  }
  return [...words];
}

export async function passwordStrength(password: string, personal: readonly string[] = []): Promise<StrengthVerdict> {
  const zxcvbn = await estimator();
  const result = zxcvbn.check(password, [...SITE_WORDS, ...personalWords(personal)]);
  const personalMatch = result.sequence.some(
    (m) => m.pattern === 'dictionary' && 'dictionaryName' in m && m.dictionaryName === 'userInputs',
  );
  const leansOnPersonal = personalMatch && result.guessesLog10 < MIN_GUESSES_LOG10_WITH_PERSONAL_WORDS;
  if (result.score >= MIN_SCORE && !leansOnPersonal) return { ok: true, score: result.score, message: '' };
  const warning =
    result.feedback.warning ?? (leansOnPersonal ? 'It is built from your own name or e-mail, or from this site’s name.' : null);
  const why = warning ? `${warning.replace(/\.?$/, '.')} ` : '';
  const tip = result.feedback.suggestions[0] ?? 'Add more words that are less common.';
  return {
    ok: false,
    score: result.score,
    message: `This password is too easy to guess. ${why}${tip} A few unrelated words make a strong password.`.replace(/\s+/g, ' ').trim(),
  };
}

/** Throws 400 naming the password field when the password is too easy to guess. */
export async function assertStrongPassword(password: string, personal: readonly string[] = []): Promise<void> {
  const verdict = await passwordStrength(password, personal);
  if (!verdict.ok) throw new HttpError(400, 'validation_failed', verdict.message, [{ path: 'password', message: verdict.message }]);
}

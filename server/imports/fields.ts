/**
 * Field validators of an import row, written as zod schemas (one per kind of field) and
 * memoised per distinct text: a file repeats the same codes, dates and classes many times, so
 * each distinct value is checked by zod once.
 */
import { z, type ZodType } from 'zod';
import type { DateFormat } from '../../shared/import-columns';
import { parseSportClass, type ClassScale } from '../../shared/scale';
import { isoDateToDay } from '../analysis';
import { ASSESSMENT_KINDS, ASSESSMENT_KINDS_LIST, type AssessmentKind } from '../../shared/schemas/common';

export type FieldResult<T> = { ok: true; value: T } | { ok: false; message: string };
export type FieldValidator<T> = (raw: string | undefined) => FieldResult<T>;

const CACHE_LIMIT = 8192;

/**
 * A memoised validator from a zod schema over the raw text; the first issue is the message.
 * It remembers the last value (rows of one assessment repeat it) and the first 8,192 distinct
 * values (codes, dates and classes repeat across a file).
 */
export function fieldValidator<T>(schema: ZodType<T, string>): FieldValidator<T> {
  const cache = new Map<string, FieldResult<T>>();
  let lastText: string | null = null;
  let lastResult: FieldResult<T> | null = null;
  return (raw) => {
    const text = raw ?? '';
    if (text === lastText) return lastResult!;
    let result = cache.get(text);
    if (result === undefined) {
      const parsed = schema.safeParse(text);
      result = parsed.success
        ? { ok: true, value: parsed.data }
        : { ok: false, message: parsed.error.issues[0]?.message ?? 'is not valid' };
      if (cache.size < CACHE_LIMIT) cache.set(text, result);
    }
    lastText = text;
    lastResult = result;
    return result;
  };
}

const NO_CONTROL = /^[^\u0000-\u001f\u007f]*$/;

/** A code (assessment id, athlete, event or classifier code): not blank, at most 64 characters. */
export const codeSchema = z
  .string()
  .trim()
  .min(1, { message: 'is blank' })
  .max(64, { message: 'is longer than 64 characters' })
  .regex(NO_CONTROL, { message: 'contains control characters' });

/** A sport class on the federation's scale: "3", "3.0", "3,5" and " 3.5 " are accepted. */
export function sportClassSchema(scale: ClassScale): ZodType<number, string> {
  return z.string().transform((text, ctx) => {
    const r = parseSportClass(text, scale);
    if (!r.ok) {
      ctx.addIssue({ code: 'custom', message: r.reason });
      return z.NEVER;
    }
    return r.value;
  });
}

/** An optional sport class: blank is null. */
export function optionalClassSchema(scale: ClassScale): ZodType<number | null, string> {
  const cls = sportClassSchema(scale);
  return z.string().transform((text, ctx) => {
    if (text.trim() === '') return null;
    const r = cls.safeParse(text);
    if (!r.success) {
      ctx.addIssue({ code: 'custom', message: r.error.issues[0]?.message ?? 'is not a sport class' });
      return z.NEVER;
    }
    return r.data;
  });
}

const DATE_PATTERNS: Record<DateFormat, { re: RegExp; order: [number, number, number]; words: string }> = {
  iso: {
    re: /^(\d{4})-(\d{2})-(\d{2})(?:[T ]\d{2}:\d{2}(?::\d{2}(?:\.\d{1,9})?)?(?:Z|[+-]\d{2}:?\d{2})?)?$/,
    order: [1, 2, 3],
    words: 'an ISO 8601 date (YYYY-MM-DD)',
  },
  'DD/MM/YYYY': { re: /^(\d{1,2})\/(\d{1,2})\/(\d{4})$/, order: [3, 2, 1], words: 'a date DD/MM/YYYY' },
  'MM/DD/YYYY': { re: /^(\d{1,2})\/(\d{1,2})\/(\d{4})$/, order: [3, 1, 2], words: 'a date MM/DD/YYYY' },
  'DD.MM.YYYY': { re: /^(\d{1,2})\.(\d{1,2})\.(\d{4})$/, order: [3, 2, 1], words: 'a date DD.MM.YYYY' },
  'YYYY/MM/DD': { re: /^(\d{4})\/(\d{1,2})\/(\d{1,2})$/, order: [1, 2, 3], words: 'a date YYYY/MM/DD' },
};

/** A date in the declared format or in ISO 8601 (always accepted), as ISO YYYY-MM-DD. */
export function dateSchema(format: DateFormat): ZodType<string, string> {
  const { re, order, words } = DATE_PATTERNS[format];
  return z.string().transform((raw, ctx) => {
    const text = raw.trim();
    if (text === '') {
      ctx.addIssue({ code: 'custom', message: 'is blank' });
      return z.NEVER;
    }
    // An ISO date is unambiguous, so it is read beside any declared format (files often mix them).
    const isoMatch = format === 'iso' ? null : DATE_PATTERNS.iso.re.exec(text);
    const m = isoMatch ?? re.exec(text);
    if (!m) {
      ctx.addIssue({ code: 'custom', message: format === 'iso' ? `is not ${words}` : `is not ${words} (or an ISO date YYYY-MM-DD)` });
      return z.NEVER;
    }
    const o = isoMatch ? DATE_PATTERNS.iso.order : order;
    const iso = `${m[o[0]]}-${m[o[1]].padStart(2, '0')}-${m[o[2]].padStart(2, '0')}`;
    if (isoDateToDay(iso) === null) {
      ctx.addIssue({ code: 'custom', message: 'is not a date of the calendar' });
      return z.NEVER;
    }
    const year = Number(iso.slice(0, 4));
    if (year < 1950 || year > 2100) {
      ctx.addIssue({ code: 'custom', message: 'is not a year between 1950 and 2100' });
      return z.NEVER;
    }
    return iso;
  });
}

/** The assessment's kind; blank is null (not given: "first" for a new assessment, unchanged for a known one). */
export const kindSchema: ZodType<AssessmentKind | null, string> = z.string().transform((raw, ctx) => {
  const text = raw.trim().toLowerCase();
  if (text === '') return null;
  if ((ASSESSMENT_KINDS as readonly string[]).includes(text)) return text as AssessmentKind;
  ctx.addIssue({ code: 'custom', message: `is not one of ${ASSESSMENT_KINDS_LIST}` });
  return z.NEVER;
});

export const noteSchema: ZodType<string | null, string> = z
  .string()
  .max(2000, { message: 'is longer than 2,000 characters' })
  .transform((t) => (t.trim() === '' ? null : t.trim()));

/** The validators of one import, for its scale and date format. */
export interface FieldValidators {
  code: FieldValidator<string>;
  sportClass: FieldValidator<number>;
  panelClass: FieldValidator<number | null>;
  date: FieldValidator<string>;
  kind: FieldValidator<AssessmentKind | null>;
  note: FieldValidator<string | null>;
}

export function fieldValidators(scale: ClassScale, dateFormat: DateFormat): FieldValidators {
  return {
    code: fieldValidator(codeSchema),
    sportClass: fieldValidator(sportClassSchema(scale)),
    panelClass: fieldValidator(optionalClassSchema(scale)),
    date: fieldValidator(dateSchema(dateFormat)),
    kind: fieldValidator(kindSchema),
    note: fieldValidator(noteSchema),
  };
}

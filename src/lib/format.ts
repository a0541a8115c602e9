/**
 * The one place where the app turns numbers and dates into text. Locale-aware through Intl (the
 * browser's language), with one style for dates ("4 Dec 2026" / "Dec 4, 2026") and one for
 * date-times (with hours and minutes), a true minus sign "−" for negatives, seasons written
 * "2022–23" with an en dash, and plurals through Intl.PluralRules. Use these everywhere a figure
 * or a date is shown; never toFixed, toLocaleString or a sliced ISO string in a component.
 */

const MINUS = '\u2212';

/** The locale of every format (the browser's; tests may pin one with setFormatLocale). */
let locale: string | undefined;
const cache = new Map<string, Intl.NumberFormat | Intl.DateTimeFormat | Intl.PluralRules>();

export function setFormatLocale(next: string | undefined): void {
  locale = next;
  cache.clear();
}

function cached<T extends Intl.NumberFormat | Intl.DateTimeFormat | Intl.PluralRules>(key: string, make: () => T): T {
  const hit = cache.get(key);
  if (hit) return hit as T;
  const made = make();
  cache.set(key, made);
  return made;
}

const numberFormat = (digits: number, sign: 'negative' | 'exceptZero') =>
  cached(
    `n:${digits}:${sign}`,
    () => new Intl.NumberFormat(locale, { minimumFractionDigits: digits, maximumFractionDigits: digits, signDisplay: sign }),
  );

const isNumber = (value: number | null | undefined): value is number => value !== null && value !== undefined && Number.isFinite(value);

/** Intl writes a hyphen-minus (or U+2212 in some locales); we always show the true minus sign. */
const trueMinus = (text: string) => text.replace(/-/g, MINUS);

/** A figure with fixed decimals ("0.97", "−0.31"); a value that rounds to zero has no sign; "—" when missing. */
export function formatNumber(value: number | null | undefined, digits = 2): string {
  if (!isNumber(value)) return '—';
  return trueMinus(numberFormat(digits, 'negative').format(value));
}

/** A figure with its sign ("+0.12", "−0.31", "0.00"), for deviations and bias. */
export function formatSigned(value: number | null | undefined, digits = 2): string {
  if (!isNumber(value)) return '—';
  return trueMinus(numberFormat(digits, 'exceptZero').format(value));
}

/** A share as a percentage, with a no-break space before the sign ("97 %"). */
export function formatPercent(value: number | null | undefined, digits = 0): string {
  if (!isNumber(value)) return '—';
  // A no-break space: the sign never wraps away from its number.
  return `${formatNumber(value * 100, digits)}\u00a0%`;
}

/** A whole count with grouping ("1,933"). */
export function formatInteger(value: number | null | undefined): string {
  if (!isNumber(value)) return '—';
  return trueMinus(cached('int', () => new Intl.NumberFormat(locale, { maximumFractionDigits: 0 })).format(value));
}

/** A value in sport-class points with its unit ("0.25 points", "1 point", "−0.50 points"). */
export function formatPoints(value: number | null | undefined, digits = 2): string {
  if (!isNumber(value)) return '—';
  return `${formatNumber(value, digits)} ${Math.abs(value) === 1 ? 'point' : 'points'}`;
}

/**
 * A count with its noun in the right number: formatCount(1, 'new assessment') → "1 new
 * assessment", formatCount(3, 'new assessment') → "3 new assessments". Irregular plurals are
 * passed as the third argument.
 */
export function formatCount(n: number, singular: string, plural = `${singular}s`): string {
  const rule = cached('plural', () => new Intl.PluralRules(locale)).select(n);
  return `${formatInteger(n)} ${rule === 'one' ? singular : plural}`;
}

/** Just the noun in the right number (for sentences that write the count themselves). */
export function plural(n: number, singular: string, pluralForm = `${singular}s`): string {
  return cached('plural', () => new Intl.PluralRules(locale)).select(n) === 'one' ? singular : pluralForm;
}

const DATE_ONLY = /^(\d{4})-(\d{2})-(\d{2})$/;

function toDate(value: string | Date): Date | null {
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? null : value;
  const dateOnly = DATE_ONLY.exec(value);
  // A calendar date ("2026-12-04") is that day wherever the reader is, not midnight UTC.
  const d = dateOnly ? new Date(Number(dateOnly[1]), Number(dateOnly[2]) - 1, Number(dateOnly[3])) : new Date(value);
  return Number.isNaN(d.getTime()) ? null : d;
}

/** A date, in the app's one date style ("4 Dec 2026"); "—" when missing. */
export function formatDate(value: string | Date | null | undefined): string {
  if (value === null || value === undefined || value === '') return '—';
  const d = toDate(value);
  if (!d) return String(value);
  return cached('date', () => new Intl.DateTimeFormat(locale, { dateStyle: 'medium' })).format(d);
}

/** A moment, in the app's one date-time style ("4 Dec 2026, 19:55"), in the reader's time zone. */
export function formatDateTime(value: string | Date | null | undefined): string {
  if (value === null || value === undefined || value === '') return '—';
  const d = toDate(value);
  if (!d) return String(value);
  return cached('datetime', () => new Intl.DateTimeFormat(locale, { dateStyle: 'medium', timeStyle: 'short' })).format(d);
}

/**
 * A season (1 July to 30 June) as "2022–23" with an en dash: from its first year (2022), or from
 * a label written with a hyphen or a slash ("2022-23", "2022/2023").
 */
export function formatSeason(season: number | string): string {
  if (typeof season === 'number') return `${season}–${String(season + 1).slice(-2)}`;
  const m = /^(\d{4})\s*[-–/]\s*(\d{2}|\d{4})$/.exec(season.trim());
  if (!m) return season;
  return `${m[1]}–${m[2].slice(-2)}`;
}

/** Event levels as people say them; an unknown code is written with a capital and spaces. */
export const EVENT_LEVEL_LABELS: Record<string, string> = {
  club: 'Club',
  regional: 'Regional',
  national: 'National',
  championship: 'National championship',
  international: 'International',
  continental: 'Continental',
};

export function formatEventLevel(level: string): string {
  const known = EVENT_LEVEL_LABELS[level.toLowerCase()];
  if (known) return known;
  const words = level.replace(/[_-]+/g, ' ').trim();
  return words ? words[0].toUpperCase() + words.slice(1) : level;
}

import type { Stat } from '../../shared/schemas/analytics';
import { formatInteger, formatNumber, formatPercent, formatSigned } from './format';

/**
 * The dashboards' short names for the app's formatter (src/lib/format.ts): fixed decimals with a
 * true minus sign, percentages, intervals. New code may import from src/lib/format directly.
 */
export const num = formatNumber;
export const signed = formatSigned;
export const pct = formatPercent;

export function interval(ci: [number, number] | null | undefined, digits = 2, asPercent = false): string {
  if (!ci) return '';
  return asPercent ? `${formatNumber(ci[0] * 100, 0)}–${formatNumber(ci[1] * 100, 0)} %` : `${num(ci[0], digits)} to ${num(ci[1], digits)}`;
}

/** "0.97 (95 % CI 0.96 to 0.98)", or the reason when undefined. */
export function withInterval(s: Stat | null | undefined, digits = 2): string {
  if (!s) return '—';
  if (s.value === null) return s.reason ? `not defined (${s.reason})` : '—';
  return s.ci95 ? `${num(s.value, digits)} (95 % CI ${interval(s.ci95, digits)})` : num(s.value, digits);
}

/** Whole counts with grouping ("1,933"): `integer.format(n)`. */
export const integer = { format: (n: number) => formatInteger(n) };

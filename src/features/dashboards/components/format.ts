import type { Stat } from '../../../../shared/schemas/analytics';

/** Formatting of figures: fixed decimals, a true minus sign, intervals in brackets. */
export function num(value: number | null | undefined, digits = 2): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const text = value.toFixed(digits);
  // A value that rounds to zero is written without a sign.
  if (Number(text) === 0) return (0).toFixed(digits);
  return text.replace('-', '−');
}

export function signed(value: number | null | undefined, digits = 2): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const text = num(value, digits);
  return `${value > 0 && Number(value.toFixed(digits)) !== 0 ? '+' : ''}${text}`;
}

export function pct(value: number | null | undefined, digits = 0): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  return `${(value * 100).toFixed(digits)} %`;
}

export function interval(ci: [number, number] | null | undefined, digits = 2, asPercent = false): string {
  if (!ci) return '';
  return asPercent ? `${(ci[0] * 100).toFixed(0)}–${(ci[1] * 100).toFixed(0)} %` : `${num(ci[0], digits)} to ${num(ci[1], digits)}`;
}

/** "0.97 (95 % CI 0.96 to 0.98)", or the reason when undefined. */
export function withInterval(s: Stat | null | undefined, digits = 2): string {
  if (!s) return '—';
  if (s.value === null) return s.reason ? `not defined (${s.reason})` : '—';
  return s.ci95 ? `${num(s.value, digits)} (95 % CI ${interval(s.ci95, digits)})` : num(s.value, digits);
}

export const integer = new Intl.NumberFormat('en');

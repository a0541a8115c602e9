/**
 * Pure helpers for chart axes (no DOM, no Plot): quarters that keep their gaps, one tick per
 * year in small multiples, and category ticks that rotate on a narrow chart with the axis title
 * placed below them. The chart components (src/features/dashboards/components/charts.tsx) build
 * their Plot options from these; tests/unit/client/chart-axes.test.ts checks them.
 */

const QUARTER = /^(\d{4})-Q([1-4])$/;

/** "2024-Q3" → a running number of quarters (null when it is not a quarter label). */
export function quarterIndex(quarter: string): number | null {
  const m = QUARTER.exec(quarter);
  return m ? Number(m[1]) * 4 + Number(m[2]) - 1 : null;
}

export function quarterFromIndex(index: number): string {
  return `${Math.floor(index / 4)}-Q${(index % 4) + 1}`;
}

/** Every quarter from the first to the last given, the missing ones included, in order. */
export function quarterRange(quarters: readonly string[]): string[] {
  const indices = quarters.map(quarterIndex).filter((i): i is number => i !== null);
  if (indices.length === 0) return [...new Set(quarters)].sort();
  const first = Math.min(...indices);
  const last = Math.max(...indices);
  return Array.from({ length: last - first + 1 }, (_, i) => quarterFromIndex(first + i));
}

/**
 * The series on every quarter of the range, a missing quarter given as `{quarter, value: null}`:
 * Plot's line and area marks break at a null value, so a quarter without data shows as a gap
 * instead of a line joining its neighbours.
 */
export function withQuarterGaps<T extends { quarter: string; value: number | null }>(
  points: readonly T[],
  range: readonly string[],
): (T | { quarter: string; value: null })[] {
  const byQuarter = new Map(points.map((p) => [p.quarter, p]));
  return range.map((quarter) => byQuarter.get(quarter) ?? { quarter, value: null });
}

/**
 * One tick per calendar year of the range: the year's first quarter within it. A first year that
 * starts in its last quarter gets no tick, which would sit on the next year's.
 */
export function yearTicks(range: readonly string[]): string[] {
  const seen = new Set<string>();
  const ticks: string[] = [];
  for (const q of range) {
    const year = q.slice(0, 4);
    if (!seen.has(year)) {
      seen.add(year);
      if (ticks.length === 0 && q.endsWith('-Q4') && range.length > 1) continue;
      ticks.push(q);
    }
  }
  return ticks;
}

/** A year tick's text: "2024", or "’24" when each year has fewer than `minPx` pixels. */
export function yearTickFormat(pxPerYear: number, minPx = 34): (quarter: string) => string {
  return pxPerYear >= minPx ? (q) => q.slice(0, 4) : (q) => `’${q.slice(2, 4)}`;
}

/** Rough width of a tick label at Plot's 12 px Inter (about 6.5 px a character). */
export const labelWidth = (text: string) => Math.ceil(text.length * 6.5);

export interface CategoryAxis {
  tickRotate: number;
  marginBottom: number;
  /** Where the axis title sits below the axis, past the tick labels. */
  labelOffset: number;
  labelAnchor: 'center';
}

/**
 * Category ticks that fit: level when every label has its band's width, turned 45° otherwise;
 * the bottom margin makes room for the tick labels and then the axis title, so the two never
 * overlap.
 */
export function categoryAxis(labels: readonly string[], plotWidth: number, gap = 8): CategoryAxis {
  const band = labels.length ? plotWidth / labels.length : plotWidth;
  const widest = Math.max(0, ...labels.map(labelWidth));
  const level = widest + gap <= band;
  const tickSpace = level ? 18 : Math.ceil(widest * Math.SQRT1_2) + 14;
  return { tickRotate: level ? 0 : -45, marginBottom: tickSpace + 30, labelOffset: tickSpace + 22, labelAnchor: 'center' };
}

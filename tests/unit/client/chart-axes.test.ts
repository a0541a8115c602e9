import { describe, expect, it } from 'vitest';
import { categoryAxis, quarterRange, withQuarterGaps, yearTickFormat, yearTicks } from '../../../src/lib/charts/axes';

describe('chart axes', () => {
  it('keeps missing quarters in the range, as gaps a line does not join', () => {
    const range = quarterRange(['2023-Q4', '2023-Q2', '2024-Q2']);
    expect(range).toEqual(['2023-Q2', '2023-Q3', '2023-Q4', '2024-Q1', '2024-Q2']);
    const filled = withQuarterGaps(
      [
        { quarter: '2023-Q2', value: 0.8, n: 10 },
        { quarter: '2023-Q4', value: 0.7, n: 12 },
        { quarter: '2024-Q2', value: 0.9, n: 9 },
      ],
      range,
    );
    expect(filled.map((p) => p.value)).toEqual([0.8, null, 0.7, null, 0.9]);
  });

  it('gives small multiples one tick per year, even when a year starts with a missing quarter', () => {
    const range = quarterRange(['2021-Q3', '2022-Q2', '2024-Q1']);
    expect(yearTicks(range)).toEqual(['2021-Q3', '2022-Q1', '2023-Q1', '2024-Q1']);
    // A span that starts in a year's last quarter labels the next year first (no two ticks side by side).
    expect(yearTicks(quarterRange(['2022-Q4', '2024-Q2']))).toEqual(['2023-Q1', '2024-Q1']);
    expect(yearTickFormat(60)('2023-Q1')).toBe('2023');
    expect(yearTickFormat(20)('2023-Q1')).toBe('’23');
  });

  it('turns class-boundary ticks on a phone and puts the axis title below them', () => {
    const labels = ['1.0/1.5', '1.5/2.0', '2.0/2.5', '2.5/3.0', '3.0/3.5', '3.5/4.0', '4.0/4.5'];
    const desk = categoryAxis(labels, 1100);
    expect(desk.tickRotate).toBe(0);
    const phone = categoryAxis(labels, 300);
    expect(phone.tickRotate).toBe(-45);
    // The title's offset clears the turned labels (about 46 px of 7 characters at 45°).
    expect(phone.labelOffset).toBeGreaterThan(Math.ceil(7 * 6.5 * Math.SQRT1_2));
    expect(phone.marginBottom).toBeGreaterThan(phone.labelOffset);
    expect(desk.marginBottom).toBeGreaterThan(desk.labelOffset);
  });
});

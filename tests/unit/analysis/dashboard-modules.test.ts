/**
 * The engine modules the dashboards add (recent window, seasons, a classifier's boundary splits),
 * on small invented data whose values are worked out by hand from the definitions, and checked
 * against the engine's own whole-history statistics where the window covers everything.
 */
import { describe, expect, it } from 'vitest';
import {
  buildRatingSet,
  classDistributionBySeason,
  classifierBoundarySplits,
  classifiersVsPanel,
  confusionWithPanel,
  dayToSeasonYear,
  isoDateToDay,
  recentPanelComparison,
  seasonLabel,
  seasonRange,
  type RatingRow,
} from '../../../server/analysis';
import { DEFAULT_SCALE } from '../../../shared/scale';

function rows(spec: [string, string, string, number | null, [string, number][]][]): RatingRow[] {
  return spec.flatMap(([id, date, athlete, panel, ratings]) =>
    ratings.map(([c, v]) => ({
      assessmentId: id,
      athleteCode: athlete,
      eventCode: 'E01',
      assessedOn: date,
      classifierCode: c,
      sportClass: v * 2,
      panelClass: panel === null ? null : panel * 2,
      kind: 'first' as const,
    })),
  );
}

const set = buildRatingSet(
  rows([
    [
      'AS1',
      '2023-10-01',
      'A1',
      2.0,
      [
        ['C01', 2.0],
        ['C02', 2.0],
        ['C03', 2.0],
      ],
    ],
    [
      'AS2',
      '2023-11-01',
      'A2',
      3.0,
      [
        ['C01', 3.0],
        ['C02', 3.0],
        ['C03', 3.0],
      ],
    ],
    [
      'AS3',
      '2024-03-01',
      'A3',
      1.5,
      [
        ['C01', 2.0],
        ['C02', 1.5],
        ['C03', 1.5],
      ],
    ],
    [
      'AS4',
      '2024-09-01',
      'A1',
      2.5,
      [
        ['C01', 3.0],
        ['C02', 2.5],
        ['C03', 2.5],
      ],
    ],
    [
      'AS5',
      '2024-10-01',
      'A2',
      3.0,
      [
        ['C01', 3.5],
        ['C02', 3.0],
      ],
    ],
  ]),
  DEFAULT_SCALE,
);

describe('recentPanelComparison', () => {
  it('over the last 3 ratings of C01: deviations +0.5, +0.5, +0.5 (rating − others’ median, in points) → mean 0.5', () => {
    const w = recentPanelComparison(set, 'C01', 3);
    expect(w.n).toBe(3);
    expect(w.from).toBe('2024-03-01');
    expect(w.to).toBe('2024-10-01');
    expect(w.comparison?.meanDeviation.value).toBeCloseTo(0.5, 12);
    expect(w.comparison?.n).toBe(3);
  });

  it('a window longer than the history equals the engine’s whole-history comparison', () => {
    const whole = classifiersVsPanel(set).find((c) => c.code === 'C01')!;
    const w = recentPanelComparison(set, 'C01', 100);
    expect(w.n).toBe(5);
    expect(w.comparison).toEqual(whole);
  });

  it('an unknown classifier or an empty window has no comparison', () => {
    expect(recentPanelComparison(set, 'C99', 30)).toMatchObject({ n: 0, comparison: null, from: null });
    expect(recentPanelComparison(set, 'C01', 0)).toMatchObject({ n: 0, comparison: null });
  });
});

describe('seasons (1 July to 30 June)', () => {
  it('places dates in seasons and labels them', () => {
    expect(dayToSeasonYear(isoDateToDay('2024-06-30')!)).toBe(2023);
    expect(dayToSeasonYear(isoDateToDay('2024-07-01')!)).toBe(2024);
    expect(seasonLabel(2024)).toBe('2024–25');
    expect(seasonLabel(2099)).toBe('2099–00');
    expect(seasonRange(2024)).toEqual({ from: '2024-07-01', to: '2025-06-30' });
  });

  it('counts outcome classes (panel final class) by season', () => {
    const d = classDistributionBySeason(set);
    expect(d.map((s) => s.season)).toEqual(['2023–24', '2024–25']);
    expect(d[0]).toMatchObject({ n: 3, counts: expect.objectContaining({ '1.5': 1, '2.0': 1, '3.0': 1, '4.5': 0 }) });
    expect(d[0].shares['2.0']).toBeCloseTo(1 / 3, 12);
    expect(d[1]).toMatchObject({ n: 2, counts: expect.objectContaining({ '2.5': 1, '3.0': 1 }) });
  });
});

describe('classifierBoundarySplits', () => {
  it('C01 against the panel’s final class: split once at 1.5/2.0, 2.5/3.0 and 3.0/3.5, always above the panel', () => {
    const splits = classifierBoundarySplits(confusionWithPanel(set, 'C01'));
    const at = (lower: string) => splits.find((s) => s.lower === lower)!;
    // 1.5/2.0: ratings touching 1.5 or 2.0 (own or panel): AS1 (2.0|2.0), AS3 (2.0|1.5) → 1 split of 2.
    expect(at('1.5')).toMatchObject({ touching: 2, above: 1, below: 0, splitRate: 0.5 });
    // 2.5/3.0: AS2 (3.0|3.0), AS4 (3.0|2.5) → 1 of 2; AS5 (3.5|3.0) touches 3.0 too → 1 of 3.
    expect(at('2.5')).toMatchObject({ touching: 3, above: 1, below: 0 });
    expect(at('2.5').splitRate).toBeCloseTo(1 / 3, 12);
    // 3.0/3.5: AS2, AS4, AS5 touch → AS5 split.
    expect(at('3.0')).toMatchObject({ touching: 3, above: 1 });
    expect(at('4.0')).toMatchObject({ touching: 0, splitRate: null });
  });
});

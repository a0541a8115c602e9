/**
 * Points at stake (our own figure) and the two-rater coefficients of a confusion matrix, on
 * small invented data worked out by hand from the definitions (Cohen 1960 for kappa; Gwet 2008,
 * BJMSP 61:29–48, for AC1: p_e = Σ π_k(1 − π_k)/(q − 1) with π_k the mean share of class k).
 */
import { describe, expect, it } from 'vitest';
import { buildRatingSet, pointsApart, pointsAtStake, twoRaterCoefficients, type RatingRow } from '../../../server/analysis';
import { DEFAULT_SCALE } from '../../../shared/scale';

describe('two-rater coefficients of a confusion matrix', () => {
  it('[[2, 1], [0, 1]]: p_o = 3/4; kappa (3/4 − 1/2)/(1/2) = 0.5; AC1 with π = (5/8, 3/8): (3/4 − 30/64)/(1 − 30/64) = 0.5294', () => {
    const { kappa, ac1 } = twoRaterCoefficients([
      [2, 1],
      [0, 1],
    ]);
    expect(kappa.value).toBeCloseTo(0.5, 12);
    expect(ac1.value).toBeCloseTo((0.75 - 30 / 64) / (1 - 30 / 64), 12);
    const apart = pointsApart([
      [2, 1],
      [0, 1],
    ]);
    // One of four pairs is one class step (0.5 point) apart.
    expect(apart.meanAbs.value).toBeCloseTo(0.125, 12);
    expect(apart.offByHalf.value).toBe(0.25);
    expect(apart.per100).toBeCloseTo(12.5, 12);
  });
});

describe('pointsAtStake', () => {
  const rows = (spec: [string, number | null, [string, number][]][]): RatingRow[] =>
    spec.flatMap(([id, panel, ratings]) =>
      ratings.map(([c, v]) => ({
        assessmentId: id,
        athleteCode: id,
        eventCode: 'E1',
        assessedOn: '2024-10-01',
        classifierCode: c,
        sportClass: v * 2,
        panelClass: panel === null ? null : panel * 2,
      })),
    );
  const set = buildRatingSet(
    rows([
      [
        'S1',
        2.0,
        [
          ['C01', 2.0],
          ['C02', 2.5],
          ['C03', 2.0],
        ],
      ],
      [
        'S2',
        3.0,
        [
          ['C01', 4.0],
          ['C02', 3.0],
        ],
      ],
      [
        'S3',
        null,
        [
          ['C01', 1.0],
          ['C02', 1.5],
        ],
      ], // no final class: not counted
      ['S4', 1.0, [['C01', 1.0]]], // a panel of one: not counted
    ]),
    DEFAULT_SCALE,
  );
  it('distance from the final class in points, per classifier and pooled (hand-worked)', () => {
    const p = pointsAtStake(set);
    // C01: |2.0 − 2.0| = 0 and |4.0 − 3.0| = 1.0 → mean 0.5; one of two off by half a class or more.
    expect(p.classifiers.get('C01')).toMatchObject({ n: 2, per100: 50 });
    expect(p.classifiers.get('C01')!.offByHalf.value).toBe(0.5);
    // C02: 0.5 and 0 → mean 0.25.
    expect(p.classifiers.get('C02')!.meanAbs.value).toBeCloseTo(0.25, 12);
    // Pooled: 0 + 1.0 + 0.5 + 0 + 0 over 5 ratings = 0.3; 2 of 5 off by half a class or more.
    expect(p.federation.n).toBe(5);
    expect(p.federation.meanAbs.value).toBeCloseTo(0.3, 12);
    expect(p.federation.offByHalf.value).toBeCloseTo(0.4, 12);
  });
});

import { describe, expect, it } from 'vitest';
import { buildRatingSet, caseSpreads, panelBeforeAfter, raterScores, type RatingRow, type ScoredAnswer } from '../../../server/analysis';
import { DEFAULT_SCALE } from '../../../shared/scale';

/**
 * Exercise scores against values worked out by hand (below, step by step), not by the code under
 * test. Classes in half points on the default scale 1.0–4.5 (2 … 9, class indices 0 … 7).
 *
 * Cases and references: c1 = 2.5 (5), c2 = 3.0 (6), c3 = 3.0 (6), c4 = 4.0 (8).
 * X answers 2.5, 2.5, 3.5, 4.0 (5, 5, 7, 8): differences 0, −1, +1, 0 half points.
 * Y answers 3.0 everywhere (6, 6, 6, 6): differences +1, 0, 0, −2 half points.
 * Z answers c1 = 2.5 (5) and c4 = 4.0 (8) only.
 */
const cases = [
  { id: 1, reference: 5 },
  { id: 2, reference: 6 },
  { id: 3, reference: 6 },
  { id: 4, reference: 8 },
];
const answers: ScoredAnswer[] = [
  { rater: 'X', caseId: 1, sportClass: 5, skills: ['pushing', 'stopping'] },
  { rater: 'X', caseId: 2, sportClass: 5, skills: ['stopping'] },
  { rater: 'X', caseId: 3, sportClass: 7, skills: [] },
  { rater: 'X', caseId: 4, sportClass: 8, skills: ['rebounding'] },
  { rater: 'Y', caseId: 1, sportClass: 6, skills: ['shooting'] },
  { rater: 'Y', caseId: 2, sportClass: 6, skills: [] },
  { rater: 'Y', caseId: 3, sportClass: 6, skills: [] },
  { rater: 'Y', caseId: 4, sportClass: 6, skills: ['chair-contact', 'rebounding'] },
  { rater: 'Z', caseId: 1, sportClass: 5, skills: ['pushing'] },
  { rater: 'Z', caseId: 4, sportClass: 8, skills: ['rebounding'] },
];

describe('exercise scores per classifier (worked by hand)', () => {
  const scores = new Map(raterScores(cases, answers, DEFAULT_SCALE).map((s) => [s.rater, s]));

  it('X: exact 2/4, within half 4/4, bias 0, mean |difference| 0.25 point, kappa 19/23', () => {
    const x = scores.get('X')!;
    expect(x.answered).toBe(4);
    expect(x.exact.value).toBe(0.5); // 2 of 4 equal
    expect(x.withinHalf.value).toBe(1); // every |difference| ≤ 1 half point
    expect(x.bias.value).toBe(0); // (0 − 1 + 1 + 0) / 4 half points
    expect(x.meanAbsolutePoints).toBe(0.25); // (0 + 0.5 + 0.5 + 0) / 4 points
    expect(x.offByHalfPoint.value).toBe(0.5); // 2 of 4 off by ≥ 0.5 point
    expect(x.offByOnePoint.value).toBe(0); // none off by ≥ 1 point
    // Quadratic weights w = 1 − (i − j)² / (q − 1)², so κ = 1 − O / E with O and E the observed and
    // chance means of (i − j)² (the 1/(q − 1)² cancels; Cohen 1968).
    // Indices (answer, reference): (3,3) (3,4) (5,4) (6,6) → O = (0 + 1 + 1 + 0) / 4 = 0.5.
    // E = mean over the 16 margin pairs: answers {3,3,5,6} × references {3,4,4,6}:
    //   a = 3: 0 + 1 + 1 + 9 = 11 (twice: 22); a = 5: 4 + 1 + 1 + 1 = 7; a = 6: 9 + 4 + 4 + 0 = 17 → 46 / 16 = 2.875.
    // κ = 1 − 0.5 / 2.875 = 1 − 4/23 = 19/23 = 0.826087.
    expect(x.quadraticKappa.value).toBeCloseTo(19 / 23, 10);
    expect(x.quadraticKappa.value).toBeCloseTo(0.826087, 6);
  });

  it('Y: exact 2/4, within half 3/4, bias −0.125 point, kappa 0 (a constant answer carries no information)', () => {
    const y = scores.get('Y')!;
    expect(y.exact.value).toBe(0.5);
    expect(y.withinHalf.value).toBe(0.75);
    expect(y.bias.value).toBe(-0.125); // (+1 + 0 + 0 − 2) / 4 = −0.25 half point = −0.125 point
    expect(y.meanAbsolutePoints).toBe(0.375); // (0.5 + 0 + 0 + 1) / 4
    expect(y.offByHalfPoint.value).toBe(0.5);
    expect(y.offByOnePoint.value).toBe(0.25); // c4: 3.0 against 4.0
    // Answers all index 4: O = E = mean (4 − r)² over r ∈ {3,4,4,6} = (1 + 0 + 0 + 4) / 4 = 1.25 → κ = 1 − 1 = 0.
    expect(y.quadraticKappa.value).toBeCloseTo(0, 12);
  });

  it('Z: scored over the two cases answered only', () => {
    const z = scores.get('Z')!;
    expect(z.answered).toBe(2);
    expect(z.exact.value).toBe(1);
    expect(z.meanAbsolutePoints).toBe(0);
  });

  it('gives the Wilson interval of the engine with the shares (Wilson 1927): 2/4 → 0.150 to 0.850', () => {
    // Wilson score interval for 2/4 at z = 1.96: denominator 1 + z²/n = 1.9604, centre (0.5 + 0.4802) / 1.9604 = 0.5,
    // half-width 1.96 · √(0.0625 + 0.0600) / 1.9604 = 0.3500 → 0.150 to 0.850.
    const ci = scores.get('X')!.exact.ci95!;
    expect(ci[0]).toBeCloseTo(0.15, 3);
    expect(ci[1]).toBeCloseTo(0.85, 3);
  });
});

describe('exercise spreads per case (worked by hand)', () => {
  const spreads = new Map(caseSpreads(cases, answers).map((s) => [s.caseId, s]));

  it('c1: 2.5 ×2, 3.0 ×1 — split at 2.5/3.0, skills of each side', () => {
    const c1 = spreads.get(1)!;
    expect(c1.counts).toEqual([
      { sportClass: 5, n: 2 },
      { sportClass: 6, n: 1 },
    ]);
    expect(c1.rangePoints).toBe(0.5);
    expect(c1.exactShare).toBeCloseTo(2 / 3, 12);
    expect(c1.split).toBe(true);
    expect(c1.boundary).toBe(5);
    // Lower side: X (pushing, stopping) and Z (pushing); upper side: Y (shooting).
    expect(c1.lower).toEqual({
      answers: 2,
      skills: [
        { skill: 'pushing', n: 2 },
        { skill: 'stopping', n: 1 },
      ],
    });
    expect(c1.upper).toEqual({ answers: 1, skills: [{ skill: 'shooting', n: 1 }] });
  });

  it('c4: 3.0 ×1, 4.0 ×2 — both 3.0/3.5 and 3.5/4.0 leave one answer on the smaller side; the tie goes to the boundary nearest the reference (3.5/4.0)', () => {
    const c4 = spreads.get(4)!;
    expect(c4.rangePoints).toBe(1);
    expect(c4.boundary).toBe(7);
    expect(c4.lower).toEqual({
      answers: 1,
      skills: [
        { skill: 'chair-contact', n: 1 },
        { skill: 'rebounding', n: 1 },
      ],
    });
    expect(c4.upper).toEqual({ answers: 2, skills: [{ skill: 'rebounding', n: 2 }] });
  });

  it('c3: 3.5 and 3.0 — one each; the boundary 3.0/3.5 sits 0.5 from the reference 3.0', () => {
    const c3 = spreads.get(3)!;
    expect(c3.counts).toEqual([
      { sportClass: 6, n: 1 },
      { sportClass: 7, n: 1 },
    ]);
    expect(c3.boundary).toBe(6);
    expect(c3.exactShare).toBe(0.5);
  });

  it('a case nobody answered has no spread', () => {
    const s = caseSpreads([{ id: 9, reference: 4 }], answers)[0];
    expect(s).toMatchObject({ answers: 0, split: false, boundary: null, rangePoints: null, exactShare: null });
  });
});

describe('live-panel figures before and after an exercise (worked by hand)', () => {
  // K sits in panels of three with P and R, who always agree with each other. The exercise runs
  // 2025-03-01 to 2025-03-15. Before: K equals them twice and is one class lower twice; after:
  // K equals them three times. A rating inside the exercise's dates belongs to neither window.
  const rows: RatingRow[] = [];
  const add = (id: string, date: string, panel: number, k: number) => {
    for (const [code, cls] of [
      ['K', k],
      ['P', panel],
      ['R', panel],
    ] as const) {
      rows.push({
        assessmentId: id,
        athleteCode: `A${id}`,
        eventCode: 'E1',
        assessedOn: date,
        classifierCode: code,
        sportClass: cls,
        panelClass: panel,
      });
    }
  };
  add('1', '2024-11-02', 6, 6);
  add('2', '2024-12-07', 6, 5);
  add('3', '2025-01-11', 4, 4);
  add('4', '2025-02-08', 8, 7);
  add('5', '2025-03-08', 6, 5);
  add('6', '2025-04-05', 6, 6);
  add('7', '2025-05-03', 5, 5);
  add('8', '2025-06-07', 8, 8);
  const set = buildRatingSet(rows, DEFAULT_SCALE);

  it('before: 4 ratings, exact 2/4, mean deviation −0.25 point; after: 3 ratings, exact 3/3, deviation 0', () => {
    const r = panelBeforeAfter(set, 'K', '2025-03-01', '2025-03-15', 40);
    expect(r.before.n).toBe(4);
    expect(r.before.from).toBe('2024-11-02');
    expect(r.before.to).toBe('2025-02-08');
    expect(r.before.exactWithPanel.value).toBe(0.5);
    expect(r.before.meanDeviation.value).toBe(-0.25); // (0 − 0.5 + 0 − 0.5) / 4
    expect(r.before.withinHalfWithPanel.value).toBe(1);
    expect(r.after.n).toBe(3);
    expect(r.after.exactWithPanel.value).toBe(1);
    expect(r.after.meanDeviation.value).toBe(0);
  });

  it('keeps only the last `window` ratings before and the first `window` after', () => {
    const r = panelBeforeAfter(set, 'K', '2025-03-01', '2025-03-15', 2);
    expect(r.before.n).toBe(2);
    expect(r.before.from).toBe('2025-01-11'); // assessments 3 and 4
    expect(r.before.exactWithPanel.value).toBe(0.5);
    expect(r.after.n).toBe(2);
    expect(r.after.to).toBe('2025-05-03'); // assessments 6 and 7
  });

  it('marks each quarter before, during or after, with its exact share', () => {
    const r = panelBeforeAfter(set, 'K', '2025-03-01', '2025-03-15', 40);
    expect(r.quarters.map((q) => [q.quarter, q.phase, q.n, q.exact])).toEqual([
      ['2024-Q4', 'before', 2, 0.5],
      ['2025-Q1', 'during', 3, 1 / 3], // 2025-01-11 exact, 2025-02-08 and 2025-03-08 one class lower
      ['2025-Q2', 'after', 3, 1],
    ]);
  });

  it('says why the after window is empty when there is no rating yet', () => {
    const r = panelBeforeAfter(set, 'K', '2025-06-01', '2025-06-30', 40);
    expect(r.after.n).toBe(0);
    expect(r.after.exactWithPanel.value).toBeNull();
    expect(r.after.exactWithPanel.reason).toMatch(/no panel rating since/);
  });
});

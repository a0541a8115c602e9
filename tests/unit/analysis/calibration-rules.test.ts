/**
 * The calibration rules' building blocks on hand-worked or published examples, and the
 * properties the rules rest on: a constant lean never changes the drift statistic, the
 * permutation p-value holds its level on series without a change, and a planted change is found
 * where it was planted.
 */
import { describe, expect, it } from 'vitest';
import { benjaminiHochberg, changePointStatistic, changePointTest, meanTest, mulberry32 } from '../../../server/analysis';

describe('Benjamini–Hochberg', () => {
  it('the 15 p-values of Benjamini & Hochberg (1995, JRSS B 57:289–300, section 4; from memory): 4 rejections at q = 0.05', () => {
    const p = [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0];
    const adj = benjaminiHochberg(p);
    expect(adj.filter((a) => a !== null && a <= 0.05)).toHaveLength(4);
    // Hand-worked from the step-up definition: the 4th smallest, 0.0095 · 15 / 4 = 0.035625, is the largest rejected.
    expect(adj[3]).toBeCloseTo(0.035625, 12);
    // Adjusted values never fall as p rises, and a null entry (no test) stays null and does not count.
    for (let i = 1; i < p.length; i++) expect(adj[i]!).toBeGreaterThanOrEqual(adj[i - 1]!);
    expect(benjaminiHochberg([0.01, null, 0.04])).toEqual([0.02, null, 0.04]);
  });
});

describe('meanTest', () => {
  it('1, 2, 3, 4: t = 3.873 on 3 degrees of freedom, two-sided p = 0.0305 (R 4.x t.test(1:4), from memory; hand-checked t = 2.5 / (1.291 / 2))', () => {
    const r = meanTest([1, 2, 3, 4])!;
    expect(r.mean).toBe(2.5);
    expect(r.mean / r.se).toBeCloseTo(3.873, 3);
    expect(r.p).toBeCloseTo(0.0305, 3);
  });
});

describe('change-point test', () => {
  it('0, 0, 0, 1, 1, 1: the statistic is |S₃| / √(3·3/6) = 1.5 / 1.2247 at k = 3 (hand-worked)', () => {
    const r = changePointStatistic([0, 0, 0, 1, 1, 1], 1);
    expect(r.k).toBe(3);
    expect(r.statistic).toBeCloseTo(1.5 / Math.sqrt(1.5), 12);
  });

  it('a constant lean leaves the statistic, the estimate and the p-value unchanged', () => {
    const rng = mulberry32(3);
    const x = Array.from({ length: 200 }, () => (rng.next() < 0.3 ? (rng.next() < 0.5 ? -0.5 : 0.5) : 0));
    const a = changePointTest(x, 11)!;
    const b = changePointTest(
      x.map((v) => v - 0.25),
      11,
    )!;
    expect(b.statistic).toBeCloseTo(a.statistic, 12);
    expect(b.k).toBe(a.k);
    expect(b.p).toBe(a.p);
    expect(b.meanAfter - b.meanBefore).toBeCloseTo(a.meanAfter - a.meanBefore, 12);
  });

  it('holds its level: on 300 series without a change, p ≤ 0.05 for at most 8 % (binomial 95 % bound for 5 % is 7.5 %)', () => {
    let rejected = 0;
    for (let s = 0; s < 300; s++) {
      const rng = mulberry32(1000 + s);
      const x = Array.from({ length: 120 }, () => Math.round((rng.next() - 0.5) * 3) / 4);
      if (changePointTest(x, s + 1)!.p <= 0.05) rejected++;
    }
    expect(rejected / 300).toBeLessThanOrEqual(0.08);
    expect(rejected).toBeGreaterThan(0);
  });

  it('finds a half-point shift after rating 150 of 200 near where it was planted, upwards', () => {
    const rng = mulberry32(9);
    const x = Array.from({ length: 200 }, (_, i) => (rng.next() < 0.3 ? (rng.next() < 0.5 ? -0.5 : 0.5) : 0) + (i >= 150 ? 0.5 : 0));
    const r = changePointTest(x, 5)!;
    expect(r.p).toBeLessThan(0.001);
    expect(Math.abs(r.k - 150)).toBeLessThanOrEqual(5);
    expect(r.meanAfter).toBeGreaterThan(r.meanBefore);
  });

  it('needs ten ratings on each side', () => {
    expect(changePointTest(new Array(19).fill(0), 1)).toBeNull();
    expect(changePointTest(new Array(20).fill(0), 1)).toMatchObject({ p: 1 });
  });
});

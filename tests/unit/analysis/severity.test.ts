/**
 * The severity model (server/analysis/severity.ts): a case worked out by hand below, the
 * network's identification rules, and recovery of planted severities on invented federations
 * with regional pools (tests/factories/severity-simulation.ts; decision record 0009).
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  analyzeRatings,
  buildRatingSet,
  classifierSeverity,
  classifiersVsPanel,
  SEVERITY_CI_METHOD,
  Z95,
  type RatingRow,
} from '../../../server/analysis';
import { readTidyCsv } from '../../../server/cli/read-tidy-csv';
import { DEFAULT_SCALE } from '../../../shared/scale';
import { simulateFederation } from '../../factories/severity-simulation';

function rows(spec: [string, string, [string, number][]][]): RatingRow[] {
  return spec.flatMap(([id, athlete, ratings]) =>
    ratings.map(([c, v]) => ({
      assessmentId: id,
      athleteCode: athlete,
      eventCode: 'E01',
      assessedOn: '2025-10-01',
      classifierCode: c,
      sportClass: v * 2,
      kind: 'first' as const,
    })),
  );
}

function correlation(x: number[], y: number[]): number {
  const n = x.length;
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) ** 2;
    syy += (y[i] - my) ** 2;
  }
  return sxy / Math.sqrt(sxx * syy);
}

describe('classifierSeverity: a case worked by hand', () => {
  /*
   * Three classifiers in a triangle of panels of two, each assessment a different athlete:
   *   AS1 (A1): C01 3.0, C02 2.5    AS2 (A2): C02 3.0, C03 2.0    AS3 (A3): C01 2.5, C03 2.5
   * Deviations from the assessment means (Q_i = Σ y − ȳ):
   *   Q1 = (3.0 − 2.75) + (2.5 − 2.5) = 0.25;  Q2 = (2.5 − 2.75) + (3.0 − 2.5) = 0.25;  Q3 = −0.5 + 0 = −0.5.
   * Information matrix (each assessment m = 2): C_ii = 2 × (1 − 1/2) = 1, C_ij = −1/2, so
   * C = 1.5·I − 0.5·J. Under Σβ = 0, Cβ = 1.5β, hence β = Q / 1.5 = (1/6, 1/6, −1/3).
   * Residuals: the fitted differences β1 − β2 = 0, β2 − β3 = 0.5, β1 − β3 = 0.5 leave 0.5, 0.5, −0.5
   * of the observed differences 0.5, 1.0, 0.0; each rating carries half: ±0.25.
   * RSS = 6 × 0.0625 = 0.375; df = N − A − K + 1 = 6 − 3 − 2 = 1; σ̂ = √0.375 = 0.612372.
   * Cluster-robust variance (athletes as clusters): C⁺ = (2/3)(I − J/3), each s_g sums to 0 so
   * C⁺s_g = (2/3)s_g: u1 = (1/6, −1/6, 0), u2 = (0, 1/6, −1/6), u3 = (−1/6, 0, 1/6); Σ u_i² = 2/36
   * for every classifier; factor G/(G − 1) · (N − A)/df = 3/2 · 3/1 = 4.5; Var = 4.5/18 = 0.25,
   * SE = 0.5; C01's interval 1/6 ± 1.959964 × 0.5 = [−0.813315, 1.146649].
   * Added around it, and not changing it: a panel of two both at 4.5 (clipped at the top: left
   * out), a panel of one, a separate pair C04/C05, C06 alone, and C07/C08 together only on a
   * panel clipped at the bottom (both 1.0).
   */
  const set = buildRatingSet(
    rows([
      [
        'AS1',
        'A1',
        [
          ['C01', 3.0],
          ['C02', 2.5],
        ],
      ],
      [
        'AS2',
        'A2',
        [
          ['C02', 3.0],
          ['C03', 2.0],
        ],
      ],
      [
        'AS3',
        'A3',
        [
          ['C01', 2.5],
          ['C03', 2.5],
        ],
      ],
      [
        'AS4',
        'A4',
        [
          ['C01', 4.5],
          ['C02', 4.5],
        ],
      ],
      ['AS5', 'A5', [['C03', 3.5]]],
      [
        'AS6',
        'A6',
        [
          ['C04', 2.0],
          ['C05', 3.0],
        ],
      ],
      ['AS7', 'A7', [['C06', 2.0]]],
      [
        'AS8',
        'A8',
        [
          ['C07', 1.0],
          ['C08', 1.0],
        ],
      ],
    ]),
    DEFAULT_SCALE,
  );
  const result = classifierSeverity(set);
  const byCode = new Map(result.classifiers.map((c) => [c.code, c]));

  it('recovers the hand-computed severities, spread and intervals', () => {
    expect(byCode.get('C01')!.value).toBeCloseTo(1 / 6, 10);
    expect(byCode.get('C02')!.value).toBeCloseTo(1 / 6, 10);
    expect(byCode.get('C03')!.value).toBeCloseTo(-1 / 3, 10);
    expect(result.residualSd).toBeCloseTo(0.612372, 6);
    expect(result.df).toBe(1);
    expect(result.n).toBe(6);
    expect(result.assessments).toBe(3);
    for (const code of ['C01', 'C02', 'C03']) expect(byCode.get(code)!.se).toBeCloseTo(0.5, 10);
    expect(byCode.get('C01')!.ci95![0]).toBeCloseTo(-0.813315, 5);
    expect(byCode.get('C01')!.ci95![1]).toBeCloseTo(1.146649, 5);
    expect(byCode.get('C01')!.ci95![1] - byCode.get('C01')!.ci95![0]).toBeCloseTo(2 * Z95 * 0.5, 10);
    expect(result.ciMethod).toBe(SEVERITY_CI_METHOD);
  });

  it('counts ratings, links and shared assessments', () => {
    expect(byCode.get('C01')).toMatchObject({ n: 2, ratings: 3, links: 2, sharedAssessments: 3, component: 0 });
    expect(byCode.get('C03')).toMatchObject({ n: 2, ratings: 3, links: 2, sharedAssessments: 2, component: 0 });
    expect(result.network.edges).toEqual([
      { a: 'C01', b: 'C02', shared: 2 },
      { a: 'C01', b: 'C03', shared: 1 },
      { a: 'C02', b: 'C03', shared: 1 },
      { a: 'C04', b: 'C05', shared: 1 },
      { a: 'C07', b: 'C08', shared: 1 },
    ]);
    expect(result.network.components).toEqual([
      { classifiers: ['C01', 'C02', 'C03'], ratings: 6, assessments: 3 },
      { classifiers: ['C04', 'C05'], ratings: 2, assessments: 1 },
    ]);
  });

  it('reports null with a reason outside the main component', () => {
    const c04 = byCode.get('C04')!;
    expect(c04).toMatchObject({ value: null, se: null, ci95: null, component: 1, links: 1 });
    expect(c04.reason).toMatch(/not linked to the main panel network/);
    const c06 = byCode.get('C06')!;
    expect(c06).toMatchObject({ value: null, component: -1, links: 0, ratings: 1 });
    expect(c06.reason).toMatch(/never sat on a panel of two or more/);
    const c07 = byCode.get('C07')!;
    expect(c07).toMatchObject({ value: null, component: -1, links: 1, sharedAssessments: 1 });
    expect(c07.reason).toMatch(/all sit in the lowest or all in the highest class/);
  });

  it('matches the example of its doc comment (no residual degrees of freedom: no interval)', () => {
    const r = classifierSeverity(
      buildRatingSet(
        rows([
          [
            'AS1',
            'A1',
            [
              ['C01', 3.0],
              ['C02', 2.5],
            ],
          ],
          [
            'AS2',
            'A2',
            [
              ['C02', 3.0],
              ['C03', 3.0],
            ],
          ],
        ]),
        DEFAULT_SCALE,
      ),
    );
    expect(r.classifiers.map((c) => c.value)).toEqual([expect.closeTo(1 / 3, 10), expect.closeTo(-1 / 6, 10), expect.closeTo(-1 / 6, 10)]);
    expect(r.classifiers.every((c) => c.se === null && c.reason?.includes('no residual degrees of freedom'))).toBe(true);
  });

  it('is null with a reason when no one sat together', () => {
    const r = classifierSeverity(
      buildRatingSet(
        rows([
          ['AS1', 'A1', [['C01', 3.0]]],
          ['AS2', 'A2', [['C02', 3.0]]],
        ]),
        DEFAULT_SCALE,
      ),
    );
    expect(r.reason).toMatch(/two or more ratings/);
    expect(r.classifiers.every((c) => c.value === null && c.reason)).toBe(true);
    expect(r.network.components).toEqual([]);
  });

  it('does not move when every rating of an assessment moves by the same step (the level absorbs it)', () => {
    const shifted = buildRatingSet(
      rows([
        [
          'AS1',
          'A1',
          [
            ['C01', 3.5],
            ['C02', 3.0],
          ],
        ],
        [
          'AS2',
          'A2',
          [
            ['C02', 2.5],
            ['C03', 1.5],
          ],
        ],
        [
          'AS3',
          'A3',
          [
            ['C01', 2.5],
            ['C03', 2.5],
          ],
        ],
      ]),
      DEFAULT_SCALE,
    );
    const r = classifierSeverity(shifted);
    expect(r.classifiers.map((c) => c.value)).toEqual([expect.closeTo(1 / 6, 10), expect.closeTo(1 / 6, 10), expect.closeTo(-1 / 3, 10)]);
  });
});

describe('classifierSeverity: recovery on simulated federations with regional pools', () => {
  // 20 federations of 20 classifiers in 4 regional pools (leans −0.2 … +0.2 point plus N(0, 0.08²) each),
  // 300 athletes, 3,000 assessments, 80 % of panels from the athlete's regional pool, error SD 0.10–0.20 point.
  const FEDERATIONS = 20;
  const runs = Array.from({ length: FEDERATIONS }, (_, i) => {
    const f = simulateFederation({ seed: 1000 + i, classifiers: 20, assessments: 3000, noise: [0.1, 0.2] });
    const sev = classifierSeverity(f.set);
    const panel = classifiersVsPanel(f.set);
    return { f, sev, panel };
  });

  it('correlates ≥ 0.98 with the planted severities, errs ≤ 0.06 point and covers 90–98 % of them', () => {
    let covered = 0;
    let total = 0;
    let maxError = 0;
    for (const { f, sev } of runs) {
      const est = sev.classifiers.map((c) => c.value!);
      const truth = sev.classifiers.map((c) => f.planted.get(c.code)!);
      expect(correlation(est, truth)).toBeGreaterThanOrEqual(0.98);
      for (const c of sev.classifiers) {
        const p = f.planted.get(c.code)!;
        maxError = Math.max(maxError, Math.abs(c.value! - p));
        total++;
        if (c.ci95![0] <= p && p <= c.ci95![1]) covered++;
      }
    }
    expect(total).toBe(FEDERATIONS * 20);
    expect(maxError).toBeLessThanOrEqual(0.06);
    const coverage = covered / total;
    expect(coverage).toBeGreaterThanOrEqual(0.9);
    expect(coverage).toBeLessThanOrEqual(0.98);
  });

  it('does better than the bias against the panel median on the same data', () => {
    for (const { f, sev, panel } of runs) {
      const truth = (codes: string[]) => codes.map((c) => f.planted.get(c)!);
      const sevCorr = correlation(
        sev.classifiers.map((c) => c.value!),
        truth(sev.classifiers.map((c) => c.code)),
      );
      const panelCorr = correlation(
        panel.map((c) => c.meanDeviation.value!),
        truth(panel.map((c) => c.code)),
      );
      expect(sevCorr).toBeGreaterThan(panelCorr);
      expect(panelCorr).toBeLessThan(0.9);
    }
  });
});

describe('severity in the agreement report and the command line', () => {
  it('classifiers[].severity = {value, se, ci95, n, links} of the fit, and the model’s summary', () => {
    const f = simulateFederation({ seed: 42, classifiers: 8, regions: 2, athletes: 60, assessments: 300 });
    const report = analyzeRatings(f.set);
    const fit = classifierSeverity(f.set);
    expect(report.severity).toMatchObject({ model: fit.model, ciMethod: 'analytic-cluster-robust-by-athlete', n: fit.n, df: fit.df });
    expect(report.severity.components).toEqual(fit.network.components);
    for (const row of report.classifiers) {
      const e = fit.classifiers.find((c) => c.code === row.code)!;
      expect(row.severity).toEqual({ value: e.value, se: e.se, ci95: e.ci95, n: e.n, links: e.links });
    }
  });

  it('panelwise analyze prints the severity in JSON and in the table', () => {
    const root = fileURLToPath(new URL('../../../', import.meta.url));
    const run = (...args: string[]) =>
      spawnSync(process.execPath, [join(root, 'bin/panelwise.js'), 'analyze', join(root, 'fixtures/analysis/small-long.csv'), ...args], {
        encoding: 'utf8',
        cwd: root,
        timeout: 60_000,
      });
    const json = JSON.parse(run().stdout) as {
      classifiers: { code: string; severity: { value: number | null; ci95: [number, number] | null } }[];
    };
    const expected = classifierSeverity(readTidyCsv(join(root, 'fixtures/analysis/small-long.csv')));
    for (const row of json.classifiers)
      expect(row.severity.value).toBeCloseTo(expected.classifiers.find((c) => c.code === row.code)!.value!, 12);
    const table = run('--format', 'table').stdout;
    expect(table).toMatch(/Severity: two-way additive/);
    expect(table).toMatch(/Classifier\s+n\s+Severity\s+95% CI\s+Links/);
  });
});

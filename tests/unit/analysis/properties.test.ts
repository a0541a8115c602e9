/**
 * Property tests (fast-check 4.11.0) of the agreement engine on invented panels. The properties
 * are consequences of the definitions: Cohen (1960, 1968), Fleiss (1971), Krippendorff (2011),
 * Gwet (2008; 2014).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  analyzeRatings,
  bootstrapCountTable,
  buildRatingSet,
  cohenKappa,
  contingencyTable,
  countTable,
  fleissKappa,
  fleissKappaValue,
  gwetAC,
  krippendorffAlpha,
  type RatingRow,
} from '../../../server/analysis';
import { DEFAULT_SCALE } from '../../../shared/scale';

const Q = 8;

/** Ratings layout: units × raters, null = not on the panel; classes 0..7. */
const layout = (opts: { minUnits?: number; maxUnits?: number; minRaters?: number; maxRaters?: number; missing?: boolean } = {}) =>
  fc
    .record({
      raters: fc.integer({ min: opts.minRaters ?? 2, max: opts.maxRaters ?? 5 }),
      units: fc.integer({ min: opts.minUnits ?? 1, max: opts.maxUnits ?? 25 }),
    })
    .chain(({ raters, units }) =>
      fc.array(
        fc.array(opts.missing === false ? fc.integer({ min: 0, max: Q - 1 }) : fc.option(fc.integer({ min: 0, max: Q - 1 }), { freq: 4 }), {
          minLength: raters,
          maxLength: raters,
        }),
        { minLength: units, maxLength: units },
      ),
    );

function toRows(table: (number | null)[][], codes?: string[]): RatingRow[] {
  const rows: RatingRow[] = [];
  table.forEach((r, u) =>
    r.forEach((v, k) => {
      if (v === null) return;
      rows.push({
        assessmentId: `AS${u}`,
        athleteCode: `A${String(u).padStart(3, '0')}`,
        eventCode: 'E01',
        assessedOn: '2024-06-01',
        classifierCode: codes ? codes[k] : `C${String(k + 1).padStart(2, '0')}`,
        sportClass: v + DEFAULT_SCALE.min,
      });
    }),
  );
  return rows;
}

function distinctClasses(table: (number | null)[][]): number {
  return new Set(table.flat().filter((v) => v !== null)).size;
}

/** Deep comparison of two JSON-like values, numbers to an absolute tolerance. */
function expectSameNumbers(a: unknown, b: unknown, path = '$'): void {
  if (typeof a === 'number' && typeof b === 'number') {
    expect(Math.abs(a - b), path).toBeLessThanOrEqual(1e-9);
    return;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    expect(a.length, path).toBe(b.length);
    a.forEach((x, i) => expectSameNumbers(x, b[i], `${path}[${i}]`));
    return;
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    expect(Object.keys(a).sort(), path).toEqual(Object.keys(b).sort());
    for (const k of Object.keys(a)) expectSameNumbers((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
    return;
  }
  expect(a, path).toEqual(b);
}

describe('identical classifiers agree perfectly (Cohen 1960; Fleiss 1971; Krippendorff 2011; Gwet 2008)', () => {
  it('kappa (all weightings), Fleiss, alpha (all metrics) are 1 when defined; AC1/AC2 are 1', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: Q - 1 }), { minLength: 2, maxLength: 30 }),
        fc.integer({ min: 2, max: 5 }),
        (classes, raters) => {
          const table = classes.map((c) => Array<number>(raters).fill(c));
          const set = buildRatingSet(toRows(table), DEFAULT_SCALE);
          const t = countTable(set);
          const defined = distinctClasses(table) >= 2;
          const ct = contingencyTable(classes, classes, Q);
          for (const w of ['unweighted', 'linear', 'quadratic'] as const) {
            const k = cohenKappa(ct, Q, w).value;
            if (defined) expect(k).toBeCloseTo(1, 12);
            else expect(k).toBeNull();
            expect(gwetAC(t, w).value).toBeCloseTo(1, 12);
          }
          const f = fleissKappa(t).value;
          if (defined) expect(f).toBeCloseTo(1, 12);
          else expect(f).toBeNull();
          for (const m of ['nominal', 'ordinal', 'interval', 'ratio'] as const) {
            const a = krippendorffAlpha(t, m, [1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5]).value;
            if (defined) expect(a).toBeCloseTo(1, 12);
            else expect(a).toBeNull();
          }
        },
      ),
    );
  });
});

describe('invariance (the statistics treat classifiers and assessments as unordered)', () => {
  it('relabelling classifiers and reordering assessments leaves the report unchanged', () => {
    fc.assert(
      fc.property(layout({ maxRaters: 5 }), fc.integer(), (table, salt) => {
        const raters = table[0].length;
        const codes = Array.from({ length: raters }, (_, k) => `C${String(k + 1).padStart(2, '0')}`);
        // A permutation of the codes and of the assessment order, derived from the salt.
        const perm = codes
          .map((c, i) => ({ c, key: Math.sin(salt + i) }))
          .sort((x, y) => x.key - y.key)
          .map((x) => x.c);
        const rename = new Map(codes.map((c, i) => [c, perm[i]]));
        const rows = toRows(table);
        const shuffled = rows
          .map((r, i) => ({
            r: { ...r, classifierCode: rename.get(r.classifierCode)! },
            key: Math.cos(salt * 7 + Number(r.assessmentId.slice(2)) * 13) + i * 1e-9,
          }))
          .sort((x, y) => x.key - y.key)
          .map((x) => x.r);
        const a = analyzeRatings(buildRatingSet(rows, DEFAULT_SCALE));
        const b = analyzeRatings(buildRatingSet(shuffled, DEFAULT_SCALE));
        const { pairs: pa, classifiers: ca, severity: sa, ...restA } = a;
        const { pairs: pb, classifiers: cb, severity: sb, ...restB } = b;
        expectSameNumbers(restA, restB);
        // Pairs, classifiers and the severity model's network: same results under the new names.
        const back = new Map([...rename].map(([k, v]) => [v, k]));
        const byFirst = (x: { classifiers: string[] }, y: { classifiers: string[] }) => (x.classifiers[0] < y.classifiers[0] ? -1 : 1);
        const ownNames = sa.components.map((c) => ({ ...c, classifiers: [...c.classifiers].sort() }));
        const renamedBack = sb.components.map((c) => ({ ...c, classifiers: c.classifiers.map((x) => back.get(x)!).sort() }));
        expectSameNumbers({ ...sa, components: ownNames.sort(byFirst) }, { ...sb, components: renamedBack.sort(byFirst) });
        const key = (x: string, y: string) => [x, y].sort().join('|');
        const mapB = new Map(pb.map((p) => [key(back.get(p.a)!, back.get(p.b)!), p]));
        expect(pb.length).toBe(pa.length);
        for (const p of pa) {
          const q = mapB.get(key(p.a, p.b))!;
          expect(q).toBeDefined();
          expectSameNumbers({ ...p, a: 0, b: 0 }, { ...q, a: 0, b: 0 });
        }
        const mapC = new Map(cb.map((c) => [back.get(c.code)!, c]));
        for (const c of ca) expectSameNumbers({ ...c, code: 0 }, { ...mapC.get(c.code)!, code: 0 });
      }),
      { numRuns: 60 },
    );
  });
});

describe('weighted and unweighted kappa coincide when only two classes occur (Cohen 1968)', () => {
  it('for any two classes of the scale', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: Q - 1 }),
        fc.integer({ min: 0, max: Q - 1 }),
        fc.array(fc.tuple(fc.boolean(), fc.boolean()), { minLength: 2, maxLength: 40 }),
        (c1, c2, picks) => {
          fc.pre(c1 !== c2);
          const a = picks.map(([x]) => (x ? c1 : c2));
          const b = picks.map(([, y]) => (y ? c1 : c2));
          const t = contingencyTable(a, b, Q);
          const k = cohenKappa(t, Q, 'unweighted').value;
          for (const w of ['linear', 'quadratic'] as const) {
            const kw = cohenKappa(t, Q, w).value;
            if (k === null) expect(kw).toBeNull();
            else expect(kw).toBeCloseTo(k, 12);
          }
        },
      ),
    );
  });
});

describe('ranges where defined', () => {
  it('every coefficient of the report is at most 1, kappa/Fleiss/AC1 at least −1, and nothing is NaN', () => {
    fc.assert(
      fc.property(layout({ maxUnits: 20 }), (table) => {
        const r = analyzeRatings(buildRatingSet(toRows(table), DEFAULT_SCALE));
        expect(JSON.stringify(r)).not.toMatch(/NaN|Infinity/);
        const atMostOne = [
          r.fleissKappa.value,
          r.krippendorffAlpha.nominal.value,
          r.krippendorffAlpha.ordinal.value,
          r.krippendorffAlpha.interval.value,
          r.krippendorffAlpha.ratio.value,
          r.gwet.ac1.value,
          r.gwet.ac2Linear.value,
          r.gwet.ac2Quadratic.value,
          ...r.pairs.flatMap((p) => [p.kappa.value, p.linearKappa.value, p.quadraticKappa.value]),
          ...Object.values(r.fleissKappaByClass).map((s) => s.value),
        ];
        for (const v of atMostOne) if (v !== null) expect(v).toBeLessThanOrEqual(1 + 1e-12);
        const atLeastMinusOne = [r.fleissKappa.value, r.gwet.ac1.value, ...r.pairs.map((p) => p.kappa.value)];
        for (const v of atLeastMinusOne) if (v !== null) expect(v).toBeGreaterThanOrEqual(-1 - 1e-12);
        for (const v of [
          r.exactAgreement.unanimous.value,
          r.exactAgreement.pairwiseMean.value,
          r.withinHalfClassAgreement.pooledPairs.value,
        ]) {
          if (v !== null) {
            expect(v).toBeGreaterThanOrEqual(0);
            expect(v).toBeLessThanOrEqual(1);
          }
        }
      }),
      { numRuns: 150 },
    );
  });

  it('weighted kappas of two classifiers stay in [−1, 1]', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 0, max: Q - 1 }), fc.integer({ min: 0, max: Q - 1 })), { minLength: 2, maxLength: 30 }),
        (pairs) => {
          const t = contingencyTable(
            pairs.map((p) => p[0]),
            pairs.map((p) => p[1]),
            Q,
          );
          for (const w of ['unweighted', 'linear', 'quadratic'] as const) {
            const k = cohenKappa(t, Q, w).value;
            if (k !== null) {
              expect(k).toBeLessThanOrEqual(1 + 1e-12);
              expect(k).toBeGreaterThanOrEqual(-1 - 1e-12);
            }
          }
        },
      ),
    );
  });
});

describe('bootstrap (Efron & Tibshirani 1993, percentile interval) with a seeded generator', () => {
  it('the same seed gives the same interval; the point estimate is usually inside it', () => {
    fc.assert(
      fc.property(
        layout({ minUnits: 8, maxUnits: 25, missing: false, minRaters: 3, maxRaters: 4 }),
        fc.integer({ min: 0, max: 2 ** 31 - 1 }),
        (table, seed) => {
          const t = countTable(buildRatingSet(toRows(table), DEFAULT_SCALE));
          const a = bootstrapCountTable(t, fleissKappaValue, { B: 200, seed });
          const b = bootstrapCountTable(t, fleissKappaValue, { B: 200, seed });
          expect(a).toEqual(b);
          expect(a.B).toBe(200);
          expect(a.undefinedReplicates + 0).toBeLessThanOrEqual(200);
        },
      ),
      { numRuns: 25 },
    );
  });

  it('the report with the same seed repeats its intervals exactly; another seed moves them', () => {
    const table = Array.from({ length: 40 }, (_, u) => [u % 8, (u + (u % 3 === 0 ? 1 : 0)) % 8, (u + (u % 5 === 0 ? 7 : 0)) % 8]);
    const set = buildRatingSet(toRows(table), DEFAULT_SCALE);
    const a = analyzeRatings(set, { bootstrap: 300, seed: 42 });
    const b = analyzeRatings(set, { bootstrap: 300, seed: 42 });
    const c = analyzeRatings(set, { bootstrap: 300, seed: 43 });
    expect(a.fleissKappa.ciMethod).toBe('bootstrap-percentile');
    expect(a.fleissKappa.ci95).toEqual(b.fleissKappa.ci95);
    expect(a.krippendorffAlpha.ordinal.ci95).toEqual(b.krippendorffAlpha.ordinal.ci95);
    expect(a.krippendorffAlpha.ordinal.ci95).not.toBeNull();
    expect(c.fleissKappa.ci95).not.toEqual(a.fleissKappa.ci95);
    const [lo, hi] = a.fleissKappa.ci95!;
    expect(lo).toBeLessThanOrEqual(a.fleissKappa.value!);
    expect(hi).toBeGreaterThanOrEqual(a.fleissKappa.value!);
  });
});

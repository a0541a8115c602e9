/**
 * Every check of the published reference cases (fixtures/reference/worked-examples.json; see
 * fixtures/reference/README.md for where the file comes from). Each test is named after the
 * case, the statistic and the source printed in the file (author, year, table; or library,
 * version and call), and compares to the tolerance given there.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  analyzeRatings,
  buildRatingSet,
  classifierPairs,
  countTableFromRatings,
  countTableFromRows,
  fleissKappa,
  fleissKappaMeanShares,
  gwetAC,
  kappaFromTable,
  krippendorffAlpha,
  landisKochLabel,
  observedAgreement,
  pairAgreementFromTable,
  agreementWeights,
  weightsFromDisagreement,
  weightsFromMatrix,
  type CountTable,
  type RatingRow,
  type StatResult,
} from '../../../server/analysis';
import { DEFAULT_SCALE } from '../../../shared/scale';

type Json = Record<string, unknown>;
interface Check {
  statistic: string;
  expected: number | null | (number | null)[];
  tolerance: number;
  origin: string;
  source: string;
  [extra: string]: unknown;
}
interface Case {
  id: string;
  title: string;
  data: Json & { kind: string };
  checks: Check[];
  pairwise_cohen?: {
    pair: [string, string];
    n_shared: number;
    expected: Record<string, number | null>;
    tolerance: number;
    origin: string;
  }[];
}

const file = fileURLToPath(new URL('../../../fixtures/reference/worked-examples.json', import.meta.url));
const reference = JSON.parse(readFileSync(file, 'utf8')) as { cases: Case[]; interpretation: Json };

/** Checks deliberately not run, with the reason. */
const SKIPPED: Record<string, string> = {};

/** One case's data as the engine's inputs. */
interface Prepared {
  q: number;
  /** Class values for the interval/ratio metrics of alpha. */
  values: number[];
  table: CountTable | null;
  /** Two-rater contingency table (row-major, q × q), when the case has exactly two raters. */
  pair: Float64Array | null;
  /** Sport-class rows for the full pipeline, when the case is on the half-point scale. */
  rows: RatingRow[] | null;
  raters: string[];
}

function prepare(c: Case): Prepared {
  const d = c.data;
  if (d.kind === 'count_table') {
    const rows = d.rows as number[][];
    const q = rows[0].length;
    return { q, values: range(q, 1), table: countTableFromRows(rows), pair: null, rows: null, raters: [] };
  }
  if (d.kind === 'contingency_table') {
    const m = (d.counts as number[][]) ?? null;
    const q = m.length;
    return { q, values: range(q, 1), table: null, pair: Float64Array.from(m.flat()), rows: null, raters: ['A', 'B'] };
  }
  // ratings_table
  const raw = d.rows as (number | string | null)[][];
  const width = raw[0].length;
  const raters = (d.raters as string[] | undefined) ?? (d.observers as string[] | undefined) ?? range(width, 1).map((i) => `R${i}`);
  let categories: (number | string)[];
  let values: number[];
  let sport = false;
  if (Array.isArray(d.scale)) {
    categories = d.scale as number[];
    values = categories as number[];
    sport = true;
  } else {
    const seen = [...new Set(raw.flat().filter((v): v is number | string => v !== null))];
    categories = seen.sort((x, y) => (x < y ? -1 : x > y ? 1 : 0));
    values = categories.every((v) => typeof v === 'number') ? categories : range(categories.length, 0);
  }
  const q = categories.length;
  const idx = raw.map((r) => r.map((v) => (v === null ? null : categories.indexOf(v))));
  const table = countTableFromRatings(idx, q);
  let pair: Float64Array | null = null;
  if (width === 2) {
    pair = new Float64Array(q * q);
    for (const [x, y] of idx) if (x !== null && y !== null && x !== undefined && y !== undefined) pair[x * q + y]++;
  }
  let rows: RatingRow[] | null = null;
  if (sport) {
    rows = [];
    raw.forEach((r, u) =>
      r.forEach((v, k) => {
        if (v === null) return;
        rows!.push({
          assessmentId: `A${String(u + 1).padStart(3, '0')}`,
          athleteCode: `P${String(u + 1).padStart(3, '0')}`,
          eventCode: 'E01',
          assessedOn: '2024-03-01',
          classifierCode: raters[k],
          sportClass: Math.round((v as number) * 2),
        });
      }),
    );
  }
  return { q, values, table, pair, rows, raters };
}

function range(n: number, from: number): number[] {
  return Array.from({ length: n }, (_, i) => i + from);
}

function expectClose(actual: number | null | undefined, expected: number | null, tolerance: number): void {
  if (expected === null) {
    expect(actual ?? null).toBeNull();
    return;
  }
  expect(actual).not.toBeNull();
  expect(actual).toBeTypeOf('number');
  expect(Math.abs((actual as number) - expected)).toBeLessThanOrEqual(tolerance + 1e-15);
}

function kappaFor(c: Case, p: Prepared, check: Check): ReturnType<typeof kappaFromTable> {
  const s = check.statistic;
  const q = p.q;
  let w: Float64Array;
  if (s.startsWith('cohen_weighted_kappa_custom_disagreement')) {
    w = weightsFromDisagreement(c.data[check.weights as string] as number[][]);
  } else if (s.startsWith('cohen_weighted_kappa_custom_agreement')) {
    w = weightsFromMatrix(c.data.agreement_weights as number[][]);
  } else if (s.startsWith('cohen_kappa_linear')) w = agreementWeights(q, 'linear');
  else if (s.startsWith('cohen_kappa_quadratic')) w = agreementWeights(q, 'quadratic');
  else w = agreementWeights(q, 'unweighted');
  return kappaFromTable(p.pair!, q, w);
}

/** The engine's value for a check (a number, null, or an array for vector checks). */
function compute(c: Case, p: Prepared, check: Check): number | null | (number | null)[] {
  const s = check.statistic;
  const t = p.table!;
  if (s.startsWith('cohen_')) {
    const k = kappaFor(c, p, check);
    if (s.endsWith('_se0')) return k.se0;
    if (s.endsWith('_se')) return k.se;
    if (s.endsWith('_ci95')) return k.ci95;
    return k.value;
  }
  switch (s) {
    case 'fleiss_kappa':
    case 'fleiss_kappa_varying_panels_pooled_marginals':
      return fleissKappa(t).value;
    case 'fleiss_kappa_varying_panels_gwet_generalisation':
      return fleissKappaMeanShares(t).value;
    case 'fleiss_kappa_per_category':
    case 'fleiss_kappa_per_class':
      return fleissKappa(t).byClass.map((r) => r.value);
    case 'category_proportions_p_j':
    case 'p_j':
      return fleissKappa(t).shares;
    case 'P_bar_mean_observed_agreement':
      return fleissKappa(t).observed;
    case 'P_e_chance_agreement':
      return fleissKappa(t).expected;
    case 'P_i_per_subject':
      return (c.data.rows as number[][]).map((r) => observedAgreement(countTableFromRows([r])).exact.pairwiseMean.value);
    case 'fleiss_kappa_se0_null_hypothesis':
    case 'fleiss_kappa_se0':
      return fleissKappa(t).se0;
    case 'fleiss_kappa_per_category_se0_null_hypothesis':
      return fleissKappa(t).byClass[0].se;
    case 'krippendorff_alpha_nominal':
    case 'krippendorff_alpha_ordinal':
    case 'krippendorff_alpha_interval':
    case 'krippendorff_alpha_ratio':
      return krippendorffAlpha(t, s.slice('krippendorff_alpha_'.length) as 'nominal', p.values).value;
    case 'krippendorff_pairable_values_n':
      return krippendorffAlpha(t, 'nominal').n;
    case 'gwet_ac1':
      return gwetAC(t, 'unweighted').value;
    case 'gwet_ac2_linear':
      return gwetAC(t, 'linear').value;
    case 'gwet_ac2_quadratic':
      return gwetAC(t, 'quadratic').value;
    case 'percent_exact_agreement':
      return pairAgreementFromTable(p.pair!, p.q).exact.value;
    case 'percent_within_half_point':
      return pairAgreementFromTable(p.pair!, p.q).withinHalfClass.value;
    case 'percent_agreement_pairwise_mean_over_units':
    case 'exact_pairwise_mean_over_units':
      return observedAgreement(t).exact.pairwiseMean.value;
    case 'exact_pooled_pairs':
      return observedAgreement(t).exact.pooledPairs.value;
    case 'exact_unanimous_units':
      return observedAgreement(t).exact.unanimous.value;
    case 'within_half_pairwise_mean_over_units':
      return observedAgreement(t).withinHalfClass.pairwiseMean.value;
    case 'within_half_pooled_pairs':
      return observedAgreement(t).withinHalfClass.pooledPairs.value;
    case 'within_half_all_panel_range_le_0_5':
      return observedAgreement(t).withinHalfClass.unanimous.value;
    default:
      throw new Error(`no mapping for statistic ${s}`);
  }
}

/** Extra printed quantities beside a check (SAS ASE, CI, z; Gwet p_a, p_e, advisory SE). */
function extras(c: Case, p: Prepared, check: Check): [string, number | null, number | (number | null)[]][] {
  const out: [string, number | null, number | (number | null)[]][] = [];
  const s = check.statistic;
  if (s.startsWith('cohen_')) {
    const k = kappaFor(c, p, check);
    if (typeof check.ase === 'number') out.push(['ase', k.se, check.ase]);
    if (typeof check.ase_h0 === 'number') out.push(['ase_h0', k.se0, check.ase_h0]);
    if (typeof check.z === 'number') out.push(['z', k.z, check.z]);
    if (Array.isArray(check.ci95)) out.push(['ci95', null, check.ci95 as number[]]);
  }
  if (s.startsWith('gwet_')) {
    const r = gwetAC(p.table!, s === 'gwet_ac1' ? 'unweighted' : s === 'gwet_ac2_linear' ? 'linear' : 'quadratic');
    if (typeof check.p_a === 'number') out.push(['p_a', r.observed, check.p_a]);
    if (typeof check.p_e === 'number') out.push(['p_e', r.expected, check.p_e]);
    if (typeof check.se_advisory === 'number') out.push(['se_advisory', r.se, check.se_advisory]);
  }
  if (s === 'fleiss_kappa_se0_null_hypothesis' && typeof check.z === 'number') out.push(['z', fleissKappa(p.table!).z, check.z]);
  return out;
}

/**
 * The file's tolerance, but never finer than half a unit of the last decimal written in the
 * file: some exact values (e.g. 15/26) are written with 10 decimals beside a tolerance of
 * 1e-12, which no implementation can meet against the rounded number.
 */
function effectiveTolerance(tolerance: number, expected: number | null): number {
  if (expected === null) return tolerance;
  const written = printedTolerance(expected);
  // Only long decimals are rounded values (0.5769230769); short ones (1, 0.625, 0.9) are exact.
  return written <= 5e-9 ? Math.max(tolerance, written) : tolerance;
}

/** Tolerance of an extra printed beside a published value: half a unit of its last decimal. */
function printedTolerance(x: number): number {
  const text = String(x);
  const dot = text.indexOf('.');
  const decimals = dot < 0 ? 0 : text.length - dot - 1;
  return 0.5 * 10 ** -decimals;
}

for (const c of reference.cases) {
  describe(`${c.id}: ${c.title}`, () => {
    const p = prepare(c);
    c.checks.forEach((check, i) => {
      const key = `${c.id}#${i}:${check.statistic}`;
      const name = `${check.statistic} = ${JSON.stringify(check.expected)} ± ${check.tolerance} — ${check.source} [${check.origin}]`;
      if (SKIPPED[key]) {
        it.skip(`${name} (skipped: ${SKIPPED[key]})`, () => {});
        return;
      }
      it(name, () => {
        const got = compute(c, p, check);
        if (Array.isArray(check.expected)) {
          expect(Array.isArray(got)).toBe(true);
          const arr = got as (number | null)[];
          expect(arr).toHaveLength(check.expected.length);
          check.expected.forEach((e, j) => expectClose(arr[j], e, effectiveTolerance(check.tolerance, e)));
        } else {
          expectClose(got as number | null, check.expected, effectiveTolerance(check.tolerance, check.expected));
        }
        for (const [what, value, printed] of extras(c, p, check)) {
          if (what === 'ci95') {
            const k = kappaFor(c, p, check);
            const [lo, hi] = printed as number[];
            expect(k.ci95, 'ci95').not.toBeNull();
            expectClose(k.ci95![0], lo, printedTolerance(lo));
            expectClose(k.ci95![1], hi, printedTolerance(hi));
            continue;
          }
          const tol =
            what === 'se_advisory'
              ? 1e-6
              : check.tolerance < 1e-4
                ? Math.max(check.tolerance, printedTolerance(printed as number))
                : printedTolerance(printed as number);
          expectClose(value, printed as number, tol);
        }
      });
    });

    if (c.pairwise_cohen) {
      for (const pc of c.pairwise_cohen) {
        it(`pairwise Cohen kappa ${pc.pair.join('–')} (n = ${pc.n_shared}) — ${pc.origin}`, () => {
          const set = buildRatingSet(p.rows!, DEFAULT_SCALE);
          const pairs = classifierPairs(set);
          const found = pairs.find((x) => x.a === pc.pair[0] && x.b === pc.pair[1]);
          expect(found, 'pair listed').toBeDefined();
          expect(found!.n).toBe(pc.n_shared);
          expectClose(found!.kappa.value, pc.expected.unweighted ?? null, pc.tolerance);
          expectClose(found!.linearKappa.value, pc.expected.linear ?? null, pc.tolerance);
          expectClose(found!.quadraticKappa.value, pc.expected.quadratic ?? null, pc.tolerance);
        });
      }
    }

    if (p.rows) {
      it('the full report of the same data gives the same values (sources as above)', () => {
        const report = analyzeRatings(buildRatingSet(p.rows!, DEFAULT_SCALE));
        const direct = (st: string): number | null => {
          const check = c.checks.find((x) => x.statistic === st);
          return check ? (compute(c, p, check) as number | null) : null;
        };
        const same = (a: StatResult, st: string): void => {
          if (!c.checks.some((x) => x.statistic === st)) return;
          expectClose(a.value, direct(st), 1e-12);
        };
        same(report.krippendorffAlpha.nominal, 'krippendorff_alpha_nominal');
        same(report.krippendorffAlpha.ordinal, 'krippendorff_alpha_ordinal');
        same(report.krippendorffAlpha.interval, 'krippendorff_alpha_interval');
        same(report.gwet.ac1, 'gwet_ac1');
        same(report.gwet.ac2Linear, 'gwet_ac2_linear');
        same(report.gwet.ac2Quadratic, 'gwet_ac2_quadratic');
        same(report.fleissKappa, 'fleiss_kappa');
        same(report.fleissKappa, 'fleiss_kappa_varying_panels_pooled_marginals');
        same(report.exactAgreement.unanimous, 'exact_unanimous_units');
        same(report.exactAgreement.pairwiseMean, 'exact_pairwise_mean_over_units');
        same(report.withinHalfClassAgreement.unanimous, 'within_half_all_panel_range_le_0_5');
        same(report.exactAgreement.unanimous, 'percent_exact_agreement');
        same(report.withinHalfClassAgreement.unanimous, 'percent_within_half_point');
        expect(JSON.stringify(report)).not.toMatch(/NaN|Infinity/);
      });
    }
  });
}

describe('Landis & Koch (1977) labels — probe values with the half-open upper convention (reference JSON, interpretation.landis_koch_1977)', () => {
  const lk = reference.interpretation.landis_koch_1977 as { probe_values_with_half_open_upper_convention: [number, string][] };
  for (const [value, label] of lk.probe_values_with_half_open_upper_convention) {
    it(`${value} → ${label}`, () => expect(landisKochLabel(value)).toBe(label));
  }
  it('undefined → no label', () => expect(landisKochLabel(null)).toBeNull());
});

describe('skipped reference checks are listed with a reason', () => {
  it('every skip names an existing check', () => {
    for (const key of Object.keys(SKIPPED)) {
      const [id, rest] = key.split('#');
      const c = reference.cases.find((x) => x.id === id);
      expect(c, key).toBeDefined();
      expect(c!.checks[Number(rest.split(':')[0])]?.statistic).toBe(rest.split(':')[1]);
    }
  });
});

/**
 * Agreement of every pair of classifiers over the assessments they both rated: exact and
 * within-half-class agreement (observed p_o) and Cohen's kappa, unweighted and with linear and
 * quadratic weights over the full scale (Cohen 1960, 1968; SEs Fleiss, Cohen & Everitt 1969).
 *
 * All pair tables are filled in one pass over the assessments (a C × C × q × q count array),
 * so the cost is linear in the number of rating pairs.
 */
import { kappaFromTable, type KappaResult } from './cohen-kappa';
import { proportionStat, type StatResult } from './result';
import type { RatingSet } from './rating-set';
import { agreementWeights } from './weights';

export interface PairTables {
  readonly classifiers: number;
  readonly q: number;
  /** For a < b: table of (class by a, class by b) at offset ((a·C + b)·q²). */
  readonly tables: Int32Array;
}

/** Contingency tables of every classifier pair (row = lower classifier index). */
export function pairTables(set: RatingSet): PairTables {
  const C = set.classifierCodes.length;
  const q = set.q;
  const qq = q * q;
  const tables = new Int32Array(C * C * qq);
  const { ratingStart, ratingClassifier, ratingClass } = set;
  for (let a = 0; a < set.assessmentCount; a++) {
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    for (let i = s; i < e; i++) {
      const ci = ratingClassifier[i];
      const ki = ratingClass[i];
      for (let j = i + 1; j < e; j++) {
        const cj = ratingClassifier[j];
        const kj = ratingClass[j];
        if (ci < cj) tables[(ci * C + cj) * qq + ki * q + kj]++;
        else tables[(cj * C + ci) * qq + kj * q + ki]++;
      }
    }
  }
  return { classifiers: C, q, tables };
}

/** The q × q table of classifier `a` (rows) against classifier `b` (columns). */
export function pairTable(pt: PairTables, a: number, b: number): Int32Array {
  const { classifiers: C, q } = pt;
  const qq = q * q;
  if (a < b) return pt.tables.slice((a * C + b) * qq, (a * C + b + 1) * qq);
  const src = pt.tables.subarray((b * C + a) * qq, (b * C + a + 1) * qq);
  const out = new Int32Array(qq);
  for (let i = 0; i < q; i++) for (let j = 0; j < q; j++) out[i * q + j] = src[j * q + i]!;
  return out;
}

export interface PairAgreement {
  a: string;
  b: string;
  /** Shared assessments. */
  n: number;
  exact: StatResult;
  withinHalfClass: StatResult;
  kappa: KappaResult;
  linearKappa: KappaResult;
  quadraticKappa: KappaResult;
}

/** Agreement statistics of one contingency table (two classifiers). */
export function pairAgreementFromTable(table: ArrayLike<number>, q: number): Omit<PairAgreement, 'a' | 'b'> {
  let n = 0;
  let exact = 0;
  let within = 0;
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const c = table[i * q + j];
      n += c;
      if (i === j) exact += c;
      if (Math.abs(i - j) <= 1) within += c;
    }
  }
  return {
    n,
    exact: proportionStat(exact, n),
    withinHalfClass: proportionStat(within, n),
    kappa: kappaFromTable(table, q, agreementWeights(q, 'unweighted')),
    linearKappa: kappaFromTable(table, q, agreementWeights(q, 'linear')),
    quadraticKappa: kappaFromTable(table, q, agreementWeights(q, 'quadratic')),
  };
}

/** Every pair of classifiers with at least `minShared` shared assessments (default 2). */
export function classifierPairs(set: RatingSet, minShared = 2, pt: PairTables = pairTables(set)): PairAgreement[] {
  const C = pt.classifiers;
  const q = pt.q;
  const qq = q * q;
  const out: PairAgreement[] = [];
  for (let a = 0; a < C; a++) {
    for (let b = a + 1; b < C; b++) {
      const t = pt.tables.subarray((a * C + b) * qq, (a * C + b + 1) * qq);
      let n = 0;
      for (let i = 0; i < qq; i++) n += t[i];
      if (n < minShared) continue;
      const ca = set.classifierCodes[a];
      const cb = set.classifierCodes[b];
      // Every statistic here is symmetric in the two classifiers; list the pair in code order.
      const [first, second] = ca < cb ? [ca, cb] : [cb, ca];
      out.push({ a: first, b: second, ...pairAgreementFromTable(t, q) });
    }
  }
  return out.sort((x, y) => (x.a < y.a ? -1 : x.a > y.a ? 1 : x.b < y.b ? -1 : x.b > y.b ? 1 : 0));
}

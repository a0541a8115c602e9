/**
 * Classifier severity on a common scale: a two-way additive model of the ratings.
 *
 *   rating(assessment a, classifier c) = θ_a + β_c + ε,   ε independent, mean 0, variance σ²
 *
 * in sport-class points. θ_a is the athlete's level at that assessment (one parameter per
 * assessment, so a class that changes between assessments does not leak into anyone's
 * severity); β_c is the classifier's severity (+ = rates higher than the federation's average
 * classifier would for the same athlete). This is the two-way classification without interaction
 * on unbalanced data (Searle 1971, "Linear Models", ch. 7), read as an incomplete block design
 * with classifiers as treatments and assessments as blocks (Yates 1936, "Incomplete randomized
 * blocks", Annals of Eugenics 7:121–140). Fitted by least squares after absorbing the
 * assessment means: the reduced normal equations are C β = Q with the information matrix
 *
 *   C_ii = Σ_{a ∋ i} (1 − 1/m_a),   C_ij = −Σ_{a ∋ i, j} 1/m_a,   Q_i = Σ_{a ∋ i} (y_ai − ȳ_a)
 *
 * (m_a = ratings of assessment a; panels of one carry no information and are left out).
 * C is the Laplacian of the panel network with edge weights Σ 1/m_a, so C has one zero
 * eigenvalue per connected component of the network (Bose 1947 on connected designs; the
 * union-find test of connectedness follows Weeks & Williams 1964, Technometrics 6:319–324;
 * sources cited from memory). Severities are estimated on the largest component only, centred to
 * average 0 over its classifiers: β̂ = C⁺Q with C⁺ = (C + J/K)⁻¹ − J/K (J the all-ones matrix,
 * K the component's classifiers). Classifiers outside it get `value: null` with a reason.
 *
 * Assessments whose ratings all sit in the lowest class, or all in the highest, are left out:
 * the scale clips them, so they cannot show who is stricter, and counting them as agreement
 * would pull every severity towards 0 (simulation in decision record 0009).
 *
 * Interval: analytic, from the fitted model, with a cluster-robust (sandwich) variance that
 * takes athletes as clusters: Var(β̂) = C⁺ (Σ_athletes s sᵀ) C⁺, s = the athlete's residuals
 * summed per classifier (Liang & Zeger 1986; see clusterRobustVariance), Wald interval
 * β̂ ± 1.96·SE. It is conditional on the panels as they were staffed, and assumes severity
 * constant over the data window (drift is the drift rule's job, decision record 0002) and
 * athletes independent of one another. σ̂ = √(RSS / (N − A − K + 1)) is reported as the
 * residual spread. Decision record 0009 gives recovery and coverage measured by simulation.
 * Caution: where athletes sit close to a class centre and the rating error is small next to
 * the half-point step, a small lean rarely changes the class given; the estimate then measures
 * the classes given (shrunk against the latent lean, intervals too narrow for it; record 0009,
 * scenarios G and H). An ordinal model of the classes is the remedy left for later.
 *
 * Cost: one pass over the ratings plus a dense K × K Cholesky factorisation (K³/3 flops), so a
 * few milliseconds for tens of classifiers; more than MAX_SEVERITY_CLASSIFIERS linked
 * classifiers are refused with a reason rather than fitted slowly.
 *
 * @example
 * // Two assessments, C01 with C02 (3.0 and 2.5) and C02 with C03 (3.0 and 3.0):
 * // C01 is +0.5 against C02, C02 level with C03, so β = (+1/3, −1/6, −1/6) once centred;
 * // no residual degrees of freedom are left, so se and ci95 are null.
 * classifierSeverity(set).classifiers.map((c) => c.value) // → [0.3333…, −0.1666…, −0.1666…]
 */
import { Z95, type Interval } from './result';
import type { RatingSet } from './rating-set';

/** Most classifiers in one linked component that the dense fit accepts. */
export const MAX_SEVERITY_CLASSIFIERS = 3000;

export const SEVERITY_MODEL = 'two-way additive (assessment + classifier), least squares on the class scale in points' as const;
/** Wald interval from the cluster-robust (by athlete) variance of the least-squares fit. */
export const SEVERITY_CI_METHOD = 'analytic-cluster-robust-by-athlete' as const;

export interface ClassifierSeverity {
  code: string;
  /** Severity in points, + = rates higher than the federation's average classifier; null when not identified. */
  value: number | null;
  se: number | null;
  ci95: Interval | null;
  /** Ratings the estimate rests on (the classifier's ratings in panels of two or more of the main component). */
  n: number;
  /** Why value is null (or why the interval is missing). */
  reason?: string;
  /** All of the classifier's ratings. */
  ratings: number;
  /** Distinct other classifiers the classifier shared at least one assessment with. */
  links: number;
  /** Assessments shared with at least one other classifier. */
  sharedAssessments: number;
  /** Index into `network.components` (0 = the main component), −1 when never in a panel of two or more. */
  component: number;
}

export interface PanelNetworkEdge {
  a: string;
  b: string;
  /** Assessments both sat on. */
  shared: number;
}

export interface PanelNetwork {
  /**
   * Components of the panel network, largest first (by classifiers, then ratings); index 0 is the
   * main one. Linked by the assessments that inform the fit (panels of two or more, not all in the
   * lowest or all in the highest class); `ratings` and `assessments` count those.
   */
  components: { classifiers: string[]; ratings: number; assessments: number }[];
  /** Every pair of classifiers that shared at least one assessment, sorted by codes. */
  edges: PanelNetworkEdge[];
}

export interface SeverityResult {
  model: typeof SEVERITY_MODEL;
  ciMethod: typeof SEVERITY_CI_METHOD;
  /** Residual standard deviation σ̂ in points, null when there are no residual degrees of freedom. */
  residualSd: number | null;
  /** Residual degrees of freedom N − A − K + 1. */
  df: number;
  /** Ratings and assessments of the main component used in the fit. */
  n: number;
  assessments: number;
  /** One entry per classifier with at least one rating, sorted by code. */
  classifiers: ClassifierSeverity[];
  network: PanelNetwork;
  /** Set when no severity could be estimated at all. */
  reason?: string;
}

/** Union-find with path halving and union by size. */
function makeUnionFind(n: number): { find: (x: number) => number; union: (x: number, y: number) => void } {
  const parent = Int32Array.from({ length: n }, (_, i) => i);
  const size = new Int32Array(n).fill(1);
  const find = (x: number): number => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]]!;
      x = parent[x]!;
    }
    return x;
  };
  const union = (x: number, y: number): void => {
    let rx = find(x);
    let ry = find(y);
    if (rx === ry) return;
    if (size[rx] < size[ry]) [rx, ry] = [ry, rx];
    parent[ry] = rx;
    size[rx] += size[ry];
  };
  return { find, union };
}

/** Cholesky factorisation of a dense symmetric positive-definite K × K matrix (row-major), in place; false if not positive definite. */
function cholesky(m: Float64Array, k: number): boolean {
  for (let j = 0; j < k; j++) {
    let d = m[j * k + j];
    for (let p = 0; p < j; p++) d -= m[j * k + p] * m[j * k + p];
    if (!(d > 1e-12)) return false;
    const l = Math.sqrt(d);
    m[j * k + j] = l;
    for (let i = j + 1; i < k; i++) {
      let s = m[i * k + j];
      for (let p = 0; p < j; p++) s -= m[i * k + p] * m[j * k + p];
      m[i * k + j] = s / l;
    }
  }
  return true;
}

/** Inverse of L Lᵀ from the Cholesky factor (lower triangle of `l`), as a dense matrix. */
function choleskyInverse(l: Float64Array, k: number): Float64Array {
  // Inverse of L (lower triangular), then (L⁻¹)ᵀ L⁻¹.
  const li = new Float64Array(k * k);
  for (let j = 0; j < k; j++) {
    li[j * k + j] = 1 / l[j * k + j];
    for (let i = j + 1; i < k; i++) {
      let s = 0;
      for (let p = j; p < i; p++) s -= l[i * k + p] * li[p * k + j];
      li[i * k + j] = s / l[i * k + i];
    }
  }
  const inv = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let p = i; p < k; p++) s += li[p * k + i] * li[p * k + j];
      inv[i * k + j] = s;
      inv[j * k + i] = s;
    }
  }
  return inv;
}

/**
 * Least squares on the kept assessments: β = C⁺Q, each assessment's level = mean of (y − β),
 * σ² = RSS / df. Returns the per-rating values in points and the levels for the residuals.
 */
function fitLeastSquares(
  set: RatingSet,
  keep: Uint8Array,
  local: Int32Array,
  pinv: Float64Array,
  K: number,
  df: number,
): { beta: Float64Array; sigma2: number; y: Float64Array; level: Float64Array } {
  const { ratingStart, ratingClassifier, ratingClass } = set;
  // Class index / 2 = points up to an offset that cancels in every difference.
  const y = new Float64Array(set.ratingCount);
  for (let p = 0; p < set.ratingCount; p++) y[p] = ratingClass[p] / 2;
  const Q = new Float64Array(K);
  for (let a = 0; a < set.assessmentCount; a++) {
    if (!keep[a]) continue;
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    let sum = 0;
    for (let p = s; p < e; p++) sum += y[p];
    const mean = sum / (e - s);
    for (let p = s; p < e; p++) Q[local[ratingClassifier[p]]] += y[p] - mean;
  }
  const beta = new Float64Array(K);
  let centre = 0;
  for (let i = 0; i < K; i++) {
    let v = 0;
    for (let j = 0; j < K; j++) v += pinv[i * K + j] * Q[j];
    beta[i] = v;
    centre += v;
  }
  // Centred exactly (C⁺Q already sums to 0 up to rounding).
  centre /= K;
  for (let i = 0; i < K; i++) beta[i] -= centre;
  const level = new Float64Array(set.assessmentCount);
  let rss = 0;
  for (let a = 0; a < set.assessmentCount; a++) {
    if (!keep[a]) continue;
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    let l = 0;
    for (let p = s; p < e; p++) l += y[p] - beta[local[ratingClassifier[p]]];
    l /= e - s;
    level[a] = l;
    for (let p = s; p < e; p++) {
      const r = y[p] - l - beta[local[ratingClassifier[p]]];
      rss += r * r;
    }
  }
  return { beta, sigma2: df > 0 ? rss / df : 0, y, level };
}

/**
 * Diagonal of the cluster-robust (sandwich) variance of β̂ with athletes as clusters
 * (Liang & Zeger 1986, Biometrika 73:13–22; for models with absorbed fixed effects Arellano
 * 1987, Oxford Bulletin of Economics and Statistics 49:431–434): C⁺ (Σ_g s_g s_gᵀ) C⁺ with s_g
 * the athlete's residuals summed per classifier, times G/(G − 1) · (N − A)/df. An athlete seen
 * again and again by the same classifiers keeps their rounding and their reading of that
 * athlete: the errors are not independent within an athlete, and the model-based σ²C⁺ would
 * be too narrow (decision record 0009).
 */
function clusterRobustVariance(
  set: RatingSet,
  keep: Uint8Array,
  local: Int32Array,
  pinv: Float64Array,
  K: number,
  fit: { beta: Float64Array; y: Float64Array; level: Float64Array },
  N: number,
  A: number,
  df: number,
): Float64Array | null {
  const { ratingStart, ratingClassifier } = set;
  const athletes = set.athleteCodes.length;
  // Assessments grouped by athlete (counting sort).
  const start = new Int32Array(athletes + 1);
  for (let a = 0; a < set.assessmentCount; a++) if (keep[a]) start[set.athlete[a] + 1]++;
  for (let g = 0; g < athletes; g++) start[g + 1] += start[g];
  const fill = start.slice(0, athletes);
  const byAthlete = new Int32Array(A);
  for (let a = 0; a < set.assessmentCount; a++) if (keep[a]) byAthlete[fill[set.athlete[a]]++] = a;
  let G = 0;
  const score = new Float64Array(K);
  const touched = new Int32Array(K);
  const mark = new Uint8Array(K);
  const variance = new Float64Array(K);
  for (let g = 0; g < athletes; g++) {
    if (start[g] === start[g + 1]) continue;
    G++;
    let nt = 0;
    for (let t = start[g]; t < start[g + 1]; t++) {
      const a = byAthlete[t];
      for (let p = ratingStart[a]; p < ratingStart[a + 1]; p++) {
        const i = local[ratingClassifier[p]];
        if (!mark[i]) {
          mark[i] = 1;
          touched[nt++] = i;
        }
        score[i] += fit.y[p] - fit.level[a] - fit.beta[i];
      }
    }
    for (let i = 0; i < K; i++) {
      let u = 0;
      for (let t = 0; t < nt; t++) u += pinv[i * K + touched[t]] * score[touched[t]];
      variance[i] += u * u;
    }
    for (let t = 0; t < nt; t++) {
      score[touched[t]] = 0;
      mark[touched[t]] = 0;
    }
  }
  if (G < 2 || df <= 0) return null;
  const factor = (G / (G - 1)) * ((N - A) / df);
  for (let i = 0; i < K; i++) variance[i] *= factor;
  return variance;
}

/**
 * Fits the two-way severity model on a RatingSet (see the module comment). Linear in the
 * ratings plus O(K³) in the classifiers of the main component.
 */
export function classifierSeverity(set: RatingSet): SeverityResult {
  const C = set.classifierCodes.length;
  const { ratingStart, ratingClassifier, ratingClass } = set;
  const ratingsOf = new Int32Array(C);
  const used = new Uint8Array(C);
  for (let p = 0; p < set.ratingCount; p++) {
    const c = ratingClassifier[p];
    ratingsOf[c]++;
    used[c] = 1;
  }

  // An assessment informs the fit when it has two or more ratings, not all in the lowest class and
  // not all in the highest (the scale clips those: they cannot show who is stricter).
  const q = set.q;
  const informative = new Uint8Array(set.assessmentCount);
  for (let a = 0; a < set.assessmentCount; a++) {
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    if (e - s < 2) continue;
    let low = 0;
    let high = 0;
    for (let p = s; p < e; p++) {
      if (ratingClass[p] === 0) low++;
      else if (ratingClass[p] === q - 1) high++;
    }
    if (low < e - s && high < e - s) informative[a] = 1;
  }

  // Links: shared-assessment counts per pair over panels of two or more; union-find (the
  // components the fit can separate) over the informative assessments.
  const uf = makeUnionFind(C);
  // Shared assessments per pair: a dense C × C table for rosters of a realistic size, a map beyond.
  const dense = C <= 1024 ? new Int32Array(C * C) : null;
  const pairShared = new Map<number, number>();
  const sharedOf = new Int32Array(C);
  const inPanel = new Uint8Array(C);
  const inFit = new Uint8Array(C);
  for (let a = 0; a < set.assessmentCount; a++) {
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    if (e - s < 2) continue;
    const first = ratingClassifier[s];
    for (let p = s; p < e; p++) {
      const i = ratingClassifier[p];
      inPanel[i] = 1;
      sharedOf[i]++;
      if (informative[a]) {
        inFit[i] = 1;
        uf.union(first, i);
      }
      for (let r = p + 1; r < e; r++) {
        const j = ratingClassifier[r];
        const key = i < j ? i * C + j : j * C + i;
        if (dense) dense[key]++;
        else pairShared.set(key, (pairShared.get(key) ?? 0) + 1);
      }
    }
  }
  if (dense) for (let key = 0; key < C * C; key++) if (dense[key] > 0) pairShared.set(key, dense[key]);
  const linksOf = new Int32Array(C);
  const edges: PanelNetworkEdge[] = [];
  for (const [key, shared] of pairShared) {
    const i = Math.floor(key / C);
    const j = key % C;
    linksOf[i]++;
    linksOf[j]++;
    const ci = set.classifierCodes[i];
    const cj = set.classifierCodes[j];
    const [x, y] = ci < cj ? [ci, cj] : [cj, ci];
    edges.push({ a: x, b: y, shared });
  }
  edges.sort((u, v) => (u.a < v.a ? -1 : u.a > v.a ? 1 : u.b < v.b ? -1 : u.b > v.b ? 1 : 0));

  // Components (of classifiers that sat on a panel of two or more), largest first.
  const rootIndex = new Map<number, number>();
  const groups: { members: number[]; ratings: number; assessments: number }[] = [];
  for (let c = 0; c < C; c++) {
    if (!inFit[c]) continue;
    const r = uf.find(c);
    let g = rootIndex.get(r);
    if (g === undefined) {
      g = groups.length;
      rootIndex.set(r, g);
      groups.push({ members: [], ratings: 0, assessments: 0 });
    }
    groups[g].members.push(c);
  }
  for (let a = 0; a < set.assessmentCount; a++) {
    if (!informative[a]) continue;
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    const g = groups[rootIndex.get(uf.find(ratingClassifier[s]))!];
    g.ratings += e - s;
    g.assessments++;
  }
  const codeOrder = (x: number, y: number) => (set.classifierCodes[x] < set.classifierCodes[y] ? -1 : 1);
  const order = groups
    .map((_, i) => i)
    .sort((x, y) => {
      const gx = groups[x];
      const gy = groups[y];
      return (
        gy.members.length - gx.members.length || gy.ratings - gx.ratings || codeOrder(Math.min(...gx.members), Math.min(...gy.members))
      );
    });
  const componentOf = new Int32Array(C).fill(-1);
  order.forEach((g, rank) => {
    for (const c of groups[g].members) componentOf[c] = rank;
  });
  const network: PanelNetwork = {
    components: order.map((g) => ({
      classifiers: groups[g].members.map((c) => set.classifierCodes[c]).sort(),
      ratings: groups[g].ratings,
      assessments: groups[g].assessments,
    })),
    edges,
  };

  const main = network.components[0];
  const K = main ? main.classifiers.length : 0;
  const local = new Int32Array(C).fill(-1);
  if (main) [...groups[order[0]].members].sort(codeOrder).forEach((c, i) => (local[c] = i));

  const out = (c: number, fields: Pick<ClassifierSeverity, 'value' | 'se' | 'ci95' | 'n'> & { reason?: string }): ClassifierSeverity => {
    const row: ClassifierSeverity = {
      code: set.classifierCodes[c],
      value: fields.value,
      se: fields.se,
      ci95: fields.ci95,
      n: fields.n,
      ratings: ratingsOf[c],
      links: linksOf[c],
      sharedAssessments: sharedOf[c],
      component: componentOf[c],
    };
    if (fields.reason !== undefined) row.reason = fields.reason;
    return row;
  };
  const unlinkedReason = (c: number): string => {
    if (!inPanel[c]) return 'never sat on a panel of two or more: no one to compare with';
    if (!inFit[c]) return 'sat only on panels whose ratings all sit in the lowest or all in the highest class: no one to compare with';
    const comp = network.components[componentOf[c]];
    const group = comp.classifiers.length;
    return `not linked to the main panel network: no chain of shared assessments leads to it (a separate group of ${group} classifier${group === 1 ? '' : 's'})`;
  };
  const sortedClassifiers = (rows: ClassifierSeverity[]) => rows.sort((x, y) => (x.code < y.code ? -1 : x.code > y.code ? 1 : 0));

  const refuse = (reason: string): SeverityResult => ({
    model: SEVERITY_MODEL,
    ciMethod: SEVERITY_CI_METHOD,
    residualSd: null,
    df: 0,
    n: 0,
    assessments: 0,
    classifiers: sortedClassifiers(
      Array.from({ length: C }, (_, c) => c)
        .filter((c) => used[c])
        .map((c) => out(c, { value: null, se: null, ci95: null, n: 0, reason: componentOf[c] === 0 ? reason : unlinkedReason(c) })),
    ),
    network,
    reason,
  });
  if (K < 2) return refuse('no assessment with two or more ratings: severities need classifiers who sat together');
  if (K > MAX_SEVERITY_CLASSIFIERS) return refuse(`more than ${MAX_SEVERITY_CLASSIFIERS} linked classifiers: the fit is not attempted`);

  // The informative assessments of the main component.
  const keep = new Uint8Array(set.assessmentCount);
  let N = 0;
  let A = 0;
  for (let a = 0; a < set.assessmentCount; a++) {
    if (!informative[a] || local[ratingClassifier[ratingStart[a]]] < 0) continue;
    keep[a] = 1;
    N += ratingStart[a + 1] - ratingStart[a];
    A++;
  }

  // Reduced normal equations C β = Q: the information matrix first.
  const info = new Float64Array(K * K);
  const nUsed = new Int32Array(K);
  for (let a = 0; a < set.assessmentCount; a++) {
    if (!keep[a]) continue;
    const s = ratingStart[a];
    const e = ratingStart[a + 1];
    const w = 1 / (e - s);
    for (let p = s; p < e; p++) {
      const i = local[ratingClassifier[p]];
      nUsed[i]++;
      info[i * K + i] += 1 - w;
      for (let r = p + 1; r < e; r++) {
        const j = local[ratingClassifier[r]];
        info[i * K + j] -= w;
        info[j * K + i] -= w;
      }
    }
  }
  // C + J/K is positive definite on a connected design; its inverse minus J/K is C⁺.
  const mm = new Float64Array(K * K);
  for (let i = 0; i < K * K; i++) mm[i] = info[i] + 1 / K;
  if (!cholesky(mm, K)) return refuse('the information matrix is singular: the panel network does not separate the classifiers');
  const pinv = choleskyInverse(mm, K);
  for (let i = 0; i < K * K; i++) pinv[i] -= 1 / K;

  const df = N - A - (K - 1);
  const fit = fitLeastSquares(set, keep, local, pinv, K, df);
  const sigma2 = df > 0 ? fit.sigma2 : null;
  const beta = fit.beta;
  const robust = clusterRobustVariance(set, keep, local, pinv, K, fit, N, A, df);

  const rows: ClassifierSeverity[] = [];
  for (let c = 0; c < C; c++) {
    if (!used[c]) continue;
    const i = local[c];
    if (i < 0) {
      rows.push(out(c, { value: null, se: null, ci95: null, n: 0, reason: unlinkedReason(c) }));
      continue;
    }
    const value = beta[i];
    // A variance within rounding of zero (below 1e-12 point², an SE of 1e-6) is no variance: the
    // same data in another order must give the same answer.
    if (robust === null || !(robust[i] > 1e-12)) {
      const why = df <= 0 ? 'no residual degrees of freedom' : 'fewer than two athletes';
      rows.push(out(c, { value, se: null, ci95: null, n: nUsed[i], reason: `${why}: the interval is not defined` }));
      continue;
    }
    const se = Math.sqrt(robust[i]);
    rows.push(out(c, { value, se, ci95: [value - Z95 * se, value + Z95 * se], n: nUsed[i] }));
  }
  return {
    model: SEVERITY_MODEL,
    ciMethod: SEVERITY_CI_METHOD,
    residualSd: sigma2 === null ? null : Math.sqrt(sigma2),
    df: Math.max(0, df),
    n: N,
    assessments: A,
    classifiers: sortedClassifiers(rows),
    network,
  };
}

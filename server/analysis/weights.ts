/**
 * Agreement weight matrices over the ordered classes of the scale (Cohen 1968).
 *
 * w_ij = 1 on the diagonal and decreases with the distance between classes i and j, over all
 * q classes of the scale whether used or not: linear 1 − |i − j|/(q − 1), quadratic
 * 1 − (i − j)²/(q − 1)² (Cohen 1968; Fleiss & Cohen 1973 for the quadratic form).
 */
export type Weighting = 'unweighted' | 'linear' | 'quadratic';

/** q × q agreement weights, row-major. */
export function agreementWeights(q: number, weighting: Weighting): Float64Array {
  const w = new Float64Array(q * q);
  const d = q - 1;
  for (let i = 0; i < q; i++) {
    for (let j = 0; j < q; j++) {
      const dist = Math.abs(i - j);
      if (weighting === 'unweighted' || d === 0) w[i * q + j] = dist === 0 ? 1 : 0;
      else if (weighting === 'linear') w[i * q + j] = 1 - dist / d;
      else w[i * q + j] = 1 - (dist * dist) / (d * d);
    }
  }
  return w;
}

/**
 * Agreement weights from Cohen's (1968) disagreement weights v_ij (0 on the diagonal):
 * w_ij = 1 − v_ij / max v. Weighted kappa is unchanged by the rescaling; the Fleiss, Cohen &
 * Everitt (1969) variance needs weights in [0, 1].
 */
export function weightsFromDisagreement(v: readonly (readonly number[])[]): Float64Array {
  const q = v.length;
  let max = 0;
  for (const row of v) for (const x of row) if (x > max) max = x;
  const w = new Float64Array(q * q);
  for (let i = 0; i < q; i++) for (let j = 0; j < q; j++) w[i * q + j] = max === 0 ? 1 : 1 - v[i][j] / max;
  return w;
}

/** A row-major Float64Array from a nested array of weights. */
export function weightsFromMatrix(m: readonly (readonly number[])[]): Float64Array {
  const q = m.length;
  const w = new Float64Array(q * q);
  for (let i = 0; i < q; i++) for (let j = 0; j < q; j++) w[i * q + j] = m[i][j]!;
  return w;
}

// Vector operations of an explicit Runge-Kutta step on the flat amplitude array, over a
// range of components [start, end) (a range of sites times 2 (nmax + 1)). Element-wise, so
// any split among threads gives bit-identical results; the error norm is a maximum, which,
// unlike a sum, does not depend on the order in which the partial results are combined.

/** out_k = y_k + h sum_j coefficients[j] stages[j]_k, j < count (zero coefficients skipped). */
export function combineRange(
  out: Float64Array,
  y: Float64Array,
  h: number,
  coefficients: Float64Array,
  stages: readonly Float64Array[],
  count: number,
  start: number,
  end: number,
): void {
  out.set(y.subarray(start, end), start);
  for (let j = 0; j < count; j++) {
    const a = h * coefficients[j];
    if (a === 0) continue;
    const k = stages[j];
    for (let m = start; m < end; m++) out[m] += a * k[m];
  }
}

/**
 * max_k |h sum_j e_j stages[j]_k| / (atol + rtol max(|y0_k|, |y1_k|)): the scaled local
 * error of an embedded pair (Hairer, Norsett & Wanner, Solving Ordinary Differential
 * Equations I, 2nd ed. (1993), section II.4, with the maximum norm).
 */
export function errorNormRange(
  y0: Float64Array,
  y1: Float64Array,
  h: number,
  errorWeights: Float64Array,
  stages: readonly Float64Array[],
  count: number,
  absoluteTolerance: number,
  relativeTolerance: number,
  start: number,
  end: number,
): number {
  let worst = 0;
  for (let m = start; m < end; m++) {
    let e = 0;
    for (let j = 0; j < count; j++) e += errorWeights[j] * stages[j][m];
    e = Math.abs(h * e);
    const a = Math.abs(y0[m]);
    const b = Math.abs(y1[m]);
    const r = e / (absoluteTolerance + relativeTolerance * (a > b ? a : b));
    if (r > worst) worst = r;
  }
  return worst;
}

/** max_k |v_k| / (atol + rtol |y_k|) (for the starting step estimate). */
export function scaledMaxRange(v: Float64Array, y: Float64Array, absoluteTolerance: number, relativeTolerance: number, start: number, end: number): number {
  let worst = 0;
  for (let m = start; m < end; m++) {
    const r = Math.abs(v[m]) / (absoluteTolerance + relativeTolerance * Math.abs(y[m]));
    if (r > worst) worst = r;
  }
  return worst;
}

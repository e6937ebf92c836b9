// Vector operations of an explicit Runge-Kutta step on the flat amplitude array, over a
// range of components [start, end) (a range of sites times 2 (nmax + 1)). Element-wise, so
// any split among threads gives bit-identical results; the error norm is a maximum, which,
// unlike a sum, does not depend on the order in which the partial results are combined.

/**
 * out_k = y_k + h sum_j coefficients[j] stages[j]_k, j < count. One fused pass per call (the
 * loop is written out per stage count: with the stage arrays in local variables V8 keeps the
 * loop monomorphic; a nested loop over an array of arrays measured 2x slower).
 */
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
  if (count > 7) throw new RangeError(`combineRange: at most 7 stages, got ${count}`);
  const a0 = count > 0 ? h * coefficients[0] : 0;
  const a1 = count > 1 ? h * coefficients[1] : 0;
  const a2 = count > 2 ? h * coefficients[2] : 0;
  const a3 = count > 3 ? h * coefficients[3] : 0;
  const a4 = count > 4 ? h * coefficients[4] : 0;
  const a5 = count > 5 ? h * coefficients[5] : 0;
  const a6 = count > 6 ? h * coefficients[6] : 0;
  const k0 = stages[0];
  const k1 = count > 1 ? stages[1] : k0;
  const k2 = count > 2 ? stages[2] : k0;
  const k3 = count > 3 ? stages[3] : k0;
  const k4 = count > 4 ? stages[4] : k0;
  const k5 = count > 5 ? stages[5] : k0;
  const k6 = count > 6 ? stages[6] : k0;
  switch (count) {
    case 0:
      for (let m = start; m < end; m++) out[m] = y[m];
      return;
    case 1:
      for (let m = start; m < end; m++) out[m] = y[m] + a0 * k0[m];
      return;
    case 2:
      for (let m = start; m < end; m++) out[m] = y[m] + a0 * k0[m] + a1 * k1[m];
      return;
    case 3:
      for (let m = start; m < end; m++) out[m] = y[m] + a0 * k0[m] + a1 * k1[m] + a2 * k2[m];
      return;
    case 4:
      for (let m = start; m < end; m++) out[m] = y[m] + a0 * k0[m] + a1 * k1[m] + a2 * k2[m] + a3 * k3[m];
      return;
    case 5:
      for (let m = start; m < end; m++) out[m] = y[m] + a0 * k0[m] + a1 * k1[m] + a2 * k2[m] + a3 * k3[m] + a4 * k4[m];
      return;
    case 6:
      for (let m = start; m < end; m++) out[m] = y[m] + a0 * k0[m] + a1 * k1[m] + a2 * k2[m] + a3 * k3[m] + a4 * k4[m] + a5 * k5[m];
      return;
    default:
      for (let m = start; m < end; m++) out[m] = y[m] + a0 * k0[m] + a1 * k1[m] + a2 * k2[m] + a3 * k3[m] + a4 * k4[m] + a5 * k5[m] + a6 * k6[m];
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
  if (count !== 7) {
    // general (slower) form for other pairs
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
  const [k0, k1, k2, k3, k4, k5, k6] = stages;
  const e0 = h * errorWeights[0];
  const e1 = h * errorWeights[1];
  const e2 = h * errorWeights[2];
  const e3 = h * errorWeights[3];
  const e4 = h * errorWeights[4];
  const e5 = h * errorWeights[5];
  const e6 = h * errorWeights[6];
  let worst = 0;
  for (let m = start; m < end; m++) {
    const e = Math.abs(e0 * k0[m] + e1 * k1[m] + e2 * k2[m] + e3 * k3[m] + e4 * k4[m] + e5 * k5[m] + e6 * k6[m]);
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

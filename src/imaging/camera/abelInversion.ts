// Inverse Abel transform by onion peeling: from the projection (line-of-sight integral)
// F(x) = 2 int_x^inf f(r) r dr / sqrt(r^2 - x^2) of a cylindrically (or, after the trap
// scaling, spherically) symmetric density f back to f(r).
//
// Method (C. J. Dasch, "One-dimensional tomography: a comparison of Abel, onion-peeling, and
// filtered backprojection methods", Appl. Opt. 31, 1146 (1992), onion peeling): f is taken
// constant on shells e_j <= r < e_{j+1}; a chord at distance x_i (e_i <= x_i < e_{i+1}) then
// crosses shells j >= i with path length
//
//   W_ij = 2 [ sqrt(e_{j+1}^2 - x_i^2) - sqrt(max(e_j, x_i)^2 - x_i^2) ],
//
// so F_i = sum_{j >= i} W_ij f_j, an upper-triangular system solved by back substitution from
// the outermost shell in (f = 0 beyond the last shell). On Dasch's uniform grid x_i = i dr,
// e_j = (j - 1/2) dr (e_0 = 0); with the bins of an azimuthal average, e_j = bin edges and x_i =
// the mean radius of bin i. The method is exact for piecewise-constant shells and stable
// (no derivative of the data is taken numerically), but like every inverse Abel transform it
// amplifies noise towards the centre: the standard deviation of f is propagated exactly from
// independent errors of F through the inverse of W (var f_j = sum_k (W^-1)_jk^2 sigma_k^2).

import { ParameterError } from '../../physics/parameterError.js';

export interface OnionPeelingInput {
  /** Projection samples F_i (e.g. column density per um^2), i = 0 innermost. */
  projection: Float64Array;
  /** Chord distance of each sample, radius units; ascending, inside its shell. */
  sampleRadii: Float64Array;
  /** Shell edges e_0 < e_1 < ... < e_n (n + 1 values), radius units. */
  shellEdges: Float64Array;
  /** Standard deviation of each projection sample, for error propagation (optional). */
  projectionStd?: Float64Array;
}

export interface AbelInversion {
  /** Radius of each density value (the sample radii), radius units. */
  radius: Float64Array;
  /** Density f_j (projection units per radius unit: atoms/um^2 -> atoms/um^3). */
  density: Float64Array;
  /** Propagated standard deviation of f_j (NaN without projectionStd). */
  densityStd: Float64Array;
  method: 'onion peeling (Dasch 1992)';
}

/** Onion-peeling inverse Abel transform on given shells (see the file header). */
export function inverseAbelOnionPeeling(input: OnionPeelingInput): AbelInversion {
  const { projection, sampleRadii, shellEdges, projectionStd } = input;
  const n = projection.length;
  if (n < 1) throw new ParameterError('projection', 'give at least one projection sample');
  if (sampleRadii.length !== n) throw new ParameterError('sampleRadii', `expected ${n} radii (one per sample), got ${sampleRadii.length}`);
  if (shellEdges.length !== n + 1) throw new ParameterError('shellEdges', `expected ${n + 1} shell edges for ${n} samples, got ${shellEdges.length}`);
  if (projectionStd !== undefined && projectionStd.length !== n) throw new ParameterError('projectionStd', `expected ${n} standard deviations, got ${projectionStd.length}`);
  for (let i = 0; i < n; i++) {
    if (!(shellEdges[i] < shellEdges[i + 1])) throw new ParameterError('shellEdges', `edges must increase; edge ${i} = ${shellEdges[i]}, edge ${i + 1} = ${shellEdges[i + 1]}`);
    if (!(sampleRadii[i] >= shellEdges[i] && sampleRadii[i] < shellEdges[i + 1])) {
      throw new ParameterError('sampleRadii', `sample ${i} at radius ${sampleRadii[i]} is not inside its shell [${shellEdges[i]}, ${shellEdges[i + 1]})`);
    }
    if (!Number.isFinite(projection[i])) throw new ParameterError('projection', `sample ${i} is not finite (an empty bin?); fill or drop it before inverting`);
  }
  if (shellEdges[0] < 0) throw new ParameterError('shellEdges', `the first edge must be >= 0, got ${shellEdges[0]}`);
  // W is upper triangular; store row-major n x n (n is a few hundred at most).
  const W = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const x2 = sampleRadii[i] * sampleRadii[i];
    for (let j = i; j < n; j++) {
      const outer = shellEdges[j + 1];
      const inner = Math.max(shellEdges[j], sampleRadii[i]);
      W[i * n + j] = 2 * (Math.sqrt(Math.max(outer * outer - x2, 0)) - Math.sqrt(Math.max(inner * inner - x2, 0)));
    }
  }
  const density = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = projection[i];
    for (let j = i + 1; j < n; j++) s -= W[i * n + j] * density[j];
    density[i] = s / W[i * n + i];
  }
  const densityStd = new Float64Array(n).fill(NaN);
  if (projectionStd !== undefined) {
    // Column k of W^-1 by back substitution of the unit vector e_k; accumulate sum_k (W^-1)_jk^2 sigma_k^2.
    const variance = new Float64Array(n);
    const column = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      column.fill(0);
      for (let i = k; i >= 0; i--) {
        let s = i === k ? 1 : 0;
        for (let j = i + 1; j <= k; j++) s -= W[i * n + j] * column[j];
        column[i] = s / W[i * n + i];
      }
      const s2 = projectionStd[k] * projectionStd[k];
      for (let j = 0; j <= k; j++) variance[j] += column[j] * column[j] * s2;
    }
    for (let j = 0; j < n; j++) densityStd[j] = Math.sqrt(variance[j]);
  }
  return { radius: Float64Array.from(sampleRadii), density, densityStd, method: 'onion peeling (Dasch 1992)' };
}

/** Dasch's uniform grid: samples at x_i = i * spacing, shells [(j - 1/2), (j + 1/2)) * spacing (the first from 0). */
export function inverseAbelUniform(projection: Float64Array, spacing: number, projectionStd?: Float64Array): AbelInversion {
  if (!(spacing > 0) || !Number.isFinite(spacing)) throw new ParameterError('spacing', `expected a positive sample spacing, got ${spacing}`);
  const n = projection.length;
  const sampleRadii = new Float64Array(n);
  const shellEdges = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) sampleRadii[i] = i * spacing;
  for (let j = 1; j <= n; j++) shellEdges[j] = (j - 0.5) * spacing;
  return inverseAbelOnionPeeling({ projection, sampleRadii, shellEdges, ...(projectionStd !== undefined ? { projectionStd } : {}) });
}

// Shot-to-shot spread of the compare fit: per-shot estimates and a bootstrap over the shots
// of a stack, both linearised about the fit of the mean picture.
//
// The fit minimises chi^2(p) = sum_i w_i (d_i - f_i(p))^2 (w_i = 1/sigma_i^2) for the mean
// picture d of M shots, at p0 where the gradient J^T W (d - f(p0)) vanishes. For other data
// d' near d the minimum moves, to first order (one Gauss-Newton step from p0), by
//
//   dp = C J^T W (d' - d),   C = (J^T W J)^-1,
//
// with J the model's Jacobian at p0 (the one the fit's covariance comes from). Applied to
// one shot d_s this gives that shot's estimate p0 + dp_s; applied to the mean of a bootstrap
// resample of the shots (drawn with replacement; Efron & Tibshirani, An Introduction to the
// Bootstrap (1993), ch. 6) it gives the replicate p0 + mean of the drawn dp_s, because dp is
// linear in the data. The standard deviation of the replicates is the bootstrap
// uncertainty, which sees what the noise model does not: shot-to-shot drifts of the atom
// number, temperature or position, and pixels that are not independent. The linearisation
// holds while dp is small against the scale on which the model bends (the shifts are of
// the order of the noise of one shot); every shot's estimate is labelled as linearised. The
// draws come from a named seed, so the result is reproducible.

import { seededRandom } from '../numerics/seededRandom.js';

export interface LinearisedShotsInput {
  /** Background-subtracted shots on the used pixels. */
  shots: readonly Float64Array[];
  /** The fitted data (their mean) on the used pixels. */
  meanData: Float64Array;
  /** dModel/dp_j on the used pixels, one column per fitted parameter. */
  columns: readonly Float64Array[];
  /** Weights' standard deviations on the used pixels. */
  sigma: Float64Array;
  /** (J^T W J)^-1, row-major, fitted parameters. */
  covariance: Float64Array;
  replicates: number;
  seed: string;
}

export interface LinearisedShots {
  /** dp of each shot (fitted parameters). */
  perShot: Float64Array[];
  /** dp of each bootstrap replicate. */
  replicates: Float64Array[];
}

export function linearisedShots(input: LinearisedShotsInput): LinearisedShots {
  const nPar = input.columns.length;
  const n = input.meanData.length;
  const M = input.shots.length;
  // g_a[i] = sum_k C_ak J_k[i] / sigma_i^2, so that dp_a = sum_i g_a[i] (d'_i - d_i).
  const gains = Array.from({ length: nPar }, () => new Float64Array(n));
  for (let i = 0; i < n; i++) {
    const w = 1 / (input.sigma[i] * input.sigma[i]);
    for (let a = 0; a < nPar; a++) {
      let s = 0;
      for (let k = 0; k < nPar; k++) s += input.covariance[a * nPar + k] * input.columns[k][i];
      gains[a][i] = s * w;
    }
  }
  const perShot = input.shots.map((shot) => {
    const dp = new Float64Array(nPar);
    for (let a = 0; a < nPar; a++) {
      const g = gains[a];
      let s = 0;
      for (let i = 0; i < n; i++) s += g[i] * (shot[i] - input.meanData[i]);
      dp[a] = s;
    }
    return dp;
  });
  const random = seededRandom(input.seed);
  const replicates: Float64Array[] = [];
  for (let b = 0; b < input.replicates; b++) {
    const dp = new Float64Array(nPar);
    for (let m = 0; m < M; m++) {
      const s = Math.min(M - 1, Math.floor(random.uniform() * M));
      for (let a = 0; a < nPar; a++) dp[a] += perShot[s][a] / M;
    }
    replicates.push(dp);
  }
  return { perShot, replicates };
}

/** Sample standard deviation of each component over a list of vectors. */
export function componentStd(vectors: readonly Float64Array[], length: number): Float64Array {
  const out = new Float64Array(length).fill(NaN);
  const n = vectors.length;
  if (n < 2) return out;
  for (let a = 0; a < length; a++) {
    let mean = 0;
    for (const v of vectors) mean += v[a] / n;
    let s2 = 0;
    for (const v of vectors) s2 += (v[a] - mean) ** 2;
    out[a] = Math.sqrt(s2 / (n - 1));
  }
  return out;
}

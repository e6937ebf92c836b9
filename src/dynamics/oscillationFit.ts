// Frequencies of a few oscillations in a sampled time series (dipole mode, small
// oscillations): y(t) = C + sum_k [a_k cos(w_k t) + b_k sin(w_k t)]. Modes are added one at
// a time: the strongest peak of the residual's periodogram (least-squares power of one
// sinusoid, Lomb-style, on a grid four times finer than the resolution 2 pi / T) starts a new
// mode, then all parameters are refined together by Levenberg-Marquardt
// (observables/leastSquaresFit.ts). For
// noise-free data from an undamped linear oscillation the fitted w is limited only by the
// data; with damping or nonlinearity the residual says how far the model holds.

import { leastSquaresFit } from '../numerics/leastSquaresFit.js';

export interface OscillationFitRequest {
  times: Float64Array;
  values: Float64Array;
  /** number of sinusoids; default 1 */
  modes?: number;
  /** angular frequency search range; default (2 pi / T, pi / dt) */
  minAngularFrequency?: number;
  maxAngularFrequency?: number;
}

export interface OscillationFit {
  /** ascending */
  angularFrequencies: number[];
  /** sqrt(a_k^2 + b_k^2), same order */
  amplitudes: number[];
  /** 1-sigma uncertainties of the angular frequencies (scaled by the residual) */
  angularFrequencyUncertainties: number[];
  offset: number;
  /** rms residual / rms of the signal about its mean */
  relativeResidual: number;
  converged: boolean;
  message: string;
}

export function fitOscillation(request: OscillationFitRequest): OscillationFit {
  const { times, values } = request;
  const modes = request.modes ?? 1;
  const n = times.length;
  if (n !== values.length || n < 3 * modes + 4) throw new RangeError(`fitOscillation: expected equal lengths >= ${3 * modes + 4}, got ${n} and ${values.length}`);
  const span = times[n - 1] - times[0];
  const dt = span / (n - 1);
  const wMin = request.minAngularFrequency ?? (2 * Math.PI) / span;
  const wMax = request.maxAngularFrequency ?? Math.PI / dt;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += values[i];
  mean /= n;
  let spread = 0;
  for (let i = 0; i < n; i++) spread += (values[i] - mean) * (values[i] - mean);
  const resolution = (2 * Math.PI) / span / 4;
  const count = Math.max(8, Math.ceil((wMax - wMin) / resolution) + 1);
  const gridAt = (g: number): number => wMin + ((wMax - wMin) * g) / (count - 1);
  const model = (p: Float64Array, modeCount: number): Float64Array => {
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let v = p[0];
      for (let k = 0; k < modeCount; k++) {
        const w = p[1 + 3 * k];
        v += p[2 + 3 * k] * Math.cos(w * times[i]) + p[3 + 3 * k] * Math.sin(w * times[i]);
      }
      out[i] = v;
    }
    return out;
  };
  const scale = Math.sqrt(spread / n) || 1;
  // One mode at a time: the strongest peak of the residual's periodogram joins the model,
  // then all modes found so far are refitted together (sidelobes of a strong peak never
  // count as a second mode, because the strong peak is gone from the residual).
  let params = Float64Array.of(mean);
  let fit: ReturnType<typeof leastSquaresFit> | null = null;
  const residual = Float64Array.from(values, (v) => v - mean);
  for (let m = 0; m < modes; m++) {
    let bestPower = -1;
    let bestW = gridAt(0);
    for (let g = 0; g < count; g++) {
      const w = gridAt(g);
      let cc = 0;
      let ss = 0;
      let cs = 0;
      let yc = 0;
      let ys = 0;
      for (let i = 0; i < n; i++) {
        const c = Math.cos(w * times[i]);
        const s = Math.sin(w * times[i]);
        const v = residual[i];
        cc += c * c;
        ss += s * s;
        cs += c * s;
        yc += v * c;
        ys += v * s;
      }
      // least-squares power of a cos + b sin: r^T G^-1 r with the 2x2 Gram matrix G
      const det = cc * ss - cs * cs;
      const power = det > 1e-12 * cc * ss ? (ss * yc * yc - 2 * cs * yc * ys + cc * ys * ys) / det : 0;
      if (power > bestPower) {
        bestPower = power;
        bestW = w;
      }
    }
    let yc = 0;
    let ys = 0;
    for (let i = 0; i < n; i++) {
      yc += residual[i] * Math.cos(bestW * times[i]);
      ys += residual[i] * Math.sin(bestW * times[i]);
    }
    const initial = Float64Array.from([...params, bestW, (2 * yc) / n, (2 * ys) / n]);
    const modeCount = m + 1;
    fit = leastSquaresFit(
      { model: (p) => model(p, modeCount), data: values, sigma: scale, initial },
      { maxIterations: 200, centralDifferences: true, relativeStep: 1e-7, chiSquareTolerance: 1e-14, stepTolerance: 1e-13 },
    );
    params = Float64Array.from(fit.best);
    const fitted = model(params, modeCount);
    for (let i = 0; i < n; i++) residual[i] = values[i] - fitted[i];
  }
  if (fit === null) throw new RangeError('fitOscillation: modes must be >= 1');
  const best = params;
  let residualSq = 0;
  for (let i = 0; i < n; i++) residualSq += residual[i] * residual[i];
  const order = Array.from({ length: modes }, (_, k) => k).sort((a, b) => best[1 + 3 * a] - best[1 + 3 * b]);
  return {
    angularFrequencies: order.map((k) => best[1 + 3 * k]),
    amplitudes: order.map((k) => Math.hypot(best[2 + 3 * k], best[3 + 3 * k])),
    angularFrequencyUncertainties: order.map((k) => fit.uncertainty[1 + 3 * k]),
    offset: best[0],
    relativeResidual: spread > 0 ? Math.sqrt(residualSq / spread) : 0,
    converged: fit.converged,
    message: fit.message,
  };
}

// Weights of the compare fit: the standard deviation per pixel for the weighted fit, and the
// background level of the measured picture. Only used pixels (mask = 1) take part.
//
// Background: the median of the border pixels, i.e. the used pixels on the edge of the
// frame or next to a masked one (the cloud is assumed not to reach them); their scatter
// is 1.4826 x median absolute deviation, the consistent estimate of a Gaussian sigma
// (Rousseeuw & Croux, JASA 88, 1273 (1993)).
//
// A picture of detected counts (fluorescence, a ready image with its counts per atom):
// shot noise of detected counts is Poisson (variance = mean counts); in atoms,
// var = atoms / countsPerAtom. The mean is not known, so it is estimated from the data
// smoothed over the used pixels of the 3 x 3 neighbourhood (weights from the raw data
// would pull a Poisson fit low by about one count per pixel; smoothing cuts that
// ninefold). Added: the variance of the background and a floor of one count so that an
// empty noise-free pixel keeps a finite weight. Those weights still carry the data's own
// fluctuations, which bias a weighted fit of Poisson counts (measured here: kT low by 5 %
// at 100 counts per atom). So the fit is repeated with weights from the previous best
// model instead (`fromModel`; the first pass already takes the larger of the data's and
// the starting model's, compareFit.ts): iteratively reweighted least squares with
// var = model converges to the Poisson maximum-likelihood estimate (McCullagh & Nelder,
// Generalized Linear Models, 2nd ed. (1989), section 2.5), whose bias is of higher order.
// For the mean of M shots the counts per atom are M times those of one shot.
//
// A picture with its own per-pixel noise variance (absorption imaging: photon and read
// noise propagated through the optical depth, src/imaging/camera/absorptionImage.ts; the
// mean of M shots: the mean variance / M): sigma^2 = that variance smoothed over the 3 x 3
// neighbourhood (it is computed from the measured counts, so smoothing again cuts the
// correlation of weight and data ninefold), plus the variance of the background scatter
// beyond it, floored at 1e-6 of the largest variance. It does not depend on the model, so
// every pass uses the same weights.

import type { PlanarField } from '../imaging/planarField.js';

export interface PixelNoise {
  /** Standard deviation per pixel (grid layout; masked pixels hold 1, never used). */
  sigma: Float64Array;
  /** Background level (median of the border pixels), atoms per pixel. */
  background: number;
  /** Scatter of the border pixels (1.4826 MAD), atoms. */
  backgroundSigma: number;
  /** Detected counts per atom of the Poisson model; null when the variance was given. */
  countsPerAtom: number | null;
  description: string;
  /** Weights from a model picture (atoms per pixel, background removed). */
  fromModel(model: Float64Array): Float64Array;
}

function median(values: number[]): number {
  if (values.length === 0) return 0;
  const sorted = values.slice().sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

const allUsed = (n: number): Uint8Array => new Uint8Array(n).fill(1);

/** Used pixels on the frame edge or next to a masked pixel (grid layout). */
export function borderPixels(image: PlanarField, mask: Uint8Array = allUsed(image.values.length)): number[] {
  const { nx, ny, values } = image;
  const out: number[] = [];
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < ny; j++) {
      const p = i * ny + j;
      if (mask[p] === 0) continue;
      const edge =
        i === 0 || j === 0 || i === nx - 1 || j === ny - 1 || mask[p - ny] === 0 || mask[p + ny] === 0 || mask[p - 1] === 0 || mask[p + 1] === 0;
      if (edge) out.push(values[p]);
    }
  }
  return out;
}

/** Background level and scatter from the border pixels. */
export function borderBackground(image: PlanarField, mask?: Uint8Array): { background: number; backgroundSigma: number } {
  const border = borderPixels(image, mask);
  const background = median(border);
  return { background, backgroundSigma: border.length > 0 ? 1.4826 * median(border.map((v) => Math.abs(v - background))) : 0 };
}

/**
 * Mean of `values` over the used pixels of each 3 x 3 neighbourhood (0 where none is used).
 * Bounds hoisted out of the inner loops (run once per fit, mostly before V8 optimises it);
 * the sum keeps the order a, then b, so the bits are those of the plain form.
 */
export function smoothedOverMask(values: Float64Array, nx: number, ny: number, mask: Uint8Array): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < nx; i++) {
    const a0 = i > 0 ? i - 1 : 0;
    const a1 = i < nx - 1 ? i + 1 : nx - 1;
    for (let j = 0; j < ny; j++) {
      const b0 = j > 0 ? j - 1 : 0;
      const b1 = j < ny - 1 ? j + 1 : ny - 1;
      let sum = 0;
      let count = 0;
      for (let a = a0; a <= a1; a++) {
        const row = a * ny;
        for (let b = b0; b <= b1; b++) {
          if (mask[row + b] === 0) continue;
          sum += values[row + b];
          count++;
        }
      }
      out[i * ny + j] = count > 0 ? sum / count : 0;
    }
  }
  return out;
}

/** Per-pixel sigma from a model picture (atoms per pixel) for a counts picture. */
export function modelNoiseSigma(model: Float64Array, backgroundSigma: number, countsPerAtom: number): Float64Array {
  const floor = 1 / (countsPerAtom * countsPerAtom);
  const sigma = new Float64Array(model.length);
  for (let i = 0; i < model.length; i++) {
    sigma[i] = Math.sqrt(backgroundSigma * backgroundSigma + Math.max(0, model[i]) / countsPerAtom + floor);
  }
  return sigma;
}

/**
 * Weights of a counts picture (see the file header); the border scatter is measured about
 * `background` (0 for data that are already background-subtracted).
 */
export function pixelNoiseModel(data: PlanarField, background: number, countsPerAtom: number, mask?: Uint8Array): PixelNoise {
  const { nx, ny, values } = data;
  const used = mask ?? allUsed(values.length);
  const border = borderPixels(data, used);
  const backgroundSigma = border.length > 0 ? 1.4826 * median(border.map((v) => Math.abs(v - background))) : 0;
  const floor = 1 / (countsPerAtom * countsPerAtom);
  const smooth = smoothedOverMask(values, nx, ny, used);
  const sigma = new Float64Array(values.length);
  for (let p = 0; p < values.length; p++) {
    sigma[p] = used[p] === 0 ? 1 : Math.sqrt(backgroundSigma * backgroundSigma + Math.max(0, smooth[p]) / countsPerAtom + floor);
  }
  return {
    sigma,
    background,
    backgroundSigma,
    countsPerAtom,
    description:
      'sigma^2 = background sigma^2 + (3x3-smoothed atoms) / countsPerAtom + (1 / countsPerAtom)^2: Poisson shot noise of the detected counts, ' +
      'the scatter of the border pixels, and a one-count floor; later passes take the atoms from the previous best model',
    fromModel: (model) => modelNoiseSigma(model, backgroundSigma, countsPerAtom),
  };
}

/** Weights of a picture that carries its own per-pixel variance, e.g. absorption (see the file header). */
export function varianceNoiseModel(data: PlanarField, background: number, variance: Float64Array, mask?: Uint8Array): PixelNoise {
  const { nx, ny, values } = data;
  const used = mask ?? allUsed(values.length);
  const border = borderPixels(data, used);
  const backgroundSigma = border.length > 0 ? 1.4826 * median(border.map((v) => Math.abs(v - background))) : 0;
  const smooth = smoothedOverMask(variance, nx, ny, used);
  let largest = 0;
  for (let p = 0; p < smooth.length; p++) if (used[p] !== 0 && smooth[p] > largest) largest = smooth[p];
  const floor = 1e-6 * largest > 0 ? 1e-6 * largest : 1e-12;
  const sigma = new Float64Array(values.length);
  for (let p = 0; p < values.length; p++) sigma[p] = used[p] === 0 ? 1 : Math.sqrt(Math.max(smooth[p], floor));
  return {
    sigma,
    background,
    backgroundSigma,
    countsPerAtom: null,
    description:
      'sigma^2 = the per-pixel imaging-noise variance of the measurement (photon and read noise propagated through the optical depth; divided by the number of shots for their mean), ' +
      'smoothed over 3x3 pixels, floored at 1e-6 of its largest value; the same in every pass',
    fromModel: () => sigma,
  };
}

export interface SignalChiSquareInput {
  nx: number;
  ny: number;
  mask: Uint8Array;
  usedIndex: Int32Array;
  /** Data on the whole grid (masked pixels any finite value) and on the used pixels. */
  data: Float64Array;
  dataUsed: Float64Array;
  /** Model on the whole grid and on the used pixels. */
  model: Float64Array;
  modelUsed: Float64Array;
  sigmaUsed: Float64Array;
  parameters: number;
  /** false: every used pixel counts */
  signalOnly: boolean;
}

/**
 * Chi-square on the pixels where the model or the data stand above the noise: |model| > sigma,
 * or the 3 x 3 mean of the data above sigma (for noise alone a 3-standard-deviation excess,
 * the mean of nine pixels having a third of one pixel's noise). Far outside the cloud the
 * pixels hold no signal; counting them adds degrees of freedom without chi-square and makes
 * any fit look good. Degrees of freedom = pixels counted - fitted parameters.
 */
export function signalChiSquare(input: SignalChiSquareInput): { chiSquare: number; degreesOfFreedom: number; pixels: number; mask: Uint8Array } {
  const { nx, ny, usedIndex } = input;
  const smooth = input.signalOnly ? smoothedOverMask(input.data, nx, ny, input.mask) : null;
  const mask = new Uint8Array(nx * ny);
  let chiSquare = 0;
  let pixels = 0;
  for (let u = 0; u < usedIndex.length; u++) {
    const q = usedIndex[u];
    const s = input.sigmaUsed[u];
    if (smooth !== null && !(Math.abs(input.model[q]) > s || smooth[q] > s)) continue;
    mask[q] = 1;
    pixels++;
    const r = (input.dataUsed[u] - input.modelUsed[u]) / s;
    chiSquare += r * r;
  }
  return { chiSquare, degreesOfFreedom: pixels - input.parameters, pixels, mask };
}

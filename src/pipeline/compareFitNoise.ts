// Weights of the compare fit: the standard deviation per pixel for the weighted fit. Shot noise of
// detected counts is Poisson (variance = mean counts); in atoms,
// var = atoms / countsPerAtom. The mean is not known, so it is estimated from the data
// smoothed over 3 x 3 pixels (weights from the raw data would pull a Poisson fit low
// by about one count per pixel; smoothing cuts that ninefold). Added: the variance of
// the background, from the border pixels (1.4826 x median absolute deviation, the
// consistent estimate of a Gaussian sigma; Rousseeuw & Croux, JASA 88, 1273 (1993)),
// and a floor of one count so that an empty noise-free pixel keeps a finite weight.
// Those weights still carry the data's own fluctuations, which bias a weighted fit of
// Poisson counts (measured here: kT low by 5 % at 100 counts per atom). So the fit is
// repeated with weights from the previous best model instead (modelNoiseSigma; the first
// pass already takes the larger of the data's and the starting model's, compareFit.ts):
// iteratively reweighted least squares with var = model converges to the Poisson
// maximum-likelihood estimate (McCullagh & Nelder, Generalized Linear Models, 2nd ed.
// (1989), section 2.5), whose bias is of higher order.

import type { PlanarField } from '../imaging/planarField.js';

export interface PixelNoise {
  sigma: Float64Array;
  /** Background level subtracted from the data (median of the border pixels). */
  background: number;
  /** Standard deviation of the border pixels (1.4826 MAD), atoms. */
  backgroundSigma: number;
  countsPerAtom: number;
  description: string;
}

function median(values: number[]): number {
  const sorted = values.slice().sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Pixels of the outermost ring of the image. */
export function borderPixels(image: PlanarField): number[] {
  const { nx, ny, values } = image;
  const out: number[] = [];
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < ny; j++) {
      if (i === 0 || j === 0 || i === nx - 1 || j === ny - 1) out.push(values[i * ny + j]);
    }
  }
  return out;
}

/** Per-pixel standard deviation of a background-subtracted image in atoms (see the file header). */
export function pixelNoiseModel(data: PlanarField, background: number, countsPerAtom: number): PixelNoise {
  const { nx, ny, values } = data;
  const border = borderPixels(data);
  const deviations = border.map((v) => Math.abs(v - background));
  const backgroundSigma = border.length > 0 ? 1.4826 * median(deviations) : 0;
  const floor = 1 / (countsPerAtom * countsPerAtom);
  const sigma = new Float64Array(values.length);
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < ny; j++) {
      let sum = 0;
      let count = 0;
      for (let a = Math.max(0, i - 1); a <= Math.min(nx - 1, i + 1); a++) {
        for (let b = Math.max(0, j - 1); b <= Math.min(ny - 1, j + 1); b++) {
          sum += values[a * ny + b];
          count++;
        }
      }
      const mean = Math.max(0, sum / count);
      sigma[i * ny + j] = Math.sqrt(backgroundSigma * backgroundSigma + mean / countsPerAtom + floor);
    }
  }
  return {
    sigma,
    background,
    backgroundSigma,
    countsPerAtom,
    description:
      'sigma^2 = background sigma^2 + (3x3-smoothed atoms) / countsPerAtom + (1 / countsPerAtom)^2: Poisson shot noise of the detected counts, ' +
      'the scatter of the border pixels, and a one-count floor; uncertainties are also given scaled by the reduced chi-square',
  };
}

/** Per-pixel standard deviation from a model picture (atoms per pixel), same terms as pixelNoiseModel. */
export function modelNoiseSigma(model: Float64Array, backgroundSigma: number, countsPerAtom: number): Float64Array {
  const floor = 1 / (countsPerAtom * countsPerAtom);
  const sigma = new Float64Array(model.length);
  for (let i = 0; i < model.length; i++) {
    sigma[i] = Math.sqrt(backgroundSigma * backgroundSigma + Math.max(0, model[i]) / countsPerAtom + floor);
  }
  return sigma;
}

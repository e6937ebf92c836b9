// Point-spread function of the imaging system, modelled as a Gaussian.
//
// Width: the Airy core of a diffraction-limited, paraxial wide-field system is well
// approximated by a Gaussian of standard deviation sigma = 0.21 lambda / NA
// (Zhang, Zerubia, Olivo-Marin, "Gaussian approximations of fluorescence microscope
// point-spread function models", Appl. Opt. 46, 1819 (2007)).
//
// Blur on the pixel grid: we use the discrete analogue of the Gaussian,
// T(n; t) = exp(-t) I_n(t) with t = sigma^2 in pixels^2 and I_n the modified Bessel
// function (Lindeberg, "Scale-space for discrete signals", IEEE Trans. PAMI 12, 234
// (1990)). Why this kernel rather than a sampled exp(-n^2 / 2 sigma^2): its weights sum
// to exactly 1 over all integers and its variance is exactly sigma^2 for ANY sigma, also
// below one pixel, where a sampled Gaussian's variance is visibly wrong (aliasing). For
// sigma above a few pixels the two kernels agree closely. The weights come from Miller's
// backward recurrence I_{n-1} = (2n/t) I_n + I_{n+1} (Abramowitz & Stegun 9.6.26),
// normalised with the identity I_0 + 2 sum_{n>=1} I_n = e^t (A&S 9.6.37), so no Bessel
// function is ever evaluated directly and nothing overflows.
//
// Borders and atom number: the blur is applied in "scatter" form (each input pixel
// spreads its atoms over its kernel footprint), so atoms are conserved exactly as long
// as every spread weight lands on some output pixel. Two ways to make sure it does:
//   'grow'    - the output is larger by the kernel radius R on every side (default);
//               nothing is cut, the original pixel (i, j) sits at (i + R, j + R).
//   'reflect' - same size as the input; weight that would leave the image is folded
//               back at the edge (a mirror between the outermost pixel and the next),
//               i.e. no-flux boundaries. Use it when the image already has a margin and
//               its size must not change.
// Renormalising a gather-form kernel near the border would NOT conserve atoms, which is
// why neither mode does that.
//
// Cost: a cloud often covers only part of the picture, and pixels outside it are exactly
// zero at T = 0. The first pass spreads each input row only over the span of its non-zero
// pixels and the second pass skips zero pixels; a skipped term is w * 0 = 0, so the sums
// (same terms, same order) are bit for bit those of the full loops. The folded indices of
// 'reflect' near an edge are tabulated once per image instead of per pixel.

import { assertPlanarField, type PlanarField } from './planarField.js';

/** Coefficient in sigma = 0.21 lambda / NA (Zhang et al., Appl. Opt. 46, 1819 (2007)). */
export const airyCoreGaussianCoefficient = 0.21;

/** Gaussian PSF standard deviation in the object plane, micrometres. */
export function psfSigmaUm(wavelengthNm: number, numericalAperture: number): number {
  if (!(wavelengthNm > 0) || !Number.isFinite(wavelengthNm)) {
    throw new Error(`psfSigmaUm: imaging wavelength must be a positive number of nm, got ${wavelengthNm}`);
  }
  if (!(numericalAperture > 0 && numericalAperture <= 1.6)) {
    throw new Error(
      `psfSigmaUm: numerical aperture must lie in (0, 1.6] (above 1 only for immersion optics), got ${numericalAperture}`,
    );
  }
  return (airyCoreGaussianCoefficient * (wavelengthNm * 1e-3)) / numericalAperture;
}

export interface DiscreteGaussianKernel {
  /** Weights for offsets -radius..radius (index offset + radius); they sum to 1. */
  weights: Float64Array;
  radius: number;
  sigmaPixels: number;
}

/** Weights below this fraction of the centre weight are dropped (then renormalised). */
const tailCut = 1e-17;

/** The discrete analogue of a Gaussian of standard deviation `sigmaPixels` (Lindeberg 1990). */
export function discreteGaussianKernel(sigmaPixels: number): DiscreteGaussianKernel {
  if (!(sigmaPixels >= 0) || !Number.isFinite(sigmaPixels)) {
    throw new Error(`discreteGaussianKernel: sigma must be a finite number of pixels >= 0, got ${sigmaPixels}`);
  }
  if (sigmaPixels === 0) return { weights: new Float64Array([1]), radius: 0, sigmaPixels };
  const t = sigmaPixels * sigmaPixels;
  // Start well beyond where the Gaussian tail exp(-n^2 / 2t) falls below 1e-30:
  // n = 12 sigma gives exp(-72); the +30 covers small sigma, where the tail is
  // (t/2)^n / n! and the recurrence needs a few extra terms to forget its start.
  const start = Math.ceil(12 * sigmaPixels) + 30;
  const bessel = new Float64Array(start + 2);
  bessel[start + 1] = 0;
  bessel[start] = 1e-300;
  for (let n = start; n >= 1; n--) {
    bessel[n - 1] = ((2 * n) / t) * bessel[n] + bessel[n + 1];
    if (bessel[n - 1] > 1e250) {
      // Rescale to stay finite; only ratios matter.
      for (let m = n - 1; m <= start; m++) bessel[m] *= 1e-250;
    }
  }
  let radius = 0;
  while (radius < start && bessel[radius + 1] > tailCut * bessel[0]) radius++;
  const weights = new Float64Array(2 * radius + 1);
  let sum = 0;
  for (let n = -radius; n <= radius; n++) sum += bessel[Math.abs(n)];
  for (let n = -radius; n <= radius; n++) weights[n + radius] = bessel[Math.abs(n)] / sum;
  return { weights, radius, sigmaPixels };
}

export type BlurBorder = 'grow' | 'reflect';

export interface GaussianBlurOptions {
  /** PSF standard deviation along image axis 0, in pixels. */
  sigmaPixels: number;
  /** Along image axis 1, if different (non-square pixels); default sigmaPixels. */
  sigmaYPixels?: number;
  /** How atoms that would leave the image are kept; see the file header. Default 'grow'. */
  border?: BlurBorder;
}

export interface BlurredImage extends PlanarField {
  /** Pixels added on each side along axis 0 (0 for 'reflect'); input (i, j) -> (i + marginX, j + marginY). */
  marginX: number;
  marginY: number;
}

/** Index fold for 'reflect': mirror between pixel -1 and 0 and between n - 1 and n, periodic in 2n. */
function reflectIndex(index: number, n: number): number {
  const period = 2 * n;
  let m = index % period;
  if (m < 0) m += period;
  return m < n ? m : period - 1 - m;
}

/** Separable Gaussian blur that conserves the sum of the image exactly (to rounding). */
export function gaussianBlur(image: PlanarField, options: GaussianBlurOptions): BlurredImage {
  assertPlanarField(image, 'gaussianBlur image');
  const border = options.border ?? 'grow';
  if (border !== 'grow' && border !== 'reflect') {
    throw new Error(`gaussianBlur: border must be 'grow' or 'reflect', got '${String(border)}'`);
  }
  const kx = discreteGaussianKernel(options.sigmaPixels);
  const ky = discreteGaussianKernel(options.sigmaYPixels ?? options.sigmaPixels);
  const { nx, ny } = image;
  const grow = border === 'grow';
  const marginX = grow ? kx.radius : 0;
  const marginY = grow ? ky.radius : 0;
  const outNx = nx + 2 * marginX;
  const outNy = ny + 2 * marginY;

  // Pass 1, along axis 0: tmp has outNx rows of ny.
  const tmp = new Float64Array(outNx * ny);
  const wx = kx.weights;
  const rx = kx.radius;
  const src = image.values;
  for (let i = 0; i < nx; i++) {
    const rowIn = i * ny;
    // The span of non-zero pixels of this row (the terms outside it are exact zeros).
    let first = 0;
    while (first < ny && src[rowIn + first] === 0) first++;
    if (first === ny) continue;
    let last = ny - 1;
    while (src[rowIn + last] === 0) last--;
    for (let d = -rx; d <= rx; d++) {
      const target = grow ? i + marginX + d : reflectIndex(i + d, nx);
      const w = wx[d + rx];
      const rowOut = target * ny;
      for (let j = first; j <= last; j++) tmp[rowOut + j] += w * src[rowIn + j];
    }
  }
  // Pass 2, along axis 1.
  const values = new Float64Array(outNx * outNy);
  const wy = ky.weights;
  const ry = ky.radius;
  if (grow) {
    for (let p = 0; p < outNx; p++) {
      const rowIn = p * ny;
      const rowOut = p * outNy + marginY;
      for (let j = 0; j < ny; j++) {
        const v = tmp[rowIn + j];
        if (v === 0) continue;
        const base = rowOut + j - ry;
        for (let e = 0; e <= 2 * ry; e++) values[base + e] += wy[e] * v;
      }
    }
  } else {
    // The folded index only differs from j + e within ry of an edge; away from the edges
    // the plain index is used (the same additions in the same order, so the same bits).
    // folded[j * taps + e] = reflectIndex(j + e - ry, ny) for the pixels j near an edge.
    const taps = 2 * ry + 1;
    const folded = new Int32Array(ny * taps);
    for (let j = 0; j < ny; j++) {
      if (j >= ry && j + ry < ny) continue;
      for (let e = 0; e < taps; e++) folded[j * taps + e] = reflectIndex(j + e - ry, ny);
    }
    for (let p = 0; p < outNx; p++) {
      const rowIn = p * ny;
      const rowOut = p * outNy;
      for (let j = 0; j < ny; j++) {
        const v = tmp[rowIn + j];
        if (v === 0) continue;
        if (j >= ry && j + ry < ny) {
          const base = rowOut + j - ry;
          for (let e = 0; e < taps; e++) values[base + e] += wy[e] * v;
        } else {
          const at = j * taps;
          for (let e = 0; e < taps; e++) values[rowOut + folded[at + e]] += wy[e] * v;
        }
      }
    }
  }
  return { values, nx: outNx, ny: outNy, marginX, marginY };
}

// Hot (and dead) pixel removal by a median-of-neighbours test. For every pixel the residual
// r = value - median(8 neighbours) is formed (fewer neighbours at edges and corners). The
// spread of r over the frame is measured robustly by its median absolute deviation
// MAD = median |r - median(r)| (Hampel, JASA 69, 383 (1974); for Gaussian noise the
// standard deviation is 1.4826 MAD, Rousseeuw & Croux, JASA 88, 1273 (1993)). A pixel is
// replaced by its neighbour median when |r - median(r)| > thresholdMad * MAD; the default
// 10 MAD (about 6.7 standard deviations of Gaussian noise) flags about 2e-11 of clean
// pixels. Apply it to raw frames, where the noise is nearly uniform; a cloud smooth on the
// pixel scale has residuals of the order of its curvature, far below the threshold. A
// cluster of up to three bad pixels among eight neighbours still leaves a clean median.

import { ParameterError } from '../../physics/parameterError.js';
import { checkImage, type PixelImage } from './pixelImage.js';
import { insertionSortAscending } from '../../numerics/insertionSort.js';

export interface HotPixelOptions {
  /** Threshold in units of the MAD of the residuals; default 10. */
  thresholdMad?: number;
  /** Also replace pixels far below their neighbours (dead pixels); default true. */
  includeCold?: boolean;
}

export interface HotPixelResult {
  /** The frame with flagged pixels replaced by their neighbour median. */
  image: PixelImage;
  /** Flat indices y * width + x of the replaced pixels, in order. */
  replacedIndices: Int32Array;
  hotCount: number;
  coldCount: number;
  /** MAD of the neighbour residuals, in the frame's units. */
  residualMad: number;
  thresholdMad: number;
}

function medianOf(buffer: Float64Array, n: number): number {
  insertionSortAscending(buffer, n); // at most 8 values: no allocation
  return n % 2 === 1 ? buffer[n >> 1] : 0.5 * (buffer[n / 2 - 1] + buffer[n / 2]);
}

function medianOfArray(values: Float64Array): number {
  const sorted = Float64Array.from(values).sort();
  const m = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[m] : 0.5 * (sorted[m - 1] + sorted[m]);
}

/** Replace pixels that stand out from their neighbours (see the file header). */
export function removeHotPixels(image: PixelImage, options: HotPixelOptions = {}): HotPixelResult {
  checkImage('image', image);
  const thresholdMad = options.thresholdMad ?? 10;
  if (!(thresholdMad > 0) || !Number.isFinite(thresholdMad)) {
    throw new ParameterError('thresholdMad', `expected a positive threshold in units of the median absolute deviation (e.g. 10), got ${thresholdMad}`);
  }
  const includeCold = options.includeCold ?? true;
  const { width, height, values } = image;
  if (width * height < 9) throw new ParameterError('image', `a ${width} x ${height} frame is too small for a neighbour test (needs at least 9 pixels)`);
  const n = width * height;
  const neighbourMedian = new Float64Array(n);
  const residual = new Float64Array(n);
  const buffer = new Float64Array(8);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      let k = 0;
      for (let dy = -1; dy <= 1; dy++) {
        const yy = y + dy;
        if (yy < 0 || yy >= height) continue;
        for (let dx = -1; dx <= 1; dx++) {
          const xx = x + dx;
          if ((dx === 0 && dy === 0) || xx < 0 || xx >= width) continue;
          const v = values[yy * width + xx];
          if (Number.isFinite(v)) buffer[k++] = v;
        }
      }
      const i = y * width + x;
      neighbourMedian[i] = k > 0 ? medianOf(buffer, k) : values[i];
      residual[i] = values[i] - neighbourMedian[i];
    }
  }
  const finiteResiduals = residual.filter((r) => Number.isFinite(r));
  const centre = medianOfArray(finiteResiduals);
  const deviations = finiteResiduals.map((r) => Math.abs(r - centre));
  const mad = medianOfArray(deviations);
  const limit = thresholdMad * mad;
  const out = Float64Array.from(values);
  const replaced: number[] = [];
  let hotCount = 0;
  let coldCount = 0;
  for (let i = 0; i < n; i++) {
    const r = residual[i] - centre;
    if (!Number.isFinite(r)) continue;
    // mad = 0 (a noiseless frame): only pixels that differ at all are outliers.
    const hot = r > limit && r > 0;
    const cold = includeCold && -r > limit && r < 0;
    if (hot || cold) {
      out[i] = neighbourMedian[i];
      replaced.push(i);
      if (hot) hotCount++;
      else coldCount++;
    }
  }
  return {
    image: { width, height, values: out },
    replacedIndices: Int32Array.from(replaced),
    hotCount,
    coldCount,
    residualMad: mad,
    thresholdMad,
  };
}

// Centre of a cloud in an image or a 3D field, by an iterated windowed centroid.
//
// 1. Background: the median of the points on the outer faces of the grid (the cloud is
//    assumed not to fill the image) is subtracted, so flat offsets and zero-mean noise
//    pull on the centroid with zero net weight instead of dragging it to the middle.
// 2. Start: the maximum of the image smoothed by a 3-point box along each axis (robust
//    against single noisy pixels). Scale: the number of smoothed points above half of
//    that maximum gives the half-maximum radius, hence sigma0 = r_half / sqrt(2 ln 2) for
//    a Gaussian-like cloud.
// 3. Iterate: centroid of the background-subtracted values inside a sphere (disk) of
//    radius 3 sigma0 about the current centre, until the centre moves by < 1e-9 steps.
//    A window centred on a symmetric cloud takes in symmetric background too, so the
//    fixed point is the symmetry centre.
// This is the iteratively windowed centroid common in astronomical and particle-tracking
// image analysis (common practice). For site fields with empty borders the background
// is zero and the result is the plain centroid refined by the window.

import { gridSizes } from '../lattice/gridShape.js';

export interface CloudCentre {
  /** Centre in grid-index units, one entry per axis (axis 0 first). */
  centre: Float64Array;
  /**
   * Per-axis standard deviation from the moments inside the final window, grid steps
   * (a Gaussian truncated at 3 sigma gives about 5 % less than its sigma).
   */
  sigma: Float64Array;
  /** Background subtracted (median of the outer faces). */
  background: number;
  /** Windowed-centroid iterations used. */
  iterations: number;
}

const windowSigmas = 3;
const maxIterations = 100;

function median(values: number[]): number {
  const sorted = values.slice().sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

export function findCloudCentre(values: Float64Array, shape: readonly number[]): CloudCentre {
  const n = gridSizes(shape, 'findCloudCentre');
  const [n0, n1, n2] = n;
  const total = n0 * n1 * n2;
  if (values.length !== total) {
    throw new Error(`findCloudCentre: shape [${shape.join(', ')}] needs ${total} values, got ${values.length}`);
  }
  const dims = shape.length;
  // The loops below work on plain integers and locals (no index closure, no arrays made per
  // point): a picture of 90 x 90 pixels is one of the compare fit's steps, and the closure form
  // ran at ~25 ns per visited point. The sums keep the order of the plain form (a, b, c
  // nested in that order), so the results are the same to the bit.

  // 1. Background from the outer faces of the axes longer than 2.
  const faces: number[] = [];
  for (let x = 0; x < n0; x++) {
    const xFace = n0 > 2 && (x === 0 || x === n0 - 1);
    for (let y = 0; y < n1; y++) {
      const xyFace = xFace || (n1 > 2 && (y === 0 || y === n1 - 1));
      const row = (x * n1 + y) * n2;
      for (let z = 0; z < n2; z++) {
        if (xyFace || (n2 > 2 && (z === 0 || z === n2 - 1))) faces.push(values[row + z]);
      }
    }
  }
  const background = faces.length > 0 ? median(faces) : 0;

  // 2. Smoothed maximum and half-maximum size.
  const smoothed = new Float64Array(total);
  let peak = -Infinity;
  let peakX = 0;
  let peakY = 0;
  let peakZ = 0;
  for (let x = 0; x < n0; x++) {
    const a0 = x > 0 ? x - 1 : 0;
    const a1 = x < n0 - 1 ? x + 1 : n0 - 1;
    for (let y = 0; y < n1; y++) {
      const b0 = y > 0 ? y - 1 : 0;
      const b1 = y < n1 - 1 ? y + 1 : n1 - 1;
      for (let z = 0; z < n2; z++) {
        const c0 = z > 0 ? z - 1 : 0;
        const c1 = z < n2 - 1 ? z + 1 : n2 - 1;
        let sum = 0;
        for (let a = a0; a <= a1; a++) {
          for (let b = b0; b <= b1; b++) {
            const row = (a * n1 + b) * n2;
            for (let c = c0; c <= c1; c++) sum += values[row + c];
          }
        }
        const count = (a1 - a0 + 1) * (b1 - b0 + 1) * (c1 - c0 + 1);
        const v = sum / count - background;
        smoothed[(x * n1 + y) * n2 + z] = v;
        if (v > peak) {
          peak = v;
          peakX = x;
          peakY = y;
          peakZ = z;
        }
      }
    }
  }
  if (!(peak > 0)) {
    throw new Error('findCloudCentre: the image has no positive values above its background, so it holds no cloud to centre on');
  }
  let aboveHalf = 0;
  for (let i = 0; i < total; i++) if (smoothed[i] > peak / 2) aboveHalf++;
  const spanDims = n.filter((len) => len > 1).length || 1;
  // Half-maximum radius from the count: length 2r, area pi r^2, volume 4/3 pi r^3.
  const rHalf =
    spanDims === 1 ? aboveHalf / 2 : spanDims === 2 ? Math.sqrt(aboveHalf / Math.PI) : Math.cbrt((3 * aboveHalf) / (4 * Math.PI));
  const sigma0 = Math.max(rHalf, 0.5) / Math.sqrt(2 * Math.LN2);
  const window = windowSigmas * sigma0;
  const window2 = window * window;

  // 3. Iterated windowed centroid of the background-subtracted values.
  let cx = peakX;
  let cy = peakY;
  let cz = peakZ;
  const moments = new Float64Array(7); // weight, m1 (x, y, z), m2 (x, y, z)
  const accumulate = (): void => {
    let weight = 0;
    let m1x = 0;
    let m1y = 0;
    let m1z = 0;
    let m2x = 0;
    let m2y = 0;
    let m2z = 0;
    const xLo = Math.max(0, Math.ceil(cx - window));
    const xHi = Math.min(n0 - 1, Math.floor(cx + window));
    const yLo = Math.max(0, Math.ceil(cy - window));
    const yHi = Math.min(n1 - 1, Math.floor(cy + window));
    const zLo = Math.max(0, Math.ceil(cz - window));
    const zHi = Math.min(n2 - 1, Math.floor(cz + window));
    for (let x = xLo; x <= xHi; x++) {
      const dx = x - cx;
      for (let y = yLo; y <= yHi; y++) {
        const dy = y - cy;
        const row = (x * n1 + y) * n2;
        for (let z = zLo; z <= zHi; z++) {
          const dz = z - cz;
          if (dx * dx + dy * dy + dz * dz > window2) continue;
          const w = values[row + z] - background;
          weight += w;
          m1x += w * dx;
          m1y += w * dy;
          m1z += w * dz;
          m2x += w * dx * dx;
          m2y += w * dy * dy;
          m2z += w * dz * dz;
        }
      }
    }
    moments[0] = weight;
    moments[1] = m1x;
    moments[2] = m1y;
    moments[3] = m1z;
    moments[4] = m2x;
    moments[5] = m2y;
    moments[6] = m2z;
  };
  let iterations = 0;
  for (; iterations < maxIterations; ) {
    accumulate();
    iterations++;
    const weight = moments[0];
    if (!(weight > 0)) break;
    const moveX = moments[1] / weight;
    const moveY = moments[2] / weight;
    const moveZ = moments[3] / weight;
    cx += moveX;
    cy += moveY;
    cz += moveZ;
    if (Math.max(Math.abs(moveX), Math.abs(moveY), Math.abs(moveZ)) < 1e-9) break;
  }
  accumulate();
  const weight = moments[0];
  const c = [cx, cy, cz];
  const centre = new Float64Array(dims);
  const sigma = new Float64Array(dims);
  for (let d = 0; d < dims; d++) {
    centre[d] = c[d];
    const mean = weight > 0 ? moments[1 + d] / weight : 0;
    sigma[d] = weight > 0 ? Math.sqrt(Math.max(moments[4 + d] / weight - mean * mean, 0)) : 0;
  }
  return { centre, sigma, background, iterations };
}

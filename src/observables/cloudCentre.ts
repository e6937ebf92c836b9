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
  const total = n[0] * n[1] * n[2];
  if (values.length !== total) {
    throw new Error(`findCloudCentre: shape [${shape.join(', ')}] needs ${total} values, got ${values.length}`);
  }
  const dims = shape.length;
  const index = (x: number, y: number, z: number) => (x * n[1] + y) * n[2] + z;

  // 1. Background from the outer faces of the axes longer than 2.
  const faces: number[] = [];
  for (let x = 0; x < n[0]; x++) {
    for (let y = 0; y < n[1]; y++) {
      for (let z = 0; z < n[2]; z++) {
        const onFace =
          (n[0] > 2 && (x === 0 || x === n[0] - 1)) ||
          (n[1] > 2 && (y === 0 || y === n[1] - 1)) ||
          (n[2] > 2 && (z === 0 || z === n[2] - 1));
        if (onFace) faces.push(values[index(x, y, z)]);
      }
    }
  }
  const background = faces.length > 0 ? median(faces) : 0;

  // 2. Smoothed maximum and half-maximum size.
  const smoothed = new Float64Array(total);
  let peak = -Infinity;
  let peakAt = [0, 0, 0];
  for (let x = 0; x < n[0]; x++) {
    for (let y = 0; y < n[1]; y++) {
      for (let z = 0; z < n[2]; z++) {
        let sum = 0;
        let count = 0;
        for (let a = Math.max(0, x - 1); a <= Math.min(n[0] - 1, x + 1); a++) {
          for (let b = Math.max(0, y - 1); b <= Math.min(n[1] - 1, y + 1); b++) {
            for (let c = Math.max(0, z - 1); c <= Math.min(n[2] - 1, z + 1); c++) {
              sum += values[index(a, b, c)];
              count++;
            }
          }
        }
        const v = sum / count - background;
        smoothed[index(x, y, z)] = v;
        if (v > peak) {
          peak = v;
          peakAt = [x, y, z];
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
  const c = [peakAt[0], peakAt[1], peakAt[2]];
  const m1 = [0, 0, 0];
  const m2 = [0, 0, 0];
  let weight = 0;
  let iterations = 0;
  const accumulate = () => {
    weight = 0;
    m1.fill(0);
    m2.fill(0);
    const lo = c.map((ci) => Math.max(0, Math.ceil(ci - window)));
    const hi = c.map((ci, d) => Math.min(n[d] - 1, Math.floor(ci + window)));
    for (let x = lo[0]; x <= hi[0]; x++) {
      const dx = x - c[0];
      for (let y = lo[1]; y <= hi[1]; y++) {
        const dy = y - c[1];
        for (let z = lo[2]; z <= hi[2]; z++) {
          const dz = z - c[2];
          if (dx * dx + dy * dy + dz * dz > window2) continue;
          const w = values[index(x, y, z)] - background;
          weight += w;
          m1[0] += w * dx;
          m1[1] += w * dy;
          m1[2] += w * dz;
          m2[0] += w * dx * dx;
          m2[1] += w * dy * dy;
          m2[2] += w * dz * dz;
        }
      }
    }
  };
  for (; iterations < maxIterations; ) {
    accumulate();
    iterations++;
    if (!(weight > 0)) break;
    let shift = 0;
    for (let d = 0; d < 3; d++) {
      const move = m1[d] / weight;
      c[d] += move;
      shift = Math.max(shift, Math.abs(move));
    }
    if (shift < 1e-9) break;
  }
  accumulate();
  const centre = new Float64Array(dims);
  const sigma = new Float64Array(dims);
  for (let d = 0; d < dims; d++) {
    centre[d] = c[d];
    const mean = weight > 0 ? m1[d] / weight : 0;
    sigma[d] = weight > 0 ? Math.sqrt(Math.max(m2[d] / weight - mean * mean, 0)) : 0;
  }
  return { centre, sigma, background, iterations };
}

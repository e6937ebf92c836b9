// Radial profile of a 2D image or 3D field: average over annuli (shells) about the
// cloud centre, the standard way to compare a trapped cloud with a prediction and, via
// the local-density approximation, to read the equation of state n(mu - eps(r)) off an
// image (DESIGN.md section 4).
//
// Elliptical scaling: in an anisotropic harmonic trap the density is constant on
// ellipses, so each axis offset is multiplied by a scale factor before taking the
// radius, r^2 = sum_d (s_d (x_d - c_d))^2; with s_d = pixelUm * omega_d / omega_ref the
// radius is the one of the equivalent isotropic trap of frequency omega_ref, in um.
//
// Per bin [b w, (b + 1) w): number of points, their mean radius, and for every field the
// mean and the sample standard deviation (n - 1 in the denominator; NaN for fewer than
// two points), accumulated with Welford's update (Welford, Technometrics 4, 419 (1962);
// numerics/runningMoments.ts) so large means with a small spread lose no digits. Empty bins have NaN means.
// The standard error of a bin mean is std / sqrt(count).

import { findCloudCentre } from './cloudCentre.js';
import { sampleSpread, welfordAddAt } from '../numerics/runningMoments.js';
import { gridSizes } from '../lattice/gridShape.js';

export { findCloudCentre, type CloudCentre } from './cloudCentre.js';

export interface RadialProfileOptions {
  /** Grid shape, 1 to 3 axes, first axis slowest (same for every field). */
  shape: readonly number[];
  /** Bin width in scaled radius units (see axisScale). */
  binWidth: number;
  /** Centre in grid-index units per axis; default: findCloudCentre of the first field. */
  centre?: readonly number[];
  /** Factor per axis applied to (index - centre); default 1 (radius in grid steps). */
  axisScale?: readonly number[];
  /** Number of bins; default: enough to reach the farthest grid point. */
  binCount?: number;
  /** If given, also average mu - eps_i per bin (local chemical potential, same energy unit as given). */
  localChemicalPotential?: { mu: number; siteEnergy: Float64Array };
}

export interface FieldProfile {
  mean: Float64Array;
  std: Float64Array;
}

export interface RadialProfile {
  centre: Float64Array;
  binWidth: number;
  /** Inner edge of each bin. */
  binInner: Float64Array;
  /** Mean radius of the points in each bin (NaN if empty). */
  meanRadius: Float64Array;
  /** Number of grid points in each bin. */
  count: Float64Array;
  /** Per input field name. */
  fields: Record<string, FieldProfile>;
  /** Mean of mu - eps_i per bin, when localChemicalPotential was given. */
  localChemicalPotential?: Float64Array;
}

export function radialProfile(fields: Record<string, Float64Array>, options: RadialProfileOptions): RadialProfile {
  const { shape, binWidth } = options;
  const names = Object.keys(fields);
  if (names.length === 0) throw new Error('radialProfile: give at least one field');
  const n = gridSizes(shape, 'radialProfile');
  const dims = shape.length;
  const points = n[0] * n[1] * n[2];
  for (const name of names) {
    if (fields[name].length !== points) {
      throw new Error(`radialProfile: field '${name}' has ${fields[name].length} values, shape [${shape.join(', ')}] needs ${points}`);
    }
  }
  if (!(binWidth > 0) || !Number.isFinite(binWidth)) {
    throw new Error(`radialProfile: binWidth must be a positive number, got ${binWidth}`);
  }
  const scale = [1, 1, 1];
  if (options.axisScale !== undefined) {
    if (options.axisScale.length !== dims) {
      throw new Error(`radialProfile: axisScale needs ${dims} entries (one per axis), got ${options.axisScale.length}`);
    }
    for (let d = 0; d < dims; d++) scale[d] = options.axisScale[d];
  }
  let centre: Float64Array;
  if (options.centre !== undefined) {
    if (options.centre.length !== dims) {
      throw new Error(`radialProfile: centre needs ${dims} entries (one per axis), got ${options.centre.length}`);
    }
    centre = Float64Array.from(options.centre);
  } else {
    centre = findCloudCentre(fields[names[0]], shape).centre;
  }
  const c = [centre[0], dims > 1 ? centre[1] : 0, dims > 2 ? centre[2] : 0];
  const energy = options.localChemicalPotential;
  if (energy !== undefined && energy.siteEnergy.length !== points) {
    throw new Error(`radialProfile: localChemicalPotential.siteEnergy has ${energy.siteEnergy.length} values, needs ${points}`);
  }

  let binCount = options.binCount;
  if (binCount === undefined) {
    let r2max = 0;
    for (const x of [0, n[0] - 1]) {
      for (const y of [0, n[1] - 1]) {
        for (const z of [0, n[2] - 1]) {
          const dx = (x - c[0]) * scale[0];
          const dy = (y - c[1]) * scale[1];
          const dz = (z - c[2]) * scale[2];
          r2max = Math.max(r2max, dx * dx + dy * dy + dz * dz);
        }
      }
    }
    binCount = Math.floor(Math.sqrt(r2max) / binWidth) + 1;
  } else if (!Number.isInteger(binCount) || binCount < 1) {
    throw new Error(`radialProfile: binCount must be a positive integer, got ${binCount}`);
  }

  const count = new Float64Array(binCount);
  const radiusSum = new Float64Array(binCount);
  const means = names.map(() => new Float64Array(binCount));
  const m2 = names.map(() => new Float64Array(binCount));
  const fieldArrays = names.map((name) => fields[name]);
  const muSum = energy !== undefined ? new Float64Array(binCount) : undefined;

  for (let x = 0, i = 0; x < n[0]; x++) {
    const dx = (x - c[0]) * scale[0];
    for (let y = 0; y < n[1]; y++) {
      const dy = (y - c[1]) * scale[1];
      for (let z = 0; z < n[2]; z++, i++) {
        const dz = (z - c[2]) * scale[2];
        const r = Math.sqrt(dx * dx + dy * dy + dz * dz);
        const bin = Math.floor(r / binWidth);
        if (bin >= binCount) continue;
        const k = ++count[bin];
        radiusSum[bin] += r;
        for (let f = 0; f < fieldArrays.length; f++) welfordAddAt(means[f], m2[f], bin, fieldArrays[f][i], k);
        if (muSum !== undefined && energy !== undefined) muSum[bin] += energy.mu - energy.siteEnergy[i];
      }
    }
  }

  const binInner = new Float64Array(binCount);
  const meanRadius = new Float64Array(binCount);
  for (let b = 0; b < binCount; b++) {
    binInner[b] = b * binWidth;
    meanRadius[b] = count[b] > 0 ? radiusSum[b] / count[b] : NaN;
  }
  const out: Record<string, FieldProfile> = {};
  names.forEach((name, f) => {
    const mean = means[f];
    for (let b = 0; b < binCount; b++) if (count[b] === 0) mean[b] = NaN;
    out[name] = { mean, std: sampleSpread(m2[f], count, NaN) };
  });
  let localChemicalPotential: Float64Array | undefined;
  if (muSum !== undefined) {
    localChemicalPotential = new Float64Array(binCount);
    for (let b = 0; b < binCount; b++) localChemicalPotential[b] = count[b] > 0 ? muSum[b] / count[b] : NaN;
  }
  return {
    centre,
    binWidth,
    binInner,
    meanRadius,
    count,
    fields: out,
    ...(localChemicalPotential !== undefined ? { localChemicalPotential } : {}),
  };
}

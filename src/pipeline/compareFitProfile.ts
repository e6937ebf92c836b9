// Radial profiles of the compare fit: the measured and the model picture averaged over the
// same annuli of the trap-scaled radius about the fitted trap centre (the ellipses of the
// turned, anisotropic trap: src/imaging/camera/azimuthalAverage.ts), with
// - the measured error of each bin mean from the noise model, sqrt(sum_i sigma_i^2) / P_b
//   for the P_b independent pixels of the bin, and the scatter of the pixels about their
//   mean, std / sqrt(P_b), beside it;
// - the uncertainty band of the model profile: the bin mean of the model is a linear
//   function of the fitted parameters near the optimum, m_b(p) ~ m_b + sum_j J_bj dp_j with
//   J_bj the bin mean of the picture's derivative, so var m_b = J_b C J_b^T with C the
//   covariance of the fitted parameters (first-order propagation; Bevington & Robinson,
//   3rd ed., eq. 3.13).

import { azimuthalAverage } from '../imaging/camera/azimuthalAverage.js';
import { planarMaskToCamera, planarToCamera } from '../imaging/cameraConvention.js';

export interface CompareProfile {
  /** Bin width in trap-scaled radius, the pictures' length unit. */
  binWidth: number;
  binInner: Float64Array;
  /** Mean trap-scaled radius of the pixels in each bin (NaN if empty). */
  radius: Float64Array;
  pixels: Float64Array;
  measuredMean: Float64Array;
  /** From the noise model: sqrt(sum sigma^2) / pixels. */
  measuredError: Float64Array;
  /** From the scatter of the pixels: std / sqrt(pixels). */
  measuredScatterError: Float64Array;
  modelMean: Float64Array;
  /** One standard uncertainty of the model profile from the covariance of the fit. */
  modelBand: Float64Array;
}

export interface CompareProfileInput {
  nx: number;
  ny: number;
  /** Grid layout (x index slowest, y up), atoms per pixel. */
  data: Float64Array;
  model: Float64Array;
  sigma: Float64Array;
  mask: Uint8Array;
  /** Trap centre, grid pixel index (y up). */
  centreX: number;
  centreY: number;
  /** Turn of the lattice x axis, counter-clockwise with y up, radians. */
  angleRad: number;
  /** Trap-scaled length per pixel along the lattice's first and second image axis. */
  scaleU: number;
  scaleV: number;
  binWidth: number;
  /** d model / d p_j on the used pixels, in the order of `usedIndex` (grid layout indices), and the covariance of p. */
  jacobian?: { usedIndex: Int32Array; columns: Float64Array[]; covariance: Float64Array };
}

export function compareProfile(input: CompareProfileInput): CompareProfile {
  const { nx, ny } = input;
  const camera = (values: Float64Array) => planarToCamera({ values, nx, ny });
  const mask = planarMaskToCamera(input.mask, nx, ny);
  const sigma2 = Float64Array.from(input.sigma, (s) => s * s);
  const options = {
    centreX: input.centreX,
    centreY: ny - 1 - input.centreY,
    binWidth: input.binWidth,
    scaleU: input.scaleU,
    scaleV: input.scaleV,
    // azimuthalAverage measures the angle from +x towards +y pointing down the rows.
    ellipseAngleDeg: (-input.angleRad * 180) / Math.PI,
    mask,
  };
  const measured = azimuthalAverage(camera(input.data), { ...options, variance: camera(sigma2).values });
  const bins = measured.pixelCount.length;
  const model = azimuthalAverage(camera(input.model), { ...options, binCount: bins });
  const measuredError = Float64Array.from(measured.meanVariance as Float64Array, (v, b) => Math.sqrt(v / measured.pixelCount[b]));
  const modelBand = new Float64Array(bins).fill(NaN);
  const jac = input.jacobian;
  if (jac !== undefined) {
    const nPar = jac.columns.length;
    const sums = new Float64Array(bins * nPar);
    const counts = new Float64Array(bins);
    for (let u = 0; u < jac.usedIndex.length; u++) {
      const p = jac.usedIndex[u];
      const i = Math.floor(p / ny);
      const j = p - i * ny;
      const b = measured.pixelBin[(ny - 1 - j) * nx + i];
      if (b < 0) continue;
      counts[b]++;
      for (let k = 0; k < nPar; k++) sums[b * nPar + k] += jac.columns[k][u];
    }
    for (let b = 0; b < bins; b++) {
      if (counts[b] === 0) continue;
      let v = 0;
      for (let a = 0; a < nPar; a++) {
        for (let c = 0; c < nPar; c++) v += (sums[b * nPar + a] / counts[b]) * jac.covariance[a * nPar + c] * (sums[b * nPar + c] / counts[b]);
      }
      modelBand[b] = Math.sqrt(Math.max(v, 0));
    }
  }
  return {
    binWidth: input.binWidth,
    binInner: measured.binInner,
    radius: measured.meanRadius,
    pixels: measured.pixelCount,
    measuredMean: measured.mean,
    measuredError,
    measuredScatterError: measured.standardError,
    modelMean: model.mean,
    modelBand,
  };
}

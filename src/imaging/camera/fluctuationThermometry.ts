// Fluctuation thermometry from a stack of shots: the fluctuation-dissipation theorem of
// the grand canonical ensemble, <dN^2> = kT (d<N>/dmu)_T, applied to the atoms N_b in each
// radial bin of a trapped cloud, each bin being an open subsystem at the local chemical
// potential mu0 - V (local density approximation):
//
//   kT_b = <dN_b^2> / (d<N_b>/dmu)
//
// (Q. Zhou and T.-L. Ho, "Universal thermometry for quantum simulation", Phys. Rev. Lett.
// 106, 225301 (2011); the same relation underlies Sanner et al., Phys. Rev. Lett. 105,
// 040402 (2010) and Mueller et al., ibid. 040401). d<N_b>/dmu comes from the mean profile:
// with nbar_b = <N_b> / P_b the mean atoms per pixel of bin b (P_b pixels), mu = mu0 - V and
// V the bin's mean trap potential, d<N_b>/dmu = -P_b d nbar / dV, taken by the three-point
// Lagrange derivative on the (non-uniform) V grid of the neighbouring bins (second order).
// For a column of a 3D cloud the relation holds unchanged, because the column at fixed
// in-plane radius depends on mu0 and V only through mu0 - V(rho) (Zhou & Ho, ibid.).
//
// Noise that is not thermodynamic must be removed from <dN_b^2> before the division:
// - photon shot noise of the imaging (and read noise): subtract it, per bin the sum over the
//   bin's pixels of the per-pixel variance (absorptionImage's atomsVariance, averaged over
//   the shots), given as `imagingVariance`;
// - atom shot noise is NOT subtracted: the Poissonian counting statistics of the atoms are
//   part of the thermodynamic fluctuations (for a classical gas <dN^2> = <N> = kT d<N>/dmu);
// - shot-to-shot drifts of the total atom number or of the cloud position add variance that
//   is not thermal: keep them small (post-select, re-centre), and use bins wider than the
//   imaging resolution, so that atoms blurred across a bin edge do not hide fluctuations.
// Bins are used where d<N_b>/dmu exceeds 3 standard errors, the bin and its neighbours hold
// at least `minimumPixelsPerBin` pixels and atoms that fluctuate (a bin empty in every shot,
// beyond the edge of the cloud or of its lattice, has no variance, and the slope next to it
// is taken across a cut edge). The combined temperature is the ratio of sums kT = sum_b (<dN_b^2> - noise_b) /
// sum_b d<N_b>/dmu over the usable bins (no weights that depend on the fluctuating data).
// Uncertainties: var(s^2) = 2 sigma^4 / (M - 1) for M shots (Gaussian scatter), and the
// standard errors of the mean profile propagated through the derivative.
// Energies as E/h in Hz; the temperature also in nK (T = h kT / k_B).

import { boltzmannJPerK, planckJs } from '../../physics/constants.js';
import { ParameterError, requirePositive } from '../../physics/parameterError.js';
import { azimuthalAverage } from './azimuthalAverage.js';
import { checkImage, checkMask, checkSameSize, type CameraWarning, type PixelImage, type PixelMask } from './pixelImage.js';

export interface FluctuationThermometryInput {
  /** Atoms per pixel of every shot (same size, same centre). */
  shots: readonly PixelImage[];
  /** Pixels used in every shot (1 = use), e.g. summariseShotStack(...).commonMask. */
  mask?: PixelMask;
  centreX: number;
  centreY: number;
  /** Scaled-radius units per pixel along x and y (trapScaling), and the bin width in those units. */
  scaleX: number;
  scaleY: number;
  binWidth: number;
  /** V/h = k r^2 in the scaled radius, Hz per unit^2. */
  harmonicHzPerUm2: number;
  /** Mean imaging (photon + read) noise variance per pixel, atoms^2, to subtract. */
  imagingVariance?: Float64Array;
  /**
   * Variance of an offset estimated in every shot and subtracted from all its pixels (atoms^2
   * per pixel), e.g. the scatter of a border median: it adds P_b^2 offsetVariance to the shot-to-shot
   * variance of a bin of P_b pixels, which is subtracted with the imaging noise. Default 0.
   */
  offsetVariance?: number;
  /** Bins with fewer pixels are not used; default 8. */
  minimumPixelsPerBin?: number;
}

export interface ThermometryBin {
  radius: number;
  pixelCount: number;
  /** Mean V/h over the bin's pixels, Hz. */
  potentialHz: number;
  /** Spread (max - min) of V/h inside the bin, Hz. */
  potentialSpreadHz: number;
  meanAtoms: number;
  /** Sample variance over shots of the bin's atom number, atoms^2. */
  varianceAtoms: number;
  /** Imaging noise subtracted, atoms^2. */
  imagingVarianceAtoms: number;
  /** d<N_b>/dmu, atoms per Hz. */
  atomsPerHz: number;
  /** kT / h from this bin, Hz (NaN where not usable). */
  kTHz: number;
  kTHzUncertainty: number;
  usable: boolean;
}

export interface FluctuationThermometry {
  shotCount: number;
  bins: ThermometryBin[];
  /** Ratio-of-sums temperature over usable bins, kT / h in Hz. */
  kTHz: number;
  kTHzUncertainty: number;
  temperatureNK: number;
  temperatureNKUncertainty: number;
  usableBins: number;
  /** chi^2 of the per-bin kT about the combined value, and its degrees of freedom (consistency check). */
  chiSquare: number;
  degreesOfFreedom: number;
  warnings: CameraWarning[];
}

/** kT from the shot-to-shot fluctuations of the atoms in radial bins (see the file header). */
export function fluctuationThermometry(input: FluctuationThermometryInput): FluctuationThermometry {
  const { shots } = input;
  const M = shots.length;
  if (M < 3) throw new ParameterError('shots', `fluctuation thermometry needs at least 3 shots (tens for a useful error bar), got ${M}`);
  const first = shots[0];
  shots.forEach((s, k) => {
    checkImage(`shots[${k}]`, s);
    checkSameSize(`shots[${k}]`, first, s);
  });
  const { width, height } = first;
  if (input.mask !== undefined) checkMask('mask', input.mask, width, height);
  requirePositive('harmonicHzPerUm2', input.harmonicHzPerUm2, 'Hz per unit^2');
  if (input.imagingVariance !== undefined && input.imagingVariance.length !== width * height) {
    throw new ParameterError('imagingVariance', `expected ${width * height} per-pixel variances, got ${input.imagingVariance.length}`);
  }
  const minimumPixels = input.minimumPixelsPerBin ?? 8;
  // Bin geometry from the first shot, restricted to pixels finite in every shot.
  const mask = new Uint8Array(width * height);
  for (let i = 0; i < mask.length; i++) {
    let ok = input.mask === undefined || input.mask[i] !== 0;
    for (let k = 0; ok && k < M; k++) ok = Number.isFinite(shots[k].values[i]);
    mask[i] = ok ? 1 : 0;
  }
  const profile = azimuthalAverage(first, {
    centreX: input.centreX,
    centreY: input.centreY,
    binWidth: input.binWidth,
    scaleU: input.scaleX,
    scaleV: input.scaleY,
    mask,
  });
  const B = profile.pixelCount.length;
  const k = input.harmonicHzPerUm2;
  // Per-bin potentials and noise from the pixels.
  const potentialSum = new Float64Array(B);
  const potentialMin = new Float64Array(B).fill(Infinity);
  const potentialMax = new Float64Array(B).fill(-Infinity);
  const noise = new Float64Array(B);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const b = profile.pixelBin[i];
      if (b < 0) continue;
      const u = (x - input.centreX) * input.scaleX;
      const v = (y - input.centreY) * input.scaleY;
      const V = k * (u * u + v * v);
      potentialSum[b] += V;
      potentialMin[b] = Math.min(potentialMin[b], V);
      potentialMax[b] = Math.max(potentialMax[b], V);
      if (input.imagingVariance !== undefined) noise[b] += input.imagingVariance[i];
    }
  }
  const offsetVariance = input.offsetVariance ?? 0;
  if (!(offsetVariance >= 0) || !Number.isFinite(offsetVariance)) throw new ParameterError('offsetVariance', `expected a finite variance >= 0, got ${offsetVariance}`);
  for (let b = 0; b < B; b++) noise[b] += profile.pixelCount[b] * profile.pixelCount[b] * offsetVariance;
  // Per-shot bin sums, mean and variance over shots (Welford).
  const mean = new Float64Array(B);
  const m2 = new Float64Array(B);
  const sums = new Float64Array(B);
  for (let s = 0; s < M; s++) {
    sums.fill(0);
    const values = shots[s].values;
    for (let i = 0; i < values.length; i++) {
      const b = profile.pixelBin[i];
      if (b >= 0) sums[b] += values[i];
    }
    for (let b = 0; b < B; b++) {
      const d = sums[b] - mean[b];
      mean[b] += d / (s + 1);
      m2[b] += d * (sums[b] - mean[b]);
    }
  }
  const bins: ThermometryBin[] = [];
  const P = profile.pixelCount;
  const Vb = new Float64Array(B);
  const nbar = new Float64Array(B);
  const nbarSe = new Float64Array(B);
  const variance = new Float64Array(B);
  for (let b = 0; b < B; b++) {
    Vb[b] = P[b] > 0 ? potentialSum[b] / P[b] : NaN;
    variance[b] = M > 1 ? m2[b] / (M - 1) : NaN;
    nbar[b] = P[b] > 0 ? mean[b] / P[b] : NaN;
    nbarSe[b] = P[b] > 0 ? Math.sqrt(variance[b] / M) / P[b] : NaN;
  }
  let numerator = 0;
  let denominator = 0;
  let numeratorVar = 0;
  let denominatorVar = 0;
  let usableBins = 0;
  let spreadRatioMax = 0;
  for (let b = 0; b < B; b++) {
    const neighboursOk = b >= 1 && b + 1 < B && P[b - 1] >= minimumPixels && P[b] >= minimumPixels && P[b + 1] >= minimumPixels;
    let atomsPerHz = NaN;
    let slopeSe = NaN;
    if (neighboursOk) {
      // Three-point Lagrange derivative of nbar(V) at V_b.
      const x0 = Vb[b - 1], x1 = Vb[b], x2 = Vb[b + 1];
      const c0 = (x1 - x2) / ((x0 - x1) * (x0 - x2));
      const c1 = (2 * x1 - x0 - x2) / ((x1 - x0) * (x1 - x2));
      const c2 = (x1 - x0) / ((x2 - x0) * (x2 - x1));
      const dndV = c0 * nbar[b - 1] + c1 * nbar[b] + c2 * nbar[b + 1];
      atomsPerHz = -P[b] * dndV;
      slopeSe = P[b] * Math.sqrt(c0 * c0 * nbarSe[b - 1] ** 2 + c1 * c1 * nbarSe[b] ** 2 + c2 * c2 * nbarSe[b + 1] ** 2);
    }
    const thermalVariance = variance[b] - noise[b];
    // A bin is used only where the slope is measured: d<N>/dmu above 3 standard errors (far out
    // in the wings both numerator and denominator are pure noise and only widen the error).
    // A bin where no shot has atoms (beyond the edge of the cloud or of the lattice) has a
    // slope from its inner neighbour but neither variance nor an error of its own, and a bin
    // next to it has a slope across a cut edge: neither is used.
    const populated = neighboursOk && variance[b - 1] > 0 && variance[b] > 0 && variance[b + 1] > 0;
    const usable = populated && slopeSe > 0 && atomsPerHz > 3 * slopeSe && Number.isFinite(thermalVariance);
    let kTHz = NaN;
    let kTHzUncertainty = NaN;
    if (usable) {
      kTHz = thermalVariance / atomsPerHz;
      const varianceSe = Math.sqrt(2 / (M - 1)) * variance[b];
      kTHzUncertainty = Math.sqrt((varianceSe / atomsPerHz) ** 2 + ((kTHz * slopeSe) / atomsPerHz) ** 2);
      numerator += thermalVariance;
      numeratorVar += varianceSe * varianceSe;
      denominator += atomsPerHz;
      denominatorVar += slopeSe * slopeSe;
      usableBins++;
    }
    bins.push({
      radius: profile.meanRadius[b],
      pixelCount: P[b],
      potentialHz: Vb[b],
      potentialSpreadHz: P[b] > 0 ? potentialMax[b] - potentialMin[b] : NaN,
      meanAtoms: mean[b],
      varianceAtoms: variance[b],
      imagingVarianceAtoms: noise[b],
      atomsPerHz,
      kTHz,
      kTHzUncertainty,
      usable,
    });
  }
  const kTHz = usableBins > 0 ? numerator / denominator : NaN;
  // Numerator and denominator errors treated as independent (first-order propagation).
  const kTHzUncertainty = usableBins > 0 ? Math.abs(kTHz) * Math.sqrt(numeratorVar / (numerator * numerator) + denominatorVar / (denominator * denominator)) : NaN;
  let chiSquare = 0;
  for (const bin of bins) {
    if (!bin.usable) continue;
    chiSquare += ((bin.kTHz - kTHz) / bin.kTHzUncertainty) ** 2;
    spreadRatioMax = Math.max(spreadRatioMax, bin.potentialSpreadHz / Math.abs(kTHz));
  }
  const warnings: CameraWarning[] = [];
  if (usableBins === 0) warnings.push({ code: 'no-usable-bins', message: 'no radial bin had a positive slope d<N>/dmu and enough pixels: no temperature' });
  if (M < 20) warnings.push({ code: 'few-shots', message: `${M} shots: the variance of each bin is known to only sqrt(2/(M-1)) = ${(100 * Math.sqrt(2 / (M - 1))).toFixed(0)} %` });
  // Using the bin's mean potential for sum_px dn/dmu errs by about (spread / kT)^2 / 24 (classical gas): 4 % at one kT.
  if (spreadRatioMax > 1) {
    warnings.push({
      code: 'bins-too-wide',
      message: `the trap potential varies by up to ${spreadRatioMax.toFixed(2)} kT inside a bin; narrow the bins (the LDA slope is taken at the bin's mean potential)`,
    });
  }
  const toNK = (hz: number) => (planckJs * hz) / boltzmannJPerK * 1e9;
  return {
    shotCount: M,
    bins,
    kTHz,
    kTHzUncertainty,
    temperatureNK: toNK(kTHz),
    temperatureNKUncertainty: toNK(kTHzUncertainty),
    usableBins,
    chiSquare,
    degreesOfFreedom: Math.max(usableBins - 1, 0),
    warnings,
  };
}

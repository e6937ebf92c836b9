// Far-field time-of-flight picture: after the lattice and trap are switched off and the
// cloud expands freely for a time t, the density at position x tends to the momentum
// distribution at k = m x / (hbar t) (far-field limit, the initial cloud size neglected),
// DESIGN.md section 4 and Gerbier et al., PRL 95, 050404 (2005). It is an approximation for
// t below the far-field time m R^2 / hbar (timeOfFlightScales.ts); the picture at a finite
// time is freeExpansion.ts, and timeOfFlightPicture.ts chooses between the two:
//
//   atoms in pixel around k = n(k) dk_x dk_y / (2 pi)^2,   n(k) = |w~(k)|^2 B(k),
//
// with B from momentumStructureFactor (sampled on one Brillouin zone, periodic in k) and
// the envelope |w~|^2 normalised so that integral |w~|^2 d^2k / (2 pi)^2 = 1. With that
// normalisation the image holds N atoms exactly for true Wannier functions; a Gaussian
// envelope is off by its overlap between neighbours (a few 1e-2 of the coherent part for
// shallow lattices), and a finite field of view misses the envelope tail, so the sum is
// returned (atomsInImage) beside the atom number.
//
// Grid: pixel spacing dk = 2 pi / (M a); the image spans `brillouinZones` zones per
// axis, centred on k = 0. Interference peaks sit at k = 2 pi / a * (integers), that is at
// multiples of 2 hbar k_L with k_L = pi / a, and land at x = h t / (m a) * (integers).

import { hbarJs } from '../physics/constants.js';
import type { MomentumStructureFactor } from '../observables/momentumStructureFactor.js';
import type { MomentumEnvelope } from './wannierEnvelope.js';

export interface TimeOfFlightOptions {
  /** Lattice spacing a = lambda / 2, micrometres. */
  latticeSpacingUm: number;
  /** Atomic mass, kg. */
  massKg: number;
  /** Free expansion time, ms. */
  flightTimeMs: number;
  /** |w~(k)|^2: orbitalEnvelope(orbitals) (true Wannier functions), or gaussianWannierEnvelope(width, a). */
  envelope: MomentumEnvelope;
  /** Number of Brillouin zones spanned per axis, odd integer >= 1; default 3 (shows the first-order peaks). */
  brillouinZones?: number;
}

export interface TimeOfFlightImage {
  /** Atoms per image pixel, C order, index i * ny + j; axis 0 is the first kept lattice axis. */
  values: Float64Array;
  nx: number;
  ny: number;
  /**
   * Step of this internal momentum grid, 1/um, and its size in the plane after the flight, um.
   * Not the camera pixel's momentum once the picture is resampled: use timeOfFlightScales.
   */
  kStepPerUm: number;
  pixelUm: number;
  /** Pixel centres after the flight, um (axis 0 and axis 1). */
  xCentresUm: Float64Array;
  yCentresUm: Float64Array;
  /** Pixel centres in units of 2 hbar k_L = 2 pi hbar / a: interference peaks at integers. */
  kxInTwoHbarKl: Float64Array;
  kyInTwoHbarKl: Float64Array;
  /** Distance of the first-order peaks from the centre, h t / (m a), um. */
  firstOrderPeakUm: number;
  /** Sum of the image, and sum_i n_i, for comparison. */
  atomsInImage: number;
  atomNumber: number;
}

/** Camera-plane distance of momentum k after a free flight, x = hbar k t / m, in um. */
export function flightDistanceUm(kPerUm: number, flightTimeMs: number, massKg: number): number {
  return (hbarJs * (kPerUm * 1e6) * (flightTimeMs * 1e-3)) / massKg * 1e6;
}

export function timeOfFlightImage(structure: MomentumStructureFactor, options: TimeOfFlightOptions): TimeOfFlightImage {
  const { latticeSpacingUm: a, massKg, flightTimeMs, envelope } = options;
  if (!(a > 0) || !Number.isFinite(a)) {
    throw new Error(`timeOfFlightImage: lattice spacing must be a positive number of micrometres, got ${a}`);
  }
  if (!(massKg > 0) || !Number.isFinite(massKg)) {
    throw new Error(`timeOfFlightImage: mass must be a positive number of kg, got ${massKg}`);
  }
  if (!(flightTimeMs > 0) || !Number.isFinite(flightTimeMs)) {
    throw new Error(`timeOfFlightImage: flight time must be a positive number of ms, got ${flightTimeMs}`);
  }
  const zones = options.brillouinZones ?? 3;
  if (!Number.isInteger(zones) || zones < 1 || zones % 2 !== 1) {
    throw new Error(`timeOfFlightImage: brillouinZones must be an odd integer >= 1, got ${zones}`);
  }
  const m = structure.samplesPerZone;
  const size = zones * m;
  // Pixel p has k index j = p - size / 2 (size is even because M is): k = 0 falls on
  // pixel size / 2 and the grid runs from -size/2 to size/2 - 1 steps of dk.
  const offset = size / 2;
  const dk = (2 * Math.PI) / (m * a);
  const pixelUm = flightDistanceUm(dk, flightTimeMs, massKg);

  // Axes of pixel p, with k index j = p - offset.
  const kAxis = Float64Array.from({ length: size }, (_, p) => (p - offset) * dk);
  const xCentresUm = Float64Array.from({ length: size }, (_, p) => (p - offset) * pixelUm);
  const kInTwoHbarKl = Float64Array.from({ length: size }, (_, p) => (p - offset) / m);
  const separable = envelope.factors;
  const envX = separable === undefined ? new Float64Array(size) : kAxis.map((k) => separable.x(k));
  const envY = separable === undefined ? new Float64Array(size) : kAxis.map((k) => separable.y(k));

  // atoms per pixel = |w~|^2 B dk^2 / (2 pi)^2 = |w~|^2 B / (M a)^2
  const cellFactor = 1 / (m * a * (m * a));
  const values = new Float64Array(size * size);
  const power = structure.coherentPower;
  const incoherent = structure.incoherentAtoms;
  // Index of each pixel inside the sampled zone, j mod M.
  const zoneIndex = new Int32Array(size);
  for (let p = 0; p < size; p++) zoneIndex[p] = (((p - offset) % m) + m) % m;
  // Row of B(k) + I for one zone row, reused for every image row in that zone row.
  const bracket = new Float64Array(size);
  let atomsInImage = 0;
  for (let p = 0; p < size; p++) {
    const powerRow = zoneIndex[p] * m;
    for (let q = 0; q < size; q++) bracket[q] = (power[powerRow + zoneIndex[q]] + incoherent) * cellFactor;
    const row = p * size;
    if (separable !== undefined) {
      const ex = envX[p];
      for (let q = 0; q < size; q++) {
        const v = ex * envY[q] * bracket[q];
        values[row + q] = v;
        atomsInImage += v;
      }
    } else {
      const kx = kAxis[p];
      for (let q = 0; q < size; q++) {
        const v = envelope.at(kx, kAxis[q]) * bracket[q];
        values[row + q] = v;
        atomsInImage += v;
      }
    }
  }
  return {
    values,
    nx: size,
    ny: size,
    kStepPerUm: dk,
    pixelUm,
    xCentresUm,
    yCentresUm: xCentresUm.slice(),
    kxInTwoHbarKl: kInTwoHbarKl,
    kyInTwoHbarKl: kInTwoHbarKl.slice(),
    firstOrderPeakUm: flightDistanceUm((2 * Math.PI) / a, flightTimeMs, massKg),
    atomsInImage,
    atomNumber: structure.atomNumber,
  };
}

// The numbers that let a reader turn a time-of-flight picture into momenta, and the check of
// whether the far-field reading k = m x / (hbar t) holds at all.
//
// Pixel scales. A camera pixel of size P behind a magnification M sees p = P / M in the plane
// of the atoms. After a free flight t a particle of momentum hbar k has moved x = hbar k t / m
// (its initial position neglected: the far-field reading), so one pixel spans
//     dk = m p / (hbar t)          (wavenumber per pixel, 1/um)
//        = (m p / (hbar t)) / k_L  in units of hbar k_L, k_L = pi / a (the lattice light's wavenumber),
// and the first-order interference peaks (k = 2 k_L = 2 pi / a) sit at x_1 = h t / (m a)
// from the zero-momentum peak (e.g. Greiner et al., Nature 415, 39 (2002)).
//
// Far-field time. The far-field reading neglects the quadratic phase m x'^2 / (2 hbar t) across
// the cloud, the matter-wave analogue of the Fraunhofer condition in optics (Fresnel number
// R^2 / (lambda_dB-like length) small; the finite-flight distortion of lattice interference
// patterns is the subject of Gerbier et al., PRL 101, 155303 (2008)). Its size at the cloud
// edge R after a flight t is m R^2 / (2 hbar t), so we call t_ff = m R^2 / hbar the far-field
// time (the phase at the edge is 1/2 rad at t = t_ff; common practice, the prefactor is a
// convention) and warn when t < t_ff and the far-field picture is used. R is the distance
// from the trap centre of the farthest site whose column density exceeds 0.5 % of the
// highest column (a fixed fraction of the peak, so the same rule reads a 2D layer and a
// column of a 3D cloud alike).

import { hbarJs, planckJs } from '../physics/constants.js';
import type { PlanarField } from './planarField.js';

export interface TimeOfFlightScalesInput {
  /** Pixel size in the plane of the atoms: camera pixel / magnification, um. */
  objectPixelUm: number;
  flightTimeMs: number;
  massKg: number;
  /** Lattice spacing a, um (the first-order peaks sit at k = 2 pi / a). */
  latticeSpacingUm: number;
}

export interface TimeOfFlightScales {
  objectPixelUm: number;
  /** m p / (hbar t): wavenumber spanned by one pixel, 1/um. */
  wavenumberPerPixelInverseUm: number;
  /** The same in units of hbar k_L, k_L = pi / a. */
  momentumPerPixelHbarKL: number;
  /** Distance of the first-order peaks from the zero-momentum peak, h t / (m a), um. */
  firstOrderPeakUm: number;
  /** The same in pixels. */
  firstOrderPeakPixels: number;
}

function positive(name: string, value: number, unit: string): void {
  if (!(value > 0) || !Number.isFinite(value)) throw new RangeError(`${name} must be a positive number of ${unit}, got ${value}`);
}

export function timeOfFlightScales(input: TimeOfFlightScalesInput): TimeOfFlightScales {
  const { objectPixelUm: p, flightTimeMs: t, massKg: m, latticeSpacingUm: a } = input;
  positive('objectPixelUm', p, 'um');
  positive('flightTimeMs', t, 'ms');
  positive('massKg', m, 'kg');
  positive('latticeSpacingUm', a, 'um');
  // m p / (hbar t) in 1/m, with p in m and t in s, then to 1/um.
  const perPixel = ((m * p * 1e-6) / (hbarJs * t * 1e-3)) * 1e-6;
  const kL = Math.PI / a;
  const peakUm = ((planckJs * t * 1e-3) / (m * a * 1e-6)) * 1e6;
  return {
    objectPixelUm: p,
    wavenumberPerPixelInverseUm: perPixel,
    momentumPerPixelHbarKL: perPixel / kL,
    firstOrderPeakUm: peakUm,
    firstOrderPeakPixels: peakUm / p,
  };
}

/** Column density fraction of the peak that marks the cloud edge (see the file header). */
export const cloudEdgeFraction = 0.005;

/**
 * Cloud radius R, um: the largest distance from the trap centre of a site whose column
 * density exceeds cloudEdgeFraction of the highest column. `column` holds atoms per site
 * (values[i * ny + j]); site (i, j) sits at (originUm.x + i a, originUm.y + j a) with the
 * trap centre at (0, 0). 0 for an empty column.
 */
export function cloudRadiusUm(column: PlanarField, latticeSpacingUm: number, originUm: { x: number; y: number }): number {
  let max = 0;
  for (let i = 0; i < column.values.length; i++) max = Math.max(max, column.values[i]);
  if (!(max > 0)) return 0;
  const threshold = cloudEdgeFraction * max;
  let r2 = 0;
  for (let i = 0; i < column.nx; i++) {
    const x = originUm.x + i * latticeSpacingUm;
    for (let j = 0; j < column.ny; j++) {
      if (column.values[i * column.ny + j] <= threshold) continue;
      const y = originUm.y + j * latticeSpacingUm;
      r2 = Math.max(r2, x * x + y * y);
    }
  }
  return Math.sqrt(r2);
}

export type TimeOfFlightModel = 'free-expansion' | 'far-field';

export interface FarFieldCheck {
  cloudRadiusUm: number;
  /** m R^2 / hbar, ms. */
  farFieldTimeMs: number;
  /** t / t_ff: far field for >> 1. */
  flightOverFarFieldTime: number;
  /** Largest quadratic phase m R^2 / (2 hbar t) dropped by the far-field reading, rad. */
  edgePhaseRad: number;
  /** A warning when the far-field picture is used before t_ff, an information note when the free expansion is; null in the far field. */
  notice: { code: 'tof-near-field'; severity: 'warning' | 'info'; message: string } | null;
}

export function farFieldCheck(input: { flightTimeMs: number; massKg: number; cloudRadiusUm: number; model: TimeOfFlightModel }): FarFieldCheck {
  const { flightTimeMs: t, massKg: m, cloudRadiusUm: R, model } = input;
  positive('flightTimeMs', t, 'ms');
  positive('massKg', m, 'kg');
  if (!(R >= 0) || !Number.isFinite(R)) throw new RangeError(`cloudRadiusUm must be a number >= 0, got ${R}`);
  const farFieldTimeMs = ((m * (R * 1e-6) ** 2) / hbarJs) * 1e3;
  const ratio = farFieldTimeMs > 0 ? t / farFieldTimeMs : Infinity;
  const edgePhaseRad = farFieldTimeMs / (2 * t);
  let notice: FarFieldCheck['notice'] = null;
  if (ratio < 1) {
    const head =
      `the flight time ${fmt(t)} ms is shorter than the far-field time m R^2 / hbar = ${fmt(farFieldTimeMs)} ms ` +
      `(cloud radius R = ${fmt(R)} um; the quadratic phase at the edge is ${fmt(edgePhaseRad)} rad)`;
    notice =
      model === 'far-field'
        ? {
            code: 'tof-near-field',
            severity: 'warning',
            message:
              `${head}: the far-field picture n(k) at k = m x / (hbar t) is only an approximation of what the camera sees ` +
              '(interference peaks too narrow and too high); set timeOfFlight.model to "free-expansion" for the finite-time picture',
          }
        : {
            code: 'tof-near-field',
            severity: 'info',
            message: `${head}: the picture is the free expansion at this time (interactions neglected during the flight), not the momentum distribution`,
          };
  }
  return { cloudRadiusUm: R, farFieldTimeMs, flightOverFarFieldTime: ratio, edgePhaseRad, notice };
}

function fmt(x: number): string {
  return Number(x.toPrecision(3)).toString();
}

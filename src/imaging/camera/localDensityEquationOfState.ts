// Equation of state from a trapped-cloud profile in the local density approximation (LDA):
// every point of the cloud is a piece of homogeneous gas at the local chemical potential
// mu(r) = mu0 - V(r), so a density profile n(r) is a sampled n(mu) (T. -L. Ho and Q. Zhou,
// "Obtaining the phase diagram and thermodynamic quantities of bulk systems from the
// densities of trapped gases", Nature Phys. 6, 131 (2010)). The harmonic trap
// V = (1/2) m sum_d omega_d^2 x_d^2 becomes isotropic, V = k r^2, in the trap-scaled radius
// r = sqrt(sum_d (omega_d / omega_ref)^2 x_d^2) with k = (1/2) m omega_ref^2.
//
// - 2D layer imaged along its normal: the column density is the 2D density; its azimuthal
//   average in the scaled radius is n_2D(mu0 - k r^2) directly.
// - 3D cloud: the column density along z is the Abel projection of n in scaled
//   coordinates times omega_ref / omega_z (dz = dZ omega_ref / omega_z), so
//   n_3D = (omega_z / omega_ref) * inverseAbel(column profile) (abelInversion.ts).
// - Pressure, the thermodynamic potential itself, by the Gibbs-Duhem relation at fixed T,
//   dP = n dmu: P(mu(r)) = int_r^inf n(r') dV/dr' dr' (Ho & Zhou, ibid.), by the trapezoid
//   rule over the profile; and for a 3D cloud without Abel inversion, from the doubly
//   integrated density n_1D(x) = int int n dy dz: P(mu0 - V(x)) = (m omega_y omega_z / 2 pi) n_1D(x)
//   (Ho & Zhou, ibid.; follows from int dy dz over ellipses of area element
//   2 pi dV / (m omega_y omega_z)).
// Energies are given as E/h in Hz (the project's laboratory energy unit); lengths in um.

import { hbarJs, planckJs } from '../../physics/constants.js';
import { ParameterError, requirePositive } from '../../physics/parameterError.js';

export interface TrapScalingInput {
  /** Object-plane pixel size, um. */
  pixelUm: number;
  /** Trap frequency along the image columns (x), Hz (omega / 2 pi). */
  frequencyXHz: number;
  /** Trap frequency along the image rows (y), Hz. */
  frequencyYHz: number;
  /** Trap frequency along the line of sight, Hz (3D clouds). */
  frequencyLineOfSightHz?: number;
  massKg: number;
  /** omega_ref / 2 pi; default sqrt(f_x f_y). */
  referenceFrequencyHz?: number;
}

export interface TrapScaling {
  /** Scaled radius units (um of the reference trap) per pixel along x: pixelUm * f_x / f_ref. */
  scaleX: number;
  /** Same along y. */
  scaleY: number;
  /** omega_z / omega_ref (NaN without the line-of-sight frequency). */
  lineOfSightScale: number;
  referenceFrequencyHz: number;
  /** k in V/h = k r^2, Hz per um^2 (r the scaled radius). */
  harmonicHzPerUm2: number;
}

/** Axis scales and the harmonic coefficient for azimuthal averages in trap-scaled radius. */
export function trapScaling(input: TrapScalingInput): TrapScaling {
  requirePositive('pixelUm', input.pixelUm, 'um (object-plane pixel size)');
  requirePositive('frequencyXHz', input.frequencyXHz, 'Hz');
  requirePositive('frequencyYHz', input.frequencyYHz, 'Hz');
  requirePositive('massKg', input.massKg, 'kg');
  const ref = input.referenceFrequencyHz ?? Math.sqrt(input.frequencyXHz * input.frequencyYHz);
  requirePositive('referenceFrequencyHz', ref, 'Hz');
  const omega = 2 * Math.PI * ref;
  const z = input.frequencyLineOfSightHz;
  if (z !== undefined) requirePositive('frequencyLineOfSightHz', z, 'Hz');
  return {
    scaleX: (input.pixelUm * input.frequencyXHz) / ref,
    scaleY: (input.pixelUm * input.frequencyYHz) / ref,
    lineOfSightScale: z === undefined ? NaN : z / ref,
    referenceFrequencyHz: ref,
    harmonicHzPerUm2: (0.5 * input.massKg * omega * omega * 1e-12) / planckJs,
  };
}

export interface EquationOfStateInput {
  /** Scaled radius of each point, um. */
  radiusUm: Float64Array;
  /** Density at each radius (per um^2 for a layer, per um^3 for a 3D cloud). */
  density: Float64Array;
  /** Standard deviation of each density (optional). */
  densityStd?: Float64Array;
  /** k in V/h = k r^2, Hz / um^2. */
  harmonicHzPerUm2: number;
  /** mu0 / h at the trap centre, Hz, when known (e.g. fitted); otherwise mu is given relative to mu0. */
  centralChemicalPotentialHz?: number;
}

export interface EquationOfState {
  radiusUm: Float64Array;
  /** V(r) / h, Hz. */
  trapPotentialHz: Float64Array;
  /** mu_local / h = mu0/h - V/h, Hz; when mu0 is unknown, -V/h (i.e. mu_local - mu0). */
  localChemicalPotentialHz: Float64Array;
  /** True when localChemicalPotentialHz includes mu0. */
  absolute: boolean;
  density: Float64Array;
  densityStd: Float64Array;
  /** P(mu_local) / h by Gibbs-Duhem, Hz per um^2 (layer) or per um^3 (3D); 0 beyond the last point. */
  pressureHz: Float64Array;
}

/** n(mu_local) and P(mu_local) from a radial profile (see the file header). */
export function localDensityEquationOfState(input: EquationOfStateInput): EquationOfState {
  const { radiusUm, density } = input;
  const n = radiusUm.length;
  if (density.length !== n) throw new ParameterError('density', `expected ${n} values (one per radius), got ${density.length}`);
  if (input.densityStd !== undefined && input.densityStd.length !== n) throw new ParameterError('densityStd', `expected ${n} values, got ${input.densityStd.length}`);
  requirePositive('harmonicHzPerUm2', input.harmonicHzPerUm2, 'Hz per um^2 (V/h = k r^2)');
  for (let i = 1; i < n; i++) {
    if (!(radiusUm[i] > radiusUm[i - 1])) throw new ParameterError('radiusUm', `radii must increase; radius ${i} = ${radiusUm[i]} follows ${radiusUm[i - 1]}`);
  }
  const mu0 = input.centralChemicalPotentialHz;
  const k = input.harmonicHzPerUm2;
  const trapPotentialHz = new Float64Array(n);
  const localChemicalPotentialHz = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    trapPotentialHz[i] = k * radiusUm[i] * radiusUm[i];
    localChemicalPotentialHz[i] = (mu0 ?? 0) - trapPotentialHz[i];
  }
  // P(r_i) = int_{r_i}^{r_last} n dV (trapezoid in V), P = 0 at the last point (the cloud edge).
  const pressureHz = new Float64Array(n);
  for (let i = n - 2; i >= 0; i--) {
    pressureHz[i] = pressureHz[i + 1] + 0.5 * (density[i] + density[i + 1]) * (trapPotentialHz[i + 1] - trapPotentialHz[i]);
  }
  return {
    radiusUm: Float64Array.from(radiusUm),
    trapPotentialHz,
    localChemicalPotentialHz,
    absolute: mu0 !== undefined,
    density: Float64Array.from(density),
    densityStd: input.densityStd !== undefined ? Float64Array.from(input.densityStd) : new Float64Array(n).fill(NaN),
    pressureHz,
  };
}

export interface LineDensityPressureInput {
  /** Position along the remaining axis (from the trap centre), um, real (not scaled). */
  positionUm: Float64Array;
  /** Doubly integrated density n_1D, atoms per um (column image summed across the other image axis). */
  lineDensityPerUm: Float64Array;
  /** Trap frequency along positionUm, Hz. */
  frequencyAlongHz: number;
  /** Trap frequencies of the two integrated axes (in-image and line of sight), Hz. */
  frequencyAcrossHz: [number, number];
  massKg: number;
  centralChemicalPotentialHz?: number;
}

/** Ho & Zhou's pressure of a 3D cloud from its doubly integrated density: P = (m w_y w_z / 2 pi) n_1D, as P/h in Hz per um^3. */
export function pressureFromLineDensity(input: LineDensityPressureInput): { localChemicalPotentialHz: Float64Array; pressureHz: Float64Array; absolute: boolean } {
  const n = input.positionUm.length;
  if (input.lineDensityPerUm.length !== n) throw new ParameterError('lineDensityPerUm', `expected ${n} values, got ${input.lineDensityPerUm.length}`);
  requirePositive('massKg', input.massKg, 'kg');
  requirePositive('frequencyAlongHz', input.frequencyAlongHz, 'Hz');
  input.frequencyAcrossHz.forEach((f, i) => requirePositive(`frequencyAcrossHz[${i}]`, f, 'Hz'));
  const wy = 2 * Math.PI * input.frequencyAcrossHz[0];
  const wz = 2 * Math.PI * input.frequencyAcrossHz[1];
  const wx = 2 * Math.PI * input.frequencyAlongHz;
  // (m w_y w_z / 2 pi) [kg/s^2] * n_1D [1/um = 1e6 / m] -> J/m^3; / h -> Hz/m^3; * 1e-18 -> Hz/um^3.
  const factor = ((input.massKg * wy * wz) / (2 * Math.PI)) * 1e6 * 1e-18 / planckJs;
  const mu0 = input.centralChemicalPotentialHz ?? 0;
  const localChemicalPotentialHz = new Float64Array(n);
  const pressureHz = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = input.positionUm[i] * 1e-6;
    localChemicalPotentialHz[i] = mu0 - (0.5 * input.massKg * wx * wx * x * x) / planckJs;
    pressureHz[i] = factor * input.lineDensityPerUm[i];
  }
  return { localChemicalPotentialHz, pressureHz, absolute: input.centralChemicalPotentialHz !== undefined };
}

/** Oscillator length sqrt(hbar / (m omega)) in um, for choosing bins (a helper for callers). */
export function oscillatorLengthUm(massKg: number, frequencyHz: number): number {
  requirePositive('massKg', massKg, 'kg');
  requirePositive('frequencyHz', frequencyHz, 'Hz');
  return Math.sqrt(hbarJs / (massKg * 2 * Math.PI * frequencyHz)) * 1e6;
}

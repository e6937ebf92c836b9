// The Gaussian envelope of red-detuned lattice beams: extra harmonic confinement, and the local
// lattice depth across the cloud.
//
// A retro-reflected Gaussian beam along axis d with 1/e^2 intensity radius (waist) w_d gives the
// red-detuned potential V = -s_d E_r,d g_d(r) cos^2(k x_d), g_d = exp(-2 r_perp^2 / w_d^2), where
// r_perp collects the other axes (dipole potential proportional to intensity: Grimm,
// Weidemueller, Ovchinnikov, Adv. At. Mol. Opt. Phys. 42, 95 (2000), eq. 10; Gaussian beam near
// its focus, Rayleigh length >> cloud). Atoms sit at the intensity maxima, so the local depth
// is s_d g_d(r) and the energy of a site (lowest-band mean, eps(s) for V = s sin^2 in E_r) is
//     E_site = E_r [eps(s g) - s g].
// Expanding g = 1 - 2 r^2 / w^2 to first order gives a harmonic confinement
//     m omega^2 = 4 s E_r (1 - d eps/ds) / w^2      per beam, summed over the beams
// transverse to each axis. Dropping d eps/ds (-> 1/(2 sqrt s) deep down) gives the common
// estimate omega^2 = 4 V0 / (m w^2) (common practice); the zero-point term lowers omega^2 by
// about 16 per cent at s = 10, so it is kept by default. Blue-detuned lattices anti-confine and
// are not covered here.

import { planckJs } from './constants.js';
import { latticeBand1d, meanBandDepthDerivative } from './bandStructure.js';
import { ParameterError, requireFiniteInRange, requirePositive } from './parameterError.js';
import { recoilEnergyHz } from './recoil.js';

export interface EnvelopeInput {
  massKg: number;
  /** Wavelength of each lattice beam (one value for all, or one per beam), nm. */
  wavelengthNm: number | readonly number[];
  /** Peak depth of each lattice beam in its own recoil energy; beam d runs along axis d. */
  depthEr: readonly number[];
  /** 1/e^2 intensity radius of each lattice beam, micrometres. */
  waistUm: readonly number[];
  /** Number of spatial axes (default 3); axes beyond depthEr.length have no lattice. */
  axisCount?: number;
  /** Keep the zero-point correction (1 - d eps/ds); default true. */
  includeZeroPoint?: boolean;
}

function checkBeams(depthEr: readonly number[], waistUm: readonly number[]): void {
  if (waistUm.length !== depthEr.length) {
    throw new ParameterError('waistUm', `expected one waist per lattice beam (${depthEr.length}), got ${waistUm.length}`);
  }
  waistUm.forEach((w, d) => requirePositive(`waistUm[${d}]`, w, 'micrometres'));
  depthEr.forEach((s, d) => requireFiniteInRange(`depthEr[${d}]`, s, 0, 400, 'recoil energies (E_r)'));
}

/**
 * Trap frequency f = omega / 2 pi (Hz) that the beam envelopes add along each axis, at the
 * centre of the beams.
 */
export function envelopeTrapFrequencyHz(input: EnvelopeInput): Float64Array {
  const { massKg, depthEr, waistUm } = input;
  const axisCount = input.axisCount ?? 3;
  checkBeams(depthEr, waistUm);
  if (depthEr.length > axisCount) {
    throw new ParameterError('depthEr', `at most ${axisCount} lattice beams for ${axisCount} axes, got ${depthEr.length}`);
  }
  const wavelengths =
    typeof input.wavelengthNm === 'number'
      ? depthEr.map(() => input.wavelengthNm as number)
      : [...input.wavelengthNm];
  if (wavelengths.length !== depthEr.length) {
    throw new ParameterError('wavelengthNm', `expected one wavelength per lattice beam (${depthEr.length}), got ${wavelengths.length}`);
  }
  const includeZeroPoint = input.includeZeroPoint ?? true;
  // m omega^2 contribution of each beam, J/m^2.
  const stiffness = depthEr.map((s, d) => {
    const recoilJ = planckJs * recoilEnergyHz(massKg, wavelengths[d]!);
    const slope = includeZeroPoint && s > 0 ? meanBandDepthDerivative(latticeBand1d(s)) : 0;
    const w = waistUm[d]! * 1e-6;
    return (4 * s * recoilJ * (1 - slope)) / (w * w);
  });
  const out = new Float64Array(axisCount);
  for (let a = 0; a < axisCount; a++) {
    let k = 0;
    for (let d = 0; d < depthEr.length; d++) if (d !== a) k += stiffness[d]!;
    out[a] = Math.sqrt(k / massKg) / (2 * Math.PI);
  }
  return out;
}

/**
 * Local depth of each lattice beam (in E_r) at a position (micrometres, one entry per spatial
 * axis) measured from the common beam focus: s_d exp(-2 sum_{a != d} r_a^2 / w_d^2). Feed the
 * result to latticeAxisParameters / hubbardFromLab (or depthInterpolation.ts for many sites) to
 * get J and U across the cloud. Pass out to reuse a buffer in per-site loops.
 */
export function localDepthEr(
  depthEr: readonly number[],
  waistUm: readonly number[],
  positionUm: ArrayLike<number>,
  out: Float64Array = new Float64Array(depthEr.length),
): Float64Array {
  checkBeams(depthEr, waistUm);
  if (positionUm.length < depthEr.length || out.length < depthEr.length) {
    throw new ParameterError('positionUm', `expected at least ${depthEr.length} coordinates, got ${positionUm.length}`);
  }
  for (let d = 0; d < depthEr.length; d++) {
    let r2 = 0;
    for (let a = 0; a < positionUm.length; a++) if (a !== d) r2 += positionUm[a]! * positionUm[a]!;
    const w = waistUm[d]!;
    out[d] = depthEr[d]! * Math.exp((-2 * r2) / (w * w));
  }
  return out;
}

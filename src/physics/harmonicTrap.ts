// Harmonic trap in laboratory units. A trap frequency is quoted as f = omega / (2 pi) in Hz
// (the number experimenters measure, e.g. by dipole oscillations). The potential energy at
// displacement r is V = (1/2) m sum_d (2 pi f_d)^2 r_d^2; here it is returned as V/h in Hz so it
// can be compared with J and U directly. The ground state of one axis is a Gaussian of
// oscillator length l = sqrt(hbar / (m omega)), whose integral of |psi|^4 is 1/(sqrt(2 pi) l)
// (textbook harmonic oscillator, e.g. Pethick & Smith, Bose-Einstein Condensation in Dilute
// Gases, ch. 2).

import { hbarJs, planckJs } from './constants.js';
import { ParameterError } from './parameterError.js';

function checkAxes(trapFrequencyHz: readonly number[], other: readonly number[], otherName: string): void {
  if (trapFrequencyHz.length !== other.length) {
    throw new ParameterError(
      otherName,
      `expected one value per trap axis (${trapFrequencyHz.length}), got ${other.length}`,
    );
  }
  for (let d = 0; d < trapFrequencyHz.length; d++) {
    const f = trapFrequencyHz[d]!;
    if (!Number.isFinite(f) || f < 0) {
      throw new ParameterError(`trapFrequencyHz[${d}]`, `expected a frequency >= 0 Hz, got ${String(f)}`);
    }
  }
}

/**
 * Trap potential V/h in Hz at a displacement (micrometres) from the trap centre:
 * (1/2) m sum_d (2 pi f_d)^2 r_d^2 / h.
 */
export function trapPotentialHz(
  massKg: number,
  trapFrequencyHz: readonly number[],
  displacementUm: readonly number[],
): number {
  checkAxes(trapFrequencyHz, displacementUm, 'displacementUm');
  let sum = 0;
  for (let d = 0; d < trapFrequencyHz.length; d++) {
    const omega = 2 * Math.PI * trapFrequencyHz[d]!;
    const r = displacementUm[d]! * 1e-6;
    sum += omega * omega * r * r;
  }
  return (0.5 * massKg * sum) / planckJs;
}

/**
 * Per-axis curvature of the site potential in Hz per site^2: eps_i / h = sum_d c_d n_d^2 with n_d
 * the site index from the trap centre along axis d and c_d = (1/2) m (2 pi f_d)^2 a_d^2 / h.
 */
export function trapCurvatureHzPerSite2(
  massKg: number,
  trapFrequencyHz: readonly number[],
  latticeSpacingUm: readonly number[],
): Float64Array {
  checkAxes(trapFrequencyHz, latticeSpacingUm, 'latticeSpacingUm');
  const out = new Float64Array(trapFrequencyHz.length);
  for (let d = 0; d < out.length; d++) {
    const omega = 2 * Math.PI * trapFrequencyHz[d]!;
    const a = latticeSpacingUm[d]! * 1e-6;
    out[d] = (0.5 * massKg * omega * omega * a * a) / planckJs;
  }
  return out;
}

/** Harmonic-oscillator length sqrt(hbar / (m omega)) in metres, omega = 2 pi f. */
export function oscillatorLengthM(massKg: number, trapFrequencyHz: number): number {
  return Math.sqrt(hbarJs / (massKg * 2 * Math.PI * trapFrequencyHz));
}

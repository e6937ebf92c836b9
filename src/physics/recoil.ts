// Lattice units of a retro-reflected (standing-wave) optical lattice of wavelength lambda:
// lattice wavenumber k = 2 pi / lambda, spacing a = lambda / 2, recoil energy
// E_r = hbar^2 k^2 / (2 m) = h^2 / (2 m lambda^2) (e.g. Jaksch et al., PRL 81, 3108 (1998)).

import { planckJs } from './constants.js';

/** Recoil energy E_r / h in Hz for an atom of mass massKg and lattice light of wavelengthNm. */
export function recoilEnergyHz(massKg: number, wavelengthNm: number): number {
  const lambdaM = wavelengthNm * 1e-9;
  return planckJs / (2 * massKg * lambdaM * lambdaM);
}

/** Lattice spacing a = lambda / 2 in micrometres. */
export function latticeSpacingUm(wavelengthNm: number): number {
  return wavelengthNm / 2000;
}

/** Lattice wavenumber k = 2 pi / lambda in 1/m. */
export function latticeWavenumberPerM(wavelengthNm: number): number {
  return (2 * Math.PI) / (wavelengthNm * 1e-9);
}

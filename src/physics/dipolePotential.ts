// ESTIMATE of an optical-lattice depth from laser power and waist, for alkali atoms, from their
// D1 and D2 lines only.
//
// Dipole potential of a ground-state alkali (J = 1/2) in far-detuned, linearly polarised light
// of angular frequency omega and intensity I, each D line i (frequency omega_i, decay rate
// Gamma_i) weighted by its share of the S -> P line strength, (2J'+1)/(3(2J+1)) = 1/3 (D1) and
// 2/3 (D2):
//     U(I) = - sum_i w_i (3 pi c^2 / (2 omega_i^3)) Gamma_i [1/(omega_i - omega) + 1/(omega_i + omega)] I
// (Grimm, Weidemueller, Ovchinnikov, Adv. At. Mol. Opt. Phys. 42, 95 (2000): eq. 10 per line,
// eq. 19 for the D1/D2 weights; the counter-rotating term is kept because at 1064 nm it is a
// 15-25 per cent correction). Photon scattering rate, same weights (their eq. 12):
//     Gamma_sc = sum_i w_i (3 pi c^2 / (2 hbar omega_i^3)) (omega/omega_i)^3
//                Gamma_i^2 [1/(omega_i - omega) + 1/(omega_i + omega)]^2 I.
// A retro-reflected beam of power P and waist w (peak intensity I_0 = 2P / (pi w^2)) forms a
// standing wave of peak intensity 4 I_0, so the lattice depth is V_0 = 4 |U(I_0)|.
//
// Neglected: higher P levels and the ionic core (a few per cent of the polarisability of the
// heavy alkalis), hyperfine structure (fine far from resonance), imperfect retro-reflection,
// polarisation and beam-overlap errors, which in practice make real lattices shallower. Hence
// the fixed caution below, which every caller must show with the number.

import { atomicMassUnitKg, hbarJs, planckJs, speedOfLightMPerS } from './constants.js';
import { ParameterError, requirePositive } from './parameterError.js';
import { recoilEnergyHz } from './recoil.js';
import {
  findSpecies,
  resolveSpecies,
  speciesNames,
  type AlkaliDLines,
  type ResolvedSpecies,
  type SpeciesInput,
} from './species.js';

/** Shown wherever a depth estimated from laser power is shown. */
export const laserSafetyCaution =
  'ESTIMATE ONLY. Optical lattices use high-power lasers: follow your local laser-safety rules ' +
  '(eyewear, enclosures, interlocks, alignment at reduced power). Check this depth against your ' +
  "lab's own calibration (e.g. lattice amplitude-modulation spectroscopy or Kapitza-Dirac " +
  'diffraction) before relying on it; real lattices are usually shallower than this estimate.';

/** Weights of the D1 and D2 lines for a J = 1/2 ground state, linear polarisation. */
const d1Weight = 1 / 3;
const d2Weight = 2 / 3;

function angularFrequency(wavelengthNm: number): number {
  return (2 * Math.PI * speedOfLightMPerS) / (wavelengthNm * 1e-9);
}

function lineTerms(dLines: AlkaliDLines, wavelengthNm: number): { potentialJPerWm2: number; scatteringPerWm2: number } {
  const omega = angularFrequency(wavelengthNm);
  const c2 = speedOfLightMPerS * speedOfLightMPerS;
  let potential = 0;
  let scattering = 0;
  for (const [line, weight] of [
    [dLines.d1, d1Weight],
    [dLines.d2, d2Weight],
  ] as const) {
    const omegaI = angularFrequency(line.wavelengthNm);
    const gamma = 2 * Math.PI * line.linewidthMHz * 1e6;
    const bracket = 1 / (omegaI - omega) + 1 / (omegaI + omega);
    const prefactor = (3 * Math.PI * c2) / (2 * omegaI ** 3);
    potential -= weight * prefactor * gamma * bracket;
    scattering += (weight * prefactor * (omega / omegaI) ** 3 * gamma * gamma * bracket * bracket) / hbarJs;
  }
  return { potentialJPerWm2: potential, scatteringPerWm2: scattering };
}

/**
 * Dipole potential per unit intensity, U / I in J / (W m^-2): negative (attractive) for red
 * detuning. Wavelengths within 0.5 nm of a D line are refused (resonant light, not a lattice).
 */
export function dipolePotentialPerIntensity(dLines: AlkaliDLines, wavelengthNm: number): number {
  checkWavelength(dLines, wavelengthNm);
  return lineTerms(dLines, wavelengthNm).potentialJPerWm2;
}

function checkWavelength(dLines: AlkaliDLines, wavelengthNm: number): void {
  requirePositive('wavelengthNm', wavelengthNm, 'nm');
  const dMin = Math.min(Math.abs(wavelengthNm - dLines.d1.wavelengthNm), Math.abs(wavelengthNm - dLines.d2.wavelengthNm));
  if (dMin < 0.5) {
    throw new ParameterError('wavelengthNm', `${wavelengthNm} nm is within 0.5 nm of a D line; a lattice needs far-detuned light`);
  }
  if (wavelengthNm < 0.6 * dLines.d2.wavelengthNm) {
    throw new ParameterError(
      'wavelengthNm',
      `${wavelengthNm} nm is too far to the blue: higher transitions matter there and the D-line estimate does not apply`,
    );
  }
}

export interface LatticeDepthEstimateInput {
  species: SpeciesInput | ResolvedSpecies;
  wavelengthNm: number;
  /** Power of the incoming beam (before retro-reflection), W. */
  powerW: number;
  /** 1/e^2 intensity radius at the atoms, micrometres. */
  waistUm: number;
}

export interface LatticeDepthEstimate {
  /** Always true: this is an estimate, to be checked against a calibration. */
  estimate: true;
  caution: string;
  /** 2 P / (pi w^2) of the single incoming beam, W/m^2. */
  peakIntensityWPerM2: number;
  /** Atoms sit at intensity maxima (red detuning) or minima (blue). */
  redDetuned: boolean;
  /** Lattice depth V_0 / h, Hz. */
  depthHz: number;
  /** Lattice depth in recoil energies of the lattice light. */
  depthEr: number;
  recoilHz: number;
  /** Photon scattering rate at the standing-wave intensity maximum, 1/s. */
  scatteringRateAtMaximumPerS: number;
  source: string;
}

function isResolved(species: SpeciesInput | ResolvedSpecies): species is ResolvedSpecies {
  return typeof species === 'object' && 'massKg' in species && 'scatteringLengthM' in species;
}

/** Depth of a retro-reflected lattice beam from its power and waist (alkalis only). */
export function estimateLatticeDepth(input: LatticeDepthEstimateInput): LatticeDepthEstimate {
  const species = speciesForLight(input.species);
  const dLines = species.dLines;
  if (!dLines) {
    throw new ParameterError(
      'species',
      `${species.label} has no D-line data; the depth-from-power estimate covers the alkalis in the species table only`,
    );
  }
  requirePositive('powerW', input.powerW, 'W');
  requirePositive('waistUm', input.waistUm, 'micrometres');
  checkWavelength(dLines, input.wavelengthNm);
  const { potentialJPerWm2, scatteringPerWm2 } = lineTerms(dLines, input.wavelengthNm);
  const waistM = input.waistUm * 1e-6;
  const peakIntensityWPerM2 = (2 * input.powerW) / (Math.PI * waistM * waistM);
  const depthJ = 4 * Math.abs(potentialJPerWm2) * peakIntensityWPerM2;
  const recoilHz = recoilEnergyHz(species.massKg, input.wavelengthNm);
  const depthHz = depthJ / planckJs;
  return {
    estimate: true,
    caution: laserSafetyCaution,
    peakIntensityWPerM2,
    redDetuned: potentialJPerWm2 < 0,
    depthHz,
    depthEr: depthHz / recoilHz,
    recoilHz,
    scatteringRateAtMaximumPerS: scatteringPerWm2 * 4 * peakIntensityWPerM2,
    source: `Grimm, Weidemueller, Ovchinnikov, Adv. At. Mol. Opt. Phys. 42, 95 (2000), D1/D2 lines only; line data: ${dLines.source}`,
  };
}

/** Mass and D lines: all the estimate needs (so a Feshbach-tuned species needs no a_s here). */
function speciesForLight(input: SpeciesInput | ResolvedSpecies): { label: string; massKg: number; dLines?: AlkaliDLines } {
  if (isResolved(input)) return input;
  if (typeof input === 'string' || 'name' in input) {
    const name = typeof input === 'string' ? input : input.name;
    const record = findSpecies(name);
    if (!record) {
      throw new ParameterError('species', `unknown species "${name}"; use one of ${speciesNames().join(', ')}`);
    }
    return { label: record.name, massKg: record.massU * atomicMassUnitKg, ...(record.dLines ? { dLines: record.dLines } : {}) };
  }
  return resolveSpecies(input, 'species');
}

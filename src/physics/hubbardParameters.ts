// From laboratory parameters to Bose-Hubbard parameters (Jaksch et al., PRL 81, 3108 (1998)).
//
// Each lattice axis d (wavelength lambda_d, depth s_d in its own recoil energy) is solved in
// 1D (latticeAxis.ts): hopping J_d, Wannier overlap int |w_d|^4. Axes without a lattice are
// held by a harmonic trap of frequency f (e.g. the tight vertical confinement of a single 2D
// layer) and carry the harmonic-oscillator ground state, int |psi|^4 = 1/(sqrt(2 pi) l),
// l = sqrt(hbar/(m 2 pi f)). The on-site interaction is the contact pseudo-potential
//     U = (4 pi hbar^2 a_s / m) prod_d int |w_d|^4 dx_d.
// Mean-field reference: the tip of the n = 1 Mott lobe at U/(zJ) = 3 + 2 sqrt 2 = 5.83
// (Sheshadri et al., EPL 22, 257 (1993); van Oosten, van der Straten, Stoof, PRA 63, 053601
// (2001)); with anisotropic hopping zJ becomes 2 sum_d J_d (the mean-field coupling of one site
// to its neighbours).

import { hbarJs, planckJs } from './constants.js';
import { oscillatorLengthM } from './harmonicTrap.js';
import { latticeAxisParameters, type LatticeAxisParameters } from './latticeAxis.js';
import { ParameterError, requireFiniteInRange } from './parameterError.js';
import { latticeSpacingUm, recoilEnergyHz } from './recoil.js';
import { resolveSpecies, type ResolvedSpecies, type SpeciesInput } from './species.js';

/** (U / zJ) at the tip of the n = 1 Mott lobe in mean-field theory: 3 + 2 sqrt 2. */
export const meanFieldCriticalUOverZJ = 3 + 2 * Math.SQRT2;

/** A laboratory description of the lattice. */
export interface LabLattice {
  /** Table name, inline { massU, scatteringLengthBohr }, or an already resolved species. */
  species: SpeciesInput | ResolvedSpecies;
  /** Lattice wavelength in nm: one value for all lattice axes, or one per lattice axis. */
  wavelengthNm: number | readonly number[];
  /**
   * Lattice depth in recoil energies of that axis's own wavelength. A single number means a
   * cubic 3D lattice; an array gives one depth per lattice axis (1, 2 or 3 axes, anisotropic).
   */
  depthEr: number | readonly number[];
  /**
   * Trap frequency f = omega / 2 pi in Hz of each axis without a lattice (3 - lattice axes
   * values), e.g. [fz] for a single 2D layer. The atoms sit in its harmonic ground state.
   */
  confinementFrequencyHz?: readonly number[];
}

/** One lattice axis in laboratory units. */
export interface LatticeAxisHubbard extends LatticeAxisParameters {
  wavelengthNm: number;
  latticeSpacingUm: number;
  /** Recoil energy E_r / h of this axis, Hz. */
  recoilHz: number;
  tunnellingHz: number;
  nextNearestTunnellingHz: number;
  /** J_2 / J (negative); 0 when J_2 is below the round-off floor (nextNearestResolved false). */
  nnnOverNn: number;
  /** rms width of the Wannier function, nm. */
  wannierWidthNm: number;
  bandGapHz: number;
}

/** One harmonically confined (non-lattice) axis. */
export interface HarmonicAxisHubbard {
  trapFrequencyHz: number;
  /** sqrt(hbar / (m omega)), micrometres. */
  oscillatorLengthUm: number;
  /** Level spacing h f / h = f, Hz (compare with U: the layer stays in its ground state if f >> U). */
  levelSpacingHz: number;
  /** int |psi_0|^4 dz = 1 / (sqrt(2 pi) l), 1/m. */
  integralPsi4PerM: number;
}

export interface HubbardParameters {
  species: ResolvedSpecies;
  /** Number of lattice axes (1, 2 or 3). */
  latticeDimension: number;
  latticeAxes: LatticeAxisHubbard[];
  harmonicAxes: HarmonicAxisHubbard[];
  /** Recoil energy of the first lattice axis, Hz: the unit of interactionEr. */
  recoilHz: number;
  interactionHz: number;
  /** U in units of the first lattice axis's recoil energy. */
  interactionEr: number;
  /** Mean of J over the lattice axes, Hz. */
  meanTunnellingHz: number;
  /** z = 2 x lattice dimension. */
  coordinationNumber: number;
  /** U / mean J. */
  uOverJ: number;
  /** U / (2 sum_d J_d), i.e. U / (zJ) for isotropic hopping. */
  uOverZJ: number;
  /** uOverZJ / (3 + 2 sqrt 2): 1 at the mean-field n = 1 transition, > 1 Mott insulating. */
  uOverZJRelativeToCritical: number;
  /** Contact coupling g / h = 4 pi hbar^2 a_s / (m h), Hz m^3. */
  contactCouplingHzM3: number;
  /** Where the single-band, nearest-neighbour model is doubtful, in words. */
  warnings: string[];
}

function perAxis(parameter: string, value: number | readonly number[], count: number): number[] {
  if (typeof value === 'number') return new Array<number>(count).fill(value);
  if (value.length !== count) {
    throw new ParameterError(parameter, `expected one value per lattice axis (${count}), got ${value.length}`);
  }
  return [...value];
}

function isResolved(species: SpeciesInput | ResolvedSpecies): species is ResolvedSpecies {
  return typeof species === 'object' && 'massKg' in species && 'scatteringLengthM' in species;
}

/**
 * Hubbard parameters of a lattice described in laboratory units. Axes with equal depth are
 * solved once, so a cubic lattice costs one 1D band-structure calculation.
 */
export function hubbardFromLab(lab: LabLattice): HubbardParameters {
  const species = isResolved(lab.species) ? lab.species : resolveSpecies(lab.species, 'species');
  const depths = typeof lab.depthEr === 'number' ? [lab.depthEr, lab.depthEr, lab.depthEr] : [...lab.depthEr];
  const dimension = depths.length;
  if (dimension < 1 || dimension > 3) {
    throw new ParameterError('depthEr', `expected 1 to 3 lattice depths, got ${dimension}`);
  }
  const wavelengths = perAxis('wavelengthNm', lab.wavelengthNm, dimension);
  const confinement = [...(lab.confinementFrequencyHz ?? [])];
  if (confinement.length !== 3 - dimension) {
    throw new ParameterError(
      'confinementFrequencyHz',
      `a lattice along ${dimension} axes needs ${3 - dimension} trap frequencies (Hz) for the other axes, got ${confinement.length}`,
    );
  }
  wavelengths.forEach((w, d) =>
    requireFiniteInRange(`wavelengthNm[${d}]`, w, 100, 20000, 'nm'),
  );
  confinement.forEach((f, d) =>
    requireFiniteInRange(`confinementFrequencyHz[${d}]`, f, 1e-3, 1e9, 'Hz'),
  );

  const cache = new Map<number, LatticeAxisParameters>();
  const latticeAxes: LatticeAxisHubbard[] = depths.map((depthEr, d) => {
    let axis = cache.get(depthEr);
    if (!axis) {
      axis = latticeAxisParameters(depthEr, {}, `depthEr[${d}]`);
      cache.set(depthEr, axis);
    }
    const wavelengthNm = wavelengths[d]!;
    const recoilHz = recoilEnergyHz(species.massKg, wavelengthNm);
    const spacingUm = latticeSpacingUm(wavelengthNm);
    return {
      ...axis,
      wavelengthNm,
      latticeSpacingUm: spacingUm,
      recoilHz,
      tunnellingHz: axis.tunnellingEr * recoilHz,
      nextNearestTunnellingHz: axis.nextNearestTunnellingEr * recoilHz,
      nnnOverNn: axis.nextNearestResolved ? axis.nextNearestTunnellingEr / axis.tunnellingEr : 0,
      wannierWidthNm: axis.wannierSpreadSites * spacingUm * 1000,
      bandGapHz: axis.bandGapEr * recoilHz,
    };
  });

  const harmonicAxes: HarmonicAxisHubbard[] = confinement.map((f) => {
    const lengthM = oscillatorLengthM(species.massKg, f);
    return {
      trapFrequencyHz: f,
      oscillatorLengthUm: lengthM * 1e6,
      levelSpacingHz: f,
      integralPsi4PerM: 1 / (Math.sqrt(2 * Math.PI) * lengthM),
    };
  });

  // g / h in Hz m^3, then U / h = (g / h) prod int |w|^4.
  const contactCouplingHzM3 = (4 * Math.PI * hbarJs * hbarJs * species.scatteringLengthM) / species.massKg / planckJs;
  let overlapPerM3 = 1;
  for (const axis of latticeAxes) overlapPerM3 *= axis.integralW4PerSite / (axis.latticeSpacingUm * 1e-6);
  for (const axis of harmonicAxes) overlapPerM3 *= axis.integralPsi4PerM;
  const interactionHz = contactCouplingHzM3 * overlapPerM3;

  let sumJ = 0;
  for (const axis of latticeAxes) sumJ += axis.tunnellingHz;
  const meanTunnellingHz = sumJ / dimension;
  const uOverZJ = interactionHz / (2 * sumJ);
  const recoilHz = latticeAxes[0]!.recoilHz;

  // Validity checks, worded once per distinct message (isotropic axes share one line).
  const byMessage = new Map<string, string[]>();
  const note = (where: string, message: string): void => {
    const list = byMessage.get(message) ?? [];
    list.push(where);
    byMessage.set(message, list);
  };
  latticeAxes.forEach((axis, d) => {
    if (Math.abs(axis.nnnOverNn) > 0.05) {
      note(
        `${d}`,
        `next-nearest hopping is ${(100 * Math.abs(axis.nnnOverNn)).toFixed(1)}% of J at ${axis.depthEr} E_r; ` +
          'the nearest-neighbour Hubbard model starts to fail in such a shallow lattice',
      );
    }
    if (interactionHz > 0.1 * axis.bandGapHz) {
      note(
        `${d}`,
        `U is ${((100 * interactionHz) / axis.bandGapHz).toFixed(0)}% of the band gap; higher bands mix in and the single-band model overestimates U`,
      );
    }
    // The pseudo-potential needs a_s << the size of the on-site wave function; at a_s / width
    // ~ 0.2 the corrections reach the ten per cent level (common practice).
    const widthM = axis.wannierSpreadSites * axis.latticeSpacingUm * 1e-6;
    if (species.scatteringLengthM > 0.2 * widthM) {
      note(
        `${d}`,
        `a_s is ${((100 * species.scatteringLengthM) / widthM).toFixed(0)}% of the Wannier width; the contact pseudo-potential is no longer accurate`,
      );
    }
  });
  const latticeWarnings = [...byMessage].map(
    ([message, axes]) => `${axes.length > 1 ? 'lattice axes' : 'lattice axis'} ${axes.join(', ')}: ${message}`,
  );
  const warnings: string[] = [...latticeWarnings];
  harmonicAxes.forEach((axis, d) => {
    if (interactionHz > 0.1 * axis.levelSpacingHz) {
      warnings.push(
        `harmonic axis ${d}: U is ${((100 * interactionHz) / axis.levelSpacingHz).toFixed(0)}% of the confinement level spacing ${axis.trapFrequencyHz} Hz; ` +
          'excited levels of the confinement mix in (the layer is not strictly 2D)',
      );
    }
  });

  return {
    species,
    latticeDimension: dimension,
    latticeAxes,
    harmonicAxes,
    recoilHz,
    interactionHz,
    interactionEr: interactionHz / recoilHz,
    meanTunnellingHz,
    coordinationNumber: 2 * dimension,
    uOverJ: interactionHz / meanTunnellingHz,
    uOverZJ,
    uOverZJRelativeToCritical: uOverZJ / meanFieldCriticalUOverZJ,
    contactCouplingHzM3,
    warnings,
  };
}

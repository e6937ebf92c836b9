// Resonant absorption cross-section of a closed two-level (cycling) transition for
// resonant, correctly polarised light, sigma0 = 3 lambda^2 / (2 pi) (e.g. D. A. Steck,
// "Rubidium 87 D Line Data", section on the resonant cross section; Foot, Atomic Physics,
// OUP 2005, eq. 7.79). Here lambda is the vacuum wavelength of the D2 line (S_1/2 -> P_3/2)
// of the alkali species, taken from the species table (src/physics/species.ts, which holds
// the D1/D2 wavelengths with their sources), so there is one table of line data.
//
// Where the cycling transition is not closed or the excited hyperfine levels are not
// resolved (7Li; 39K and 41K, whose P_3/2 hyperfine splitting is comparable to the natural
// linewidth), the real cross-section is smaller than sigma0: the note says so, and the
// Reinaudi factor alpha (absorptionImage.ts) is the place to calibrate it.

import { findSpecies, speciesNames } from '../../physics/species.js';
import { ParameterError } from '../../physics/parameterError.js';

export interface ResonantCrossSection {
  species: string;
  /** D2 vacuum wavelength, nm. */
  wavelengthNm: number;
  /** sigma0 = 3 lambda^2 / (2 pi), um^2 (object plane: a cross-section, no magnification). */
  crossSectionUm2: number;
  /** The same in cm^2, as D-line tables quote it. */
  crossSectionCm2: number;
  /** Where the wavelength comes from. */
  source: string;
  /** Caveat about the cycling transition, when there is one. */
  note?: string;
}

const openCyclingNote: Record<string, string> = {
  '7Li':
    'the 2P_3/2 hyperfine levels of 7Li are not resolved (splittings below the 5.9 MHz linewidth), so the D2 line has no closed cycling transition: the effective cross-section is below 3 lambda^2 / 2 pi; calibrate alpha',
  '39K':
    'the 4P_3/2 hyperfine splitting of 39K (about 34 MHz in all) is only a few linewidths, so optical pumping out of the cycling transition lowers the effective cross-section; calibrate alpha',
  '41K':
    'the 4P_3/2 hyperfine splitting of 41K (about 17 MHz in all) is comparable to the linewidth, so the cycling transition is not closed: the effective cross-section is below 3 lambda^2 / 2 pi; calibrate alpha',
};

/** sigma0 of the D2 cycling line of a species in the table (alkalis only). */
export function resonantCrossSection(speciesName: string): ResonantCrossSection {
  const record = findSpecies(speciesName);
  if (record === undefined) {
    throw new ParameterError('species', `unknown species "${speciesName}"; use one of ${speciesNames().join(', ')}`);
  }
  if (record.dLines === undefined) {
    throw new ParameterError(
      'species',
      `${record.name} has no alkali D2 line in the species table, so its resonant cross-section is not known here; give the cross-section in um^2 directly`,
    );
  }
  const wavelengthNm = record.dLines.d2.wavelengthNm;
  const lambdaUm = wavelengthNm * 1e-3;
  const crossSectionUm2 = (3 * lambdaUm * lambdaUm) / (2 * Math.PI);
  const note = openCyclingNote[record.name];
  return {
    species: record.name,
    wavelengthNm,
    crossSectionUm2,
    crossSectionCm2: crossSectionUm2 * 1e-8,
    source: record.dLines.source,
    ...(note !== undefined ? { note } : {}),
  };
}

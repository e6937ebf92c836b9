// What the numbers of a measured picture mean, decided from the option values of `compare`,
// the scenario and tiercake's own sidecar before any frame is read:
// - which source was given (--image or --absorption-frames, never both) and which options
//   go with it (checkCompareInputs);
// - the pixel size and the bin width in the scenario's length unit: µm for a laboratory
//   scenario, lattice spacings for a dimensionless one, each unit with its own option name,
//   so a number cannot be read in the wrong unit;
// - the unit of the picture: counts per atom (option, else the sidecar), or absorption
//   frames with the resonant cross-section (option, else sigma0 of the species' D2 line).
// A picture without a unit is refused (InputError naming the option to give), never read
// as atoms. Pure: the sidecar comes through a reader the caller passes in.

import { resonantCrossSection } from '../imaging/camera/resonantCrossSection.js';
import { parseFrameAddress } from '../imaging/camera/frameAddress.js';
import type { SidecarScale } from '../imaging/camera/pictureSidecar.js';
import { InputError } from '../scenario/inputError.js';
import { compareInputError } from './compareInputErrors.js';
import type { MeasurementSettings } from './measuredShots.js';

/** The option values of `compare` that name the measured data and its unit. */
export interface CompareMeasurementOptions {
  image?: string;
  absorptionFrames?: string;
  backgroundFrame?: string;
  shots?: string;
  out?: string;
  countsPerAtom?: number;
  saturationCounts?: number;
  alpha?: number;
  odLimit?: number;
  minProbeCounts?: number;
  crossSection?: number;
  pixelUm?: number;
  pixelSites?: number;
  binUm?: number;
  binSites?: number;
}

export interface CompareMeasurement {
  measurement: MeasurementSettings;
  /** Object-plane pixel, in µm (laboratory scenario) or lattice spacings (dimensionless). */
  pixelSize: number;
  /** Radial bin width of the profiles in the same unit, when given. */
  binWidth?: number;
  /** Where the scale came from, one phrase for the outputs. */
  scaleFrom: string;
}

const absorptionOnly = [
  ['saturationCounts', '--saturation-counts'],
  ['alpha', '--alpha'],
  ['odLimit', '--od-limit'],
  ['minProbeCounts', '--min-probe-counts'],
  ['crossSection', '--cross-section'],
] as const;

/** The two or three frame sources of --absorption-frames: WITH_ATOMS,PROBE_ONLY[,DARK]. */
export function absorptionRoles(text: string): string[] {
  const roles = text.split(',').map((r) => r.trim());
  if (roles.length < 2 || roles.length > 3 || roles.some((r) => r.length === 0)) {
    throw new InputError(`--absorption-frames: expected WITH_ATOMS,PROBE_ONLY[,DARK] (two or three frame sources), got "${text}"`);
  }
  return roles;
}

/** The option checks that need no file and no scenario, in the order a user meets them. */
export function checkCompareInputs(o: CompareMeasurementOptions): void {
  if (o.image === undefined && o.absorptionFrames === undefined) {
    throw new InputError('--image: give the measured picture (with --counts-per-atom), or raw absorption frames with --absorption-frames WITH_ATOMS,PROBE_ONLY[,DARK]');
  }
  if (o.image !== undefined && o.absorptionFrames !== undefined) throw new InputError('--image: give either --image or --absorption-frames, not both');
  if (o.out === undefined) throw new InputError('--out: give the folder for the comparison results');
  if (o.absorptionFrames !== undefined) {
    absorptionRoles(o.absorptionFrames);
    if (o.countsPerAtom !== undefined) throw new InputError('--counts-per-atom: absorption frames are turned into atoms by the cross-section; --counts-per-atom is for --image');
    if (o.backgroundFrame !== undefined) throw new InputError('--background-frame: absorption frames take their dark frame as the third of --absorption-frames');
  } else {
    for (const [name, flag] of absorptionOnly) if (o[name] !== undefined) throw new InputError(`${flag}: only for raw absorption frames (--absorption-frames)`);
  }
}

/** The scenario facts the unit depends on. */
export interface MeasurementScenario {
  /** A dimensionless (Hubbard-unit) scenario: lengths in lattice spacings. */
  dimensionless: boolean;
  /** laboratory.species of the scenario, when it names one. */
  species?: unknown;
}

/**
 * The unit of the measured picture and its pixel size. `readSidecar` is asked only for a
 * single --image source (not --shots) and only when the counts per atom or the pixel size
 * is missing.
 */
export function resolveCompareMeasurement(o: CompareMeasurementOptions, scenario: MeasurementScenario, readSidecar: (imageFile: string) => SidecarScale | null): CompareMeasurement {
  const firstImage = o.image !== undefined && o.shots === undefined ? parseFrameAddress(o.image.split(',')[0].trim()).file : undefined;
  const { dimensionless } = scenario;
  const lengthUnit: 'um' | 'sites' = dimensionless ? 'sites' : 'um';
  if (dimensionless && o.pixelUm !== undefined) throw new InputError('--pixel-um: the scenario is dimensionless (lengths in lattice spacings); give the pixel size with --pixel-sites');
  if (!dimensionless && o.pixelSites !== undefined) throw new InputError('--pixel-sites: the scenario is in laboratory units; give the object-plane pixel size in µm with --pixel-um');
  if (dimensionless && o.binUm !== undefined) throw new InputError('--bin-um: the scenario is dimensionless (lengths in lattice spacings); give the bin width with --bin-sites');
  if (!dimensionless && o.binSites !== undefined) throw new InputError('--bin-sites: the scenario is in laboratory units; give the bin width in µm with --bin-um');
  const pixelOption = dimensionless ? '--pixel-sites' : '--pixel-um';
  const pixelGiven = dimensionless ? o.pixelSites : o.pixelUm;
  const binWidth = dimensionless ? o.binSites : o.binUm;
  const sidecar = firstImage !== undefined && (o.countsPerAtom === undefined || pixelGiven === undefined) ? readSidecar(firstImage) : null;
  if (pixelGiven === undefined && sidecar?.pixelSize !== undefined && sidecar.lengthUnit !== undefined && sidecar.lengthUnit !== lengthUnit) {
    throw new InputError(
      `${pixelOption}: ${sidecar.file} gives the pixel size in ${sidecar.lengthUnit === 'um' ? 'µm' : 'lattice spacings'}, but the scenario is ${dimensionless ? 'dimensionless' : 'in laboratory units'}; ` +
        `give ${pixelOption} (or compare with a scenario of the picture's kind)`,
    );
  }
  const pixelSize = pixelGiven ?? sidecar?.pixelSize;
  if (pixelSize === undefined) {
    throw new InputError(dimensionless ? '--pixel-sites: give the pixel size in lattice spacings' : '--pixel-um: give the pixel size in the object plane (camera pixel / magnification), in µm');
  }
  const measurement = o.absorptionFrames !== undefined ? absorptionSettings(o, scenario) : countsSettings(o, sidecar);
  const scaleFrom = measurement.kind === 'counts' ? (sidecar !== null ? `missing options taken from ${sidecar.file}` : 'command-line options') : 'absorption frames and the cross-section';
  return { measurement, pixelSize, ...(binWidth !== undefined ? { binWidth } : {}), scaleFrom };
}

function absorptionSettings(o: CompareMeasurementOptions, scenario: MeasurementScenario): MeasurementSettings {
  let crossSection = o.crossSection;
  let crossSectionSource = '--cross-section';
  if (crossSection === undefined) {
    const species = scenario.species;
    if (typeof species !== 'string') {
      throw new InputError(
        scenario.dimensionless
          ? '--cross-section: absorption frames need the resonant cross-section sigma0; in dimensionless mode give it in lattice spacings squared'
          : "--cross-section: absorption frames need the resonant cross-section sigma0; the scenario's species has no D2 line in the table, so give sigma0 in µm^2",
      );
    }
    try {
      const sigma = resonantCrossSection(species);
      crossSection = sigma.crossSectionUm2;
      crossSectionSource = `3 lambda^2 / 2 pi of the ${sigma.species} D2 line, lambda = ${sigma.wavelengthNm} nm (${sigma.source})${sigma.note !== undefined ? `; ${sigma.note}` : ''}`;
    } catch (err) {
      compareInputError(err, '--cross-section');
    }
  }
  return {
    kind: 'absorption',
    crossSection,
    crossSectionSource,
    ...(o.saturationCounts !== undefined ? { saturationCounts: o.saturationCounts } : {}),
    ...(o.alpha !== undefined ? { alpha: o.alpha } : {}),
    ...(o.odLimit !== undefined ? { maximumOpticalDepth: o.odLimit } : {}),
    ...(o.minProbeCounts !== undefined ? { minimumProbeCounts: o.minProbeCounts } : {}),
  };
}

function countsSettings(o: CompareMeasurementOptions, sidecar: SidecarScale | null): MeasurementSettings {
  const countsPerAtom = o.countsPerAtom ?? sidecar?.countsPerAtom;
  if (countsPerAtom === undefined) {
    throw new InputError(
      '--counts-per-atom: the measured picture has no unit; give its detected counts per atom (1 for a picture already in atoms per pixel), ' +
        'or give raw absorption frames with --absorption-frames',
    );
  }
  return { kind: 'counts', countsPerAtom, unitSource: o.countsPerAtom !== undefined ? '--counts-per-atom' : `taken from ${sidecar?.file}` };
}

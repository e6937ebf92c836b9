// Every picture a camera would record of a solved cloud (DESIGN.md section 4), as plain
// data (the files are written by src/output/cameraOutputs.ts):
//   in_situ            column density through the camera (resample to pixels, then PSF)
//   in_situ_shot       the same with seeded shot noise, when camera.noise.kind is not 'none'
//   parity_expected    parity-projected image, P_odd per site through the camera: the
//                      average of many single-site-resolved exposures (Bakr et al.,
//                      Science 329, 547 (2010); Sherson et al., Nature 467, 68 (2010))
//   parity_shot        one seeded parity-projected exposure (2D layers and chains only:
//                      in a thick 3D cloud the columns would overlap)
//   time_of_flight     the picture after the flight (timeOfFlightPicture.ts: exact free
//                      expansion at the flight time, or the far-field approximation n(k)),
//                      when the atomic mass, the lattice spacing and the site orbitals are
//                      known (laboratory mode); also shown on a log colour scale
// and the time-of-flight visibility (Gerbier et al., PRL 95, 050404 (2005)) with its
// definition, for the summary: measured on the picture and on n(k). In dimensionless mode
// only the visibility of the lattice structure factor (envelope 1) is given. Camera
// defaults: cameraOptics.ts. Without a `timeOfFlight` section: 20 ms free expansion, the
// far-field momentum grid step as the pixel, 3 Brillouin zones, visibility disks of radius
// 0.15 (2 hbar k_L).

import { objectPlanePixelUm } from './cameraResample.js';
import { addShotNoise } from './shotNoise.js';
import { streamName } from '../numerics/seededRandom.js';
import { lengthEntry, lengthUnitEntries } from './lengthKeys.js';
import { expectedParityImage, sampleParityShot } from './parityProjection.js';
import { momentumStructureFactor } from '../observables/momentumStructureFactor.js';
import { interferenceVisibility } from './interferenceVisibility.js';
import { structureFactorOnlyEnvelope, structureFactorOnlyNote } from './wannierEnvelope.js';
import { timeOfFlightPicture } from './timeOfFlightPicture.js';
import { harmonicGroundStateOrbital, siteOrbitalsForAxes, type SiteOrbital1d } from './siteOrbital.js';
import { particleHoleBondCoherence, withBondCoherence } from './particleHoleCoherence.js';
import { defaultCameraSettings, defaultTimeOfFlightSettings, type CameraSettings, type TimeOfFlightSettings } from '../scenario/imagingSchema.js';
import type { LengthUnit, PixelPicture } from './pixelPicture.js';
import { axisLetters, cameraOptics, cameraPicture, centredGrid, defaultPhotonCountsPerAtom, type CloudForImaging } from './cameraOptics.js';

/** One picture with what the files and the summary say about it. */
export interface CameraPictureEntry {
  picture: PixelPicture;
  /** file stem under images/, e.g. 'in_situ' */
  name: string;
  title: string;
  /** longer text for the sidecar */
  description: string;
  /** counts per atom when the values are whole detected counts divided by it (noisy exposures) */
  countsPerAtom?: number;
  /** suffix of the axis labels, e.g. ' after flight' */
  axisNote?: string;
  /** extra sidecar entries (e.g. flight time) */
  extra?: Record<string, unknown>;
  /** also show the picture on a logarithmic colour scale (images/<name>_log.png, colour only) */
  logView?: boolean;
  /** atoms of cells outside a fixed frame (0 for the automatic frame) */
  atomsOutside: number;
}

/** A notice about a picture that a reader must see (e.g. the far-field check of the time of flight). */
export interface CameraNotice {
  code: string;
  severity: 'warning' | 'info';
  message: string;
}

export interface CameraPictureSet {
  /** names of the two image axes, e.g. ['x', 'y'] */
  axisNames: [string, string];
  lengthUnit: LengthUnit;
  pictures: CameraPictureEntry[];
  /** summary.json "imaging" block without the per-picture list (the writer adds it with the file names) */
  summary: {
    /** 'um' or 'sites': the unit of every neutral length key (pixelSize, psfSigma, ...) */
    lengthUnit: LengthUnit['code'];
    lengthUnitNote: string;
    camera: Record<string, unknown>;
    timeOfFlight: Record<string, unknown>;
    visibility: Record<string, unknown>;
  };
  /** notices of the pictures ('warning' ones belong in the run's warnings) */
  notices: CameraNotice[];
}

function perAxis(value: number | readonly number[], dims: number): number[] {
  if (typeof value === 'number') return Array<number>(dims).fill(value);
  return value.length === 1 ? Array<number>(dims).fill(value[0]) : [...value];
}

/** All pictures of a cloud with the summary block (see the file header). */
export function cameraPictures(input: CloudForImaging, camera?: CameraSettings, tof?: TimeOfFlightSettings): CameraPictureSet {
  const dims = input.shape.length;
  const sites = input.shape.reduce((a, b) => a * b, 1);
  for (const [name, field] of [
    ['density', input.density],
    ['parityOdd', input.parityOdd],
    ['orderParameter', input.orderParameter],
  ] as const) {
    if (field.length !== sites) throw new Error(`cameraPictures: ${name} has ${field.length} values, shape [${input.shape.join(', ')}] needs ${sites}`);
  }
  const cameraUsed = camera ?? defaultCameraSettings();
  const optics = cameraOptics(input, cameraUsed);
  const keptNames: [string, string] = [axisLetters[optics.keptAxes[0]], axisLetters[optics.keptAxes[1]]];
  const grid =
    cameraUsed.framePixels !== undefined ? centredGrid(cameraUsed.framePixels[0], cameraUsed.framePixels[1], optics.pixelUm) : undefined;
  const unit = optics.lengthUnit;

  const pictures: CameraPictureEntry[] = [];
  const add = (picture: PixelPicture, description: Omit<CameraPictureEntry, 'picture' | 'atomsOutside'>, atomsOutside: number): void => {
    pictures.push({ picture, ...description, atomsOutside });
  };
  const columnNote = dims === 3 ? `summed along ${axisLetters[optics.axis]}` : 'the layer imaged face on';

  // In situ: expected, then one noisy exposure.
  const inSitu = cameraPicture(input.density, input.shape, optics, grid);
  add(
    inSitu,
    {
      name: 'in_situ',
      title: `${input.name}: in-situ column density`,
      description: `expected in-situ picture: column density (${columnNote}), resampled to camera pixels and blurred by the PSF; atoms per pixel`,
    },
    inSitu.atomsOutside,
  );
  const noise = cameraUsed.noise;
  let noiseSummary: Record<string, unknown> = { kind: 'none' };
  if (noise.kind !== 'none') {
    const countsPerAtom = noise.kind === 'atom' ? 1 : (noise.countsPerAtom ?? defaultPhotonCountsPerAtom);
    const inSituSeed = streamName(noise.seed, 'in-situ');
    const noisy = addShotNoise(inSitu.values, { seed: inSituSeed, countsPerAtom });
    add(
      { ...inSitu, values: noisy },
      {
          name: 'in_situ_shot',
        title: `${input.name}: in-situ exposure with ${noise.kind} shot noise`,
        description:
          noise.kind === 'atom'
            ? `one exposure: Poisson atom number per pixel around the expected in-situ picture (seed "${inSituSeed}")`
            : `one exposure: Poisson detected counts per pixel with ${countsPerAtom} counts per atom, divided back to atoms (seed "${inSituSeed}")`,
        countsPerAtom,
      },
      inSitu.atomsOutside,
    );
    noiseSummary = { kind: noise.kind, countsPerAtom, seed: inSituSeed };
  }

  // Parity projection: expected image, and one shot where the layer is thin enough.
  const pOdd = expectedParityImage(input.parityOdd);
  const parity = cameraPicture(pOdd, input.shape, optics, grid);
  add(
    parity,
    {
      name: 'parity_expected',
      title: `${input.name}: parity-projected image (expected)`,
      description:
        'expected single-site-resolved picture after pair loss: P_odd per site (light-assisted collisions remove atoms in pairs), ' +
        `${columnNote}, through the camera; detected atoms per pixel`,
    },
    parity.atomsOutside,
  );
  const thin = dims < 3 || input.shape[optics.axis] === 1;
  if (thin) {
    const seed = streamName(noise.seed, 'parity-shot');
    const shot = sampleParityShot(pOdd, seed);
    const shotPicture = cameraPicture(Float64Array.from(shot), input.shape, optics, grid);
    add(
      shotPicture,
      {
          name: 'parity_shot',
        title: `${input.name}: one parity-projected exposure`,
        description: `one simulated parity-projected exposure: each site bright with probability P_odd (seed "${seed}"), through the camera; detected atoms per pixel`,
        extra: { brightSites: shot.reduce((s, v) => s + v, 0) },
      },
      shotPicture.atomsOutside,
    );
  }

  // Time of flight and visibility.
  const tofUsed = tof ?? defaultTimeOfFlightSettings();
  const field = { phiRe: input.orderParameter, density: input.density, shape: input.shape };
  const bonds =
    tofUsed.strongCouplingCorrection && input.strongCoupling
      ? particleHoleBondCoherence({ shape: input.shape, imagingAxis: optics.axis, phiRe: input.orderParameter, ...input.strongCoupling })
      : undefined;
  let orbitals: [SiteOrbital1d, SiteOrbital1d] | null = null;
  if (input.orbitalAxes) orbitals = siteOrbitalsForAxes(input.orbitalAxes, optics.keptAxes);
  else if (input.wannierWidthSites !== null && input.latticeSpacingUm !== null) {
    // Only a Gaussian width is known: the harmonic-oscillator orbital of that width.
    const all = perAxis(input.wannierWidthSites, 3);
    const kept = [all[optics.keptAxes[0]], all[optics.keptAxes[1]]];
    if (kept.every((w) => w !== undefined && w > 0)) {
      orbitals = [harmonicGroundStateOrbital(kept[0] * input.latticeSpacingUm), harmonicGroundStateOrbital(kept[1] * input.latticeSpacingUm)];
    }
  }
  const definition =
    'V = (n_max - n_min) / (n_max + n_min): n_max = atoms in the four disks around the first-order peaks at k = 2 hbar k_L along +-x and +-y, ' +
    'n_min = atoms in four equal disks at the same |k| along the diagonals (Gerbier et al., PRL 95, 050404 (2005))';
  let tofSummary: Record<string, unknown>;
  let visibilitySummary: Record<string, unknown>;
  let notices: CameraNotice[] = [];
  if (input.massKg === null || input.latticeSpacingUm === null || orbitals === null) {
    // Dimensionless mode: no mass, no Wannier function; the visibility of the lattice
    // structure factor alone (envelope 1), and no picture.
    let structure = momentumStructureFactor(field, { imagingAxis: optics.axis });
    if (bonds) structure = withBondCoherence(structure, bonds);
    const v = interferenceVisibility(structure, {
      latticeSpacingUm: input.latticeSpacingUm ?? 1,
      envelope: structureFactorOnlyEnvelope,
      diskRadiusInTwoHbarKl: tofUsed.visibilityDiskRadiusInTwoHbarKl,
    });
    visibilitySummary = {
      value: v.visibility,
      measuredOn: 'the momentum distribution n(k) of the lattice structure factor (no picture: dimensionless mode)',
      definition,
      peakAtoms: v.peakAtoms,
      diagonalAtoms: v.diagonalAtoms,
      diskRadiusInTwoHbarKl: v.diskRadiusInTwoHbarKl,
      envelope: structureFactorOnlyNote,
      strongCouplingCorrection: bonds !== undefined,
    };
    tofSummary = {
      written: false,
      reason: 'the atomic mass, lattice spacing and Wannier functions are needed (laboratory mode); the visibility is still computed from the order parameter',
    };
  } else {
    const picture = timeOfFlightPicture({
      field,
      imagingAxis: optics.axis,
      massKg: input.massKg,
      latticeSpacingUm: input.latticeSpacingUm,
      orbitals,
      flightTimeMs: tofUsed.flightTimeMs,
      model: tofUsed.model,
      ...(tofUsed.cameraPixelUm !== undefined ? { objectPixelUm: objectPlanePixelUm(tofUsed.cameraPixelUm, tofUsed.magnification) } : {}),
      brillouinZones: tofUsed.brillouinZones,
      originUm: optics.originUm,
      visibilityDiskRadiusInTwoHbarKl: tofUsed.visibilityDiskRadiusInTwoHbarKl,
      ...(bonds ? { bondCoherence: bonds } : {}),
    });
    add(
      picture,
      {
        name: 'time_of_flight',
        title: `${input.name}: time of flight, ${tofUsed.flightTimeMs} ms (${picture.label})`,
        description: picture.description,
        axisNote: ' after flight',
        extra: picture.metadata,
        logView: true,
      },
      picture.atomsOutsideFrame,
    );
    visibilitySummary = {
      value: picture.visibility.visibility,
      measuredOn: `the time-of-flight picture (${picture.label})`,
      definition,
      peakAtoms: picture.visibility.peakAtoms,
      diagonalAtoms: picture.visibility.diagonalAtoms,
      diskRadiusInTwoHbarKl: picture.visibility.diskRadiusInTwoHbarKl,
      momentumDistributionValue: picture.momentumVisibility.visibility,
      momentumDistributionNote: 'the same V of the momentum distribution n(k) (the far-field limit, t -> infinity), with the same envelope',
      envelope: `|w~(k)|^2 of the site orbitals: ${orbitals[0].description}; ${orbitals[1].description}`,
      strongCouplingCorrection: picture.strongCouplingCorrection,
    };
    tofSummary = {
      written: true,
      ...picture.metadata,
      brillouinZones: tofUsed.brillouinZones,
      atomsInImage: picture.atomsInPicture,
      atomNumber: picture.atomNumber,
      notice: picture.farField.notice,
    };
    if (picture.farField.notice !== null) notices = [picture.farField.notice];
  }

  return {
    axisNames: keptNames,
    lengthUnit: unit,
    pictures,
    summary: {
      ...lengthUnitEntries(unit),
      camera: {
        settings: camera === undefined ? 'defaults (no camera section in the scenario)' : 'from the scenario',
        imagingAxis: axisLetters[optics.axis],
        magnification: cameraUsed.magnification,
        // Neutral keys in lengthUnit; ...Um keys only in laboratory mode (lengthKeys.ts).
        ...lengthEntry('cameraPixelSize', 'cameraPixelUm', optics.cameraPixel, unit),
        ...lengthEntry('objectPlanePixelSize', 'objectPlanePixelUm', optics.pixelUm, unit),
        ...lengthEntry('psfSigma', 'psfSigmaUm', optics.psfSigmaUm, unit),
        psf: optics.psfSource,
        noise: noiseSummary,
        frame: grid !== undefined ? { widthPx: grid.nx, heightPx: grid.ny } : 'automatic: the whole lattice plus 4 PSF sigmas and one pixel',
      },
      timeOfFlight: tofSummary,
      visibility: visibilitySummary,
    },
    notices,
  };
}

// Every picture a camera would record of a solved cloud (DESIGN.md section 4), as plain
// data (the files are written by src/output/cameraOutputs.ts):
//   in_situ            column density through the camera (resample to pixels, then PSF)
//   in_situ_shot       the same with seeded shot noise, when camera.noise.kind is not 'none'
//   parity_expected    parity-projected image, P_odd per site through the camera: the
//                      average of many single-site-resolved exposures (Bakr et al.,
//                      Science 329, 547 (2010); Sherson et al., Nature 467, 68 (2010))
//   parity_shot        one seeded parity-projected exposure (2D layers and chains only:
//                      in a thick 3D cloud the columns would overlap)
//   time_of_flight     far-field picture after free expansion, when the atomic mass, the
//                      lattice spacing and the Wannier width are known (laboratory mode)
// and the time-of-flight visibility (Gerbier et al., PRL 95, 050404 (2005)) with its
// definition, for the summary. Camera defaults: cameraOptics.ts. Without a
// `timeOfFlight` section: 20 ms flight, the momentum grid as the pixel grid, 3 Brillouin
// zones, visibility disks of radius 0.15 (2 hbar k_L).

import { objectPlanePixelUm, resampleToCamera } from './cameraResample.js';
import { addShotNoise } from './shotNoise.js';
import { streamName } from '../numerics/seededRandom.js';
import { expectedParityImage, sampleParityShot } from './parityProjection.js';
import { momentumStructureFactor } from '../observables/momentumStructureFactor.js';
import { timeOfFlightImage } from './timeOfFlight.js';
import { interferenceVisibility } from './interferenceVisibility.js';
import { gaussianWannierEnvelope, type MomentumEnvelope } from './wannierEnvelope.js';
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
  /** atoms of cells outside a fixed frame (0 for the automatic frame) */
  atomsOutside: number;
}

export interface CameraPictureSet {
  /** names of the two image axes, e.g. ['x', 'y'] */
  axisNames: [string, string];
  lengthUnit: LengthUnit;
  pictures: CameraPictureEntry[];
  /** summary.json "imaging" block without the per-picture list (the writer adds it with the file names) */
  summary: { lengthUnit: string; camera: Record<string, unknown>; timeOfFlight: Record<string, unknown>; visibility: Record<string, unknown> };
}

function perAxis(value: number | readonly number[], dims: number): number[] {
  if (typeof value === 'number') return Array<number>(dims).fill(value);
  return value.length === 1 ? Array<number>(dims).fill(value[0]) : [...value];
}

/** The flat envelope used for the visibility when no Wannier width is known: V depends only on equal-|k| comparisons. */
const flatEnvelope: MomentumEnvelope = { at: () => 1 };

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
  const structure = momentumStructureFactor(
    { phiRe: input.orderParameter, density: input.density, shape: input.shape },
    { imagingAxis: optics.axis },
  );
  let widths: number[] | null = null;
  if (input.wannierWidthSites !== null) {
    const all = perAxis(input.wannierWidthSites, 3);
    const kept = [all[optics.keptAxes[0]], all[optics.keptAxes[1]]];
    // A side view of a layer needs the width along the unresolved axis, which we do not know.
    widths = kept.every((w) => w !== undefined && w > 0) ? kept : null;
  }
  const envelope =
    widths !== null && input.latticeSpacingUm !== null ? gaussianWannierEnvelope([widths[0], widths[1]], input.latticeSpacingUm) : flatEnvelope;
  const visibility = interferenceVisibility(structure, {
    latticeSpacingUm: input.latticeSpacingUm ?? 1,
    envelope,
    diskRadiusInTwoHbarKl: tofUsed.visibilityDiskRadiusInTwoHbarKl,
  });
  const visibilitySummary = {
    value: visibility.visibility,
    definition:
      'V = (n_max - n_min) / (n_max + n_min): n_max = atoms in the four disks around the first-order peaks at k = 2 hbar k_L along +-x and +-y, ' +
      'n_min = atoms in four equal disks at the same |k| along the diagonals (Gerbier et al., PRL 95, 050404 (2005))',
    peakAtoms: visibility.peakAtoms,
    diagonalAtoms: visibility.diagonalAtoms,
    diskRadiusInTwoHbarKl: visibility.diskRadiusInTwoHbarKl,
    envelope:
      envelope === flatEnvelope
        ? 'none: no Wannier width is known (dimensionless mode), so the lattice structure factor alone is compared'
        : `Gaussian Wannier envelope, width l/a = ${widths?.map((w) => w.toPrecision(4)).join(', ')}`,
  };

  let tofSummary: Record<string, unknown>;
  if (input.massKg === null || input.latticeSpacingUm === null || widths === null) {
    tofSummary = {
      written: false,
      reason: 'the atomic mass, lattice spacing and Wannier width are needed (laboratory mode); the visibility is still computed from the order parameter',
    };
  } else {
    const image = timeOfFlightImage(structure, {
      latticeSpacingUm: input.latticeSpacingUm,
      massKg: input.massKg,
      flightTimeMs: tofUsed.flightTimeMs,
      envelope,
      brillouinZones: tofUsed.brillouinZones,
    });
    let picture: PixelPicture = image;
    let atomsOutside = 0;
    if (tofUsed.cameraPixelUm !== undefined) {
      const pixelUm = objectPlanePixelUm(tofUsed.cameraPixelUm, tofUsed.magnification);
      const resampled = resampleToCamera(image, {
        cellUm: image.pixelUm,
        pixelUm,
        originUm: { x: image.xCentresUm[0], y: image.yCentresUm[0] },
      });
      picture = resampled;
      atomsOutside = resampled.atomsOutside;
    }
    add(
      picture,
      {
          name: 'time_of_flight',
        title: `${input.name}: time of flight, ${tofUsed.flightTimeMs} ms`,
        description:
          `far-field density after ${tofUsed.flightTimeMs} ms of free expansion: n(k) = |w(k)|^2 [|sum_i e^{-ik.r_i} phi_i|^2 + sum_i (n_i - |phi_i|^2)] ` +
          'at k = m x / (hbar t), atoms per pixel; coordinates from the zero-momentum point',
        axisNote: ' after flight',
        extra: { flightTimeMs: tofUsed.flightTimeMs, firstOrderPeakUm: image.firstOrderPeakUm, momentumPixelPerUm: image.kStepPerUm },
      },
      atomsOutside,
    );
    tofSummary = {
      written: true,
      flightTimeMs: tofUsed.flightTimeMs,
      pixelUm: picture.pixelUm,
      firstOrderPeakUm: image.firstOrderPeakUm,
      brillouinZones: tofUsed.brillouinZones,
      atomsInImage: image.atomsInImage,
      atomNumber: image.atomNumber,
      note: 'atomsInImage falls short of the atom number by the envelope tail outside the field of view and by the overlap of neighbouring Gaussian Wannier functions',
    };
  }

  return {
    axisNames: keptNames,
    lengthUnit: unit,
    pictures,
    summary: {
      lengthUnit: unit.note,
      camera: {
        settings: camera === undefined ? 'defaults (no camera section in the scenario)' : 'from the scenario',
        imagingAxis: axisLetters[optics.axis],
        magnification: cameraUsed.magnification,
        cameraPixelUm: cameraUsed.cameraPixelUm ?? optics.pixelUm * cameraUsed.magnification,
        objectPlanePixelUm: optics.pixelUm,
        psfSigmaUm: optics.psfSigmaUm,
        psf: optics.psfSource,
        noise: noiseSummary,
        frame: grid !== undefined ? { widthPx: grid.nx, heightPx: grid.ny } : 'automatic: the whole lattice plus 4 PSF sigmas and one pixel',
      },
      timeOfFlight: tofSummary,
      visibility: visibilitySummary,
    },
  };
}

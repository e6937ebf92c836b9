// Camera pictures of a solved cloud (DESIGN.md section 4), for every solve:
//   in_situ            column density through the camera (resample to pixels, then PSF)
//   in_situ_shot       the same with seeded shot noise, when camera.noise.kind is not 'none'
//   parity_expected    parity-projected image, P_odd per site through the camera: the
//                      average of many single-site-resolved exposures (Bakr et al.,
//                      Science 329, 547 (2010); Sherson et al., Nature 467, 68 (2010))
//   parity_shot        one seeded parity-projected exposure (2D layers and chains only:
//                      in a thick 3D cloud the columns would overlap)
//   time_of_flight     far-field picture after free expansion, when the atomic mass, the
//                      lattice spacing and the Wannier width are known (laboratory mode)
// Each picture is written as .npy (atoms per pixel), 16-bit PNG + JSON sidecar, and a
// colour PNG (pictureFiles.ts). The time-of-flight visibility (Gerbier et al., PRL 95,
// 050404 (2005)) goes into the summary with its definition.
//
// Defaults for a scenario without a `camera` section, an ideal microscope just able to
// resolve single sites: magnification 1, object-plane pixel = half a lattice spacing (so
// a site spans 2 x 2 pixels), Gaussian PSF sigma = 0.5 lattice spacing (a Gaussian of
// sigma a/2 leaves about a 12 % dip between two equally bright neighbours), no noise.
// Without a `timeOfFlight` section: 20 ms flight, the momentum grid as the pixel grid,
// 3 Brillouin zones, visibility disks of radius 0.15 (2 hbar k_L).
//
// Dimensionless mode (no lattice spacing): every length is in lattice spacings, i.e.
// 1 site = 1 length unit; `...Um` settings are read in sites and the labels say 'sites'.

import { InputError } from '../scenario/inputError.js';
import { columnDensity, type ImagingAxis } from '../imaging/columnDensity.js';
import { inSituImage } from '../imaging/inSituImage.js';
import { objectPlanePixelUm, resampleToCamera, type CameraGrid } from '../imaging/cameraResample.js';
import { psfSigmaUm } from '../imaging/pointSpreadFunction.js';
import { addShotNoise } from '../imaging/shotNoise.js';
import { expectedParityImage, sampleParityShot } from '../imaging/parityProjection.js';
import { momentumStructureFactor } from '../observables/momentumStructureFactor.js';
import { timeOfFlightImage } from '../imaging/timeOfFlight.js';
import { interferenceVisibility } from '../imaging/interferenceVisibility.js';
import { gaussianWannierEnvelope, type MomentumEnvelope } from '../imaging/wannierEnvelope.js';
import {
  defaultCameraSettings,
  defaultTimeOfFlightSettings,
  type CameraSettings,
  type TimeOfFlightSettings,
} from '../scenario/imagingSchema.js';
import { latticeSites, micrometres, pictureFiles, type LengthUnit, type PixelPicture } from './pictureFiles.js';
import type { SolveArtifacts } from '../pipeline/solveScenario.js';
import type { WrittenImage } from './solveOutputs.js';

/** What the camera model needs to know about a solved cloud (plain data). */
export interface CloudForImaging {
  name: string;
  /** Lattice shape, 1 to 3 axes, first axis x. */
  shape: readonly number[];
  /** Lattice spacing, µm; null in dimensionless mode. */
  latticeSpacingUm: number | null;
  /** Atomic mass, kg; null when unknown (dimensionless mode). */
  massKg: number | null;
  /** Per-site fields, C order over `shape`. */
  density: Float64Array;
  parityOdd: Float64Array;
  orderParameter: Float64Array;
  /** Trap centre in site coordinates, one per axis. */
  trapCentre: readonly number[];
  /** Gaussian Wannier width l / a, one number or one per lattice axis; null when unknown. */
  wannierWidthSites: number | readonly number[] | null;
}

export interface CameraPictures {
  /** Colour PNGs (for the report). */
  images: WrittenImage[];
  /** .npy and 16-bit PNG files. */
  arrays: Array<{ file: string; bytes: Uint8Array }>;
  /** JSON sidecars. */
  texts: Array<{ file: string; text: string }>;
  /** Goes into summary.json under "imaging". */
  summary: Record<string, unknown>;
}

const axisLetters = ['x', 'y', 'z'] as const;

/** Default PSF width and object-plane pixel, in lattice spacings (see the file header). */
export const defaultPsfSigmaSites = 0.5;
export const defaultObjectPixelSites = 0.5;
/** Detected counts per atom for photon noise when the scenario does not say. */
export const defaultPhotonCountsPerAtom = 10;

/** The camera settings turned into numbers in the length unit of the pictures. */
export interface CameraOptics {
  /** Lattice axis summed along. */
  axis: ImagingAxis;
  /** Lattice axes that become image axes 0 and 1. */
  keptAxes: [number, number];
  /** Lattice spacing in the length unit (1 in dimensionless mode). */
  cellUm: number;
  /** Object-plane pixel, length unit. */
  pixelUm: number;
  psfSigmaUm: number;
  psfSource: string;
  lengthUnit: LengthUnit;
  /** Centre of site (0, 0) of the kept axes, so that the trap centre sits at (0, 0). */
  originUm: { x: number; y: number };
}

function imagingAxisOf(letter: 'x' | 'y' | 'z', dims: number): ImagingAxis {
  const axis = axisLetters.indexOf(letter) as ImagingAxis;
  if (dims === 3) return axis;
  // A 1D or 2D lattice lies in the x-y plane: looking along z images it face on. Looking
  // along x or y would be a side view of a single layer; allow it only where the axis exists.
  if (axis >= dims && axis !== 2) {
    throw new InputError(`camera.imagingAxis: a ${dims}D lattice has no '${letter}' axis; use 'z' (face on)`);
  }
  return axis;
}

/** Resolve camera settings against the cloud's geometry and units. */
export function cameraOptics(cloud: CloudForImaging, camera: CameraSettings = defaultCameraSettings()): CameraOptics {
  const dims = cloud.shape.length;
  const axis = imagingAxisOf(camera.imagingAxis, dims);
  const keptAxes: [number, number] = axis === 0 ? [1, 2] : axis === 1 ? [0, 2] : [0, 1];
  const laboratory = cloud.latticeSpacingUm !== null;
  const cellUm = cloud.latticeSpacingUm ?? 1;
  const pixelUm =
    camera.cameraPixelUm !== undefined ? objectPlanePixelUm(camera.cameraPixelUm, camera.magnification) : defaultObjectPixelSites * cellUm;
  let sigma: number;
  let psfSource: string;
  const psf = camera.psf;
  if (psf === undefined) {
    sigma = defaultPsfSigmaSites * cellUm;
    psfSource = `default: sigma = ${defaultPsfSigmaSites} lattice spacing`;
  } else if ('sigmaSites' in psf) {
    sigma = psf.sigmaSites * cellUm;
    psfSource = `given: sigma = ${psf.sigmaSites} lattice spacings`;
  } else if ('sigmaUm' in psf) {
    sigma = psf.sigmaUm;
    psfSource = `given: sigma = ${psf.sigmaUm} ${laboratory ? 'µm' : 'sites'}`;
  } else {
    if (!laboratory) {
      throw new InputError(
        'camera.psf: wavelengthNm and numericalAperture need the lattice spacing in micrometres (laboratory mode); ' +
          'in dimensionless mode give camera.psf.sigmaSites instead',
      );
    }
    sigma = psfSigmaUm(psf.wavelengthNm, psf.numericalAperture);
    psfSource = `sigma = 0.21 lambda / NA with lambda = ${psf.wavelengthNm} nm, NA = ${psf.numericalAperture} (Zhang et al., Appl. Opt. 46, 1819 (2007))`;
  }
  const centre = (d: number) => (d < dims ? cloud.trapCentre[d] : 0);
  return {
    axis,
    keptAxes,
    cellUm,
    pixelUm,
    psfSigmaUm: sigma,
    psfSource,
    lengthUnit: laboratory ? micrometres : latticeSites,
    originUm: { x: -centre(keptAxes[0]) * cellUm, y: -centre(keptAxes[1]) * cellUm },
  };
}

/** A grid of nx x ny pixels of size pixelUm centred on the trap centre. */
export function centredGrid(nx: number, ny: number, pixelUm: number): CameraGrid {
  return { nx, ny, firstXUm: (-(nx - 1) * pixelUm) / 2, firstYUm: (-(ny - 1) * pixelUm) / 2 };
}

/**
 * A per-site field (atoms per site) as the camera records it: column along the imaging
 * axis, area-weighted resampling to pixels, Gaussian PSF. `grid` fixes the pixel grid
 * (e.g. that of a measured image, coordinates from the trap centre).
 */
export function cameraPicture(field: Float64Array, shape: readonly number[], optics: CameraOptics, grid?: CameraGrid): PixelPicture & { atomsOutside: number } {
  const column = columnDensity(field, shape, optics.axis);
  return inSituImage(column, {
    cellUm: optics.cellUm,
    pixelUm: optics.pixelUm,
    psfSigmaUm: optics.psfSigmaUm,
    originUm: optics.originUm,
    ...(grid !== undefined ? { grid } : {}),
  });
}

function perAxis(value: number | readonly number[], dims: number): number[] {
  if (typeof value === 'number') return Array<number>(dims).fill(value);
  return value.length === 1 ? Array<number>(dims).fill(value[0]) : [...value];
}

/** The flat envelope used for the visibility when no Wannier width is known: V depends only on equal-|k| comparisons. */
const flatEnvelope: MomentumEnvelope = { at: () => 1 };

/** All pictures of a cloud, encoded, with the summary block. */
export function cameraPictures(input: CloudForImaging, camera?: CameraSettings, tof?: TimeOfFlightSettings): CameraPictures {
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

  const images: WrittenImage[] = [];
  const arrays: CameraPictures['arrays'] = [];
  const texts: CameraPictures['texts'] = [];
  const pictures: Array<Record<string, unknown>> = [];
  const add = (picture: PixelPicture, description: Parameters<typeof pictureFiles>[1], atomsOutside: number): void => {
    const files = pictureFiles(picture, description);
    images.push(files.image);
    arrays.push(...files.arrays);
    texts.push(...files.texts);
    pictures.push({
      name: description.name,
      title: description.title,
      files: [files.image.file, ...files.arrays.map((a) => a.file), ...files.texts.map((t) => t.file)],
      widthPx: picture.nx,
      heightPx: picture.ny,
      pixelUm: picture.pixelUm,
      atomsInPicture: files.sidecar.atomsInPicture,
      atomsOutsideFrame: atomsOutside,
    });
  };
  const columnNote = dims === 3 ? `summed along ${axisLetters[optics.axis]}` : 'the layer imaged face on';
  const common = { axisNames: keptNames, lengthUnit: unit } as const;

  // In situ: expected, then one noisy exposure.
  const inSitu = cameraPicture(input.density, input.shape, optics, grid);
  add(
    inSitu,
    {
      ...common,
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
    const noisy = addShotNoise(inSitu.values, { seed: `${noise.seed}/in-situ`, countsPerAtom });
    add(
      { ...inSitu, values: noisy },
      {
        ...common,
        name: 'in_situ_shot',
        title: `${input.name}: in-situ exposure with ${noise.kind} shot noise`,
        description:
          noise.kind === 'atom'
            ? `one exposure: Poisson atom number per pixel around the expected in-situ picture (seed "${noise.seed}/in-situ")`
            : `one exposure: Poisson detected counts per pixel with ${countsPerAtom} counts per atom, divided back to atoms (seed "${noise.seed}/in-situ")`,
        countsPerAtom,
      },
      inSitu.atomsOutside,
    );
    noiseSummary = { kind: noise.kind, countsPerAtom, seed: `${noise.seed}/in-situ` };
  }

  // Parity projection: expected image, and one shot where the layer is thin enough.
  const pOdd = expectedParityImage(input.parityOdd);
  const parity = cameraPicture(pOdd, input.shape, optics, grid);
  add(
    parity,
    {
      ...common,
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
    const seed = `${noise.seed}/parity-shot`;
    const shot = sampleParityShot(pOdd, seed);
    const shotPicture = cameraPicture(Float64Array.from(shot), input.shape, optics, grid);
    add(
      shotPicture,
      {
        ...common,
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
        ...common,
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

  const summary: Record<string, unknown> = {
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
    pictures,
    timeOfFlight: tofSummary,
    visibility: visibilitySummary,
  };
  return { images, arrays, texts, summary };
}

/**
 * The imaging input of a solve run. Laboratory mode supplies the mass and, per lattice
 * axis, the Gaussian width l = sqrt(2) x (rms spread of the numerical Wannier function):
 * |w(x)|^2 of the Gaussian w = (pi l^2)^(-1/4) exp(-x^2 / 2 l^2) has standard deviation
 * l / sqrt(2), so matching the spread matches the envelope's width in k.
 */
export function cloudForImaging(a: SolveArtifacts): CloudForImaging {
  const lab = a.resolved.laboratory;
  const dims = a.resolved.geometry.shape.length;
  let massKg: number | null = null;
  let wannierWidthSites: number[] | null = null;
  if (lab !== null) {
    massKg = lab.massKg;
    const spacingNm = lab.latticeSpacingUm * 1000;
    const widths = lab.hubbard.latticeAxes.slice(0, dims).map((axis) => (Math.SQRT2 * axis.wannierWidthNm) / spacingNm);
    wannierWidthSites = widths.length === dims && widths.every((w) => w > 0 && Number.isFinite(w)) ? widths : null;
  }
  return {
    name: a.scenario.name,
    shape: a.resolved.geometry.shape,
    latticeSpacingUm: a.resolved.latticeSpacingUm,
    massKg,
    density: a.fields.density,
    parityOdd: a.fields.parityOdd,
    orderParameter: a.fields.orderParameter,
    trapCentre: a.resolved.trapCentre,
    wannierWidthSites,
  };
}

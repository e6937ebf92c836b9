// The camera model turned into numbers for one cloud (DESIGN.md section 4): which lattice
// axis the camera looks along, the object-plane pixel, the point-spread function, the
// length unit of the pictures, and the in-situ picture of a per-site field on a pixel
// grid (column along the imaging axis, area-weighted resampling, Gaussian PSF).
//
// Defaults for a scenario without a `camera` section, an ideal microscope just able to
// resolve single sites: magnification 1, object-plane pixel = half a lattice spacing (so
// a site spans 2 x 2 pixels), Gaussian PSF sigma = 0.5 lattice spacing (a Gaussian of
// sigma a/2 leaves about a 12 % dip between two equally bright neighbours), no noise.
//
// Dimensionless mode (no lattice spacing): every length is in lattice spacings, i.e.
// 1 site = 1 length unit, and the labels say 'sites'; only the ...Sites settings are
// accepted there (a ...Um setting is a ParameterError naming its ...Sites twin).
// A setting that does not fit the cloud (an imaging axis a 2D lattice lacks, a PSF from
// optics without a lattice spacing) is a ParameterError naming the scenario key; the
// pipeline reports it as an input error before anything is solved.

import { ParameterError } from '../physics/parameterError.js';
import { keptAxes } from '../lattice/columnProjection.js';
import { columnDensity, type ImagingAxis } from './columnDensity.js';
import { inSituImage } from './inSituImage.js';
import { objectPlanePixelUm, type CameraGrid } from './cameraResample.js';
import { psfSigmaUm } from './pointSpreadFunction.js';
import { defaultCameraSettings, type CameraSettings } from '../scenario/imagingSchema.js';
import { latticeSites, micrometres, type LengthUnit, type PixelPicture } from './pixelPicture.js';
import type { OrbitalAxesSource } from './siteOrbital.js';
import type { ParticleHoleInput } from './particleHoleCoherence.js';

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
  /** Gaussian Wannier width l / a, one number or one per lattice axis; null when unknown (used only without orbitalAxes). */
  wannierWidthSites: number | readonly number[] | null;
  /** Lattice axes (depth, spacing) and trapped axes (oscillator length) for the site orbitals (laboratory mode). */
  orbitalAxes?: OrbitalAxesSource | null;
  /** Model arrays for the optional particle-hole correction (solver energy unit). */
  strongCoupling?: Omit<ParticleHoleInput, 'shape' | 'imagingAxis' | 'phiRe' | 'phiIm'> | null;
}

export const axisLetters = ['x', 'y', 'z'] as const;

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
  /** Camera (sensor) pixel, length unit: object-plane pixel x magnification. */
  cameraPixel: number;
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
    throw new ParameterError('camera.imagingAxis', `a ${dims}D lattice has no '${letter}' axis; use 'z' (face on)`);
  }
  return axis;
}

/** Resolve camera settings against the cloud's geometry and units. */
export function cameraOptics(cloud: CloudForImaging, camera: CameraSettings = defaultCameraSettings()): CameraOptics {
  const dims = cloud.shape.length;
  const axis = imagingAxisOf(camera.imagingAxis, dims);
  const kept = keptAxes(axis);
  const laboratory = cloud.latticeSpacingUm !== null;
  const cellUm = cloud.latticeSpacingUm ?? 1;
  if (!laboratory && camera.cameraPixelUm !== undefined) {
    throw new ParameterError('camera.cameraPixelUm', 'needs laboratory mode (a length in micrometres); in dimensionless mode give camera.cameraPixelSites');
  }
  if (!laboratory && camera.psf !== undefined && 'sigmaUm' in camera.psf) {
    throw new ParameterError('camera.psf.sigmaUm', 'needs laboratory mode (a length in micrometres); in dimensionless mode give camera.psf.sigmaSites');
  }
  const cameraPixel = camera.cameraPixelUm ?? (camera.cameraPixelSites !== undefined ? camera.cameraPixelSites * cellUm : undefined);
  const pixelUm = cameraPixel !== undefined ? objectPlanePixelUm(cameraPixel, camera.magnification) : defaultObjectPixelSites * cellUm;
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
    psfSource = `given: sigma = ${psf.sigmaUm} µm`;
  } else {
    if (!laboratory) {
      throw new ParameterError(
        'camera.psf',
        'wavelengthNm and numericalAperture need the lattice spacing in micrometres (laboratory mode); ' +
          'in dimensionless mode give camera.psf.sigmaSites instead',
      );
    }
    sigma = psfSigmaUm(psf.wavelengthNm, psf.numericalAperture);
    psfSource = `sigma = 0.21 lambda / NA with lambda = ${psf.wavelengthNm} nm, NA = ${psf.numericalAperture} (Zhang et al., Appl. Opt. 46, 1819 (2007))`;
  }
  const centre = (d: number) => (d < dims ? cloud.trapCentre[d] : 0);
  return {
    axis,
    keptAxes: kept,
    cellUm,
    pixelUm,
    cameraPixel: cameraPixel ?? pixelUm * camera.magnification,
    psfSigmaUm: sigma,
    psfSource,
    lengthUnit: laboratory ? micrometres : latticeSites,
    originUm: { x: -centre(kept[0]) * cellUm, y: -centre(kept[1]) * cellUm },
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


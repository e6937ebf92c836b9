// The time-of-flight picture of a solved cloud as a camera records it, with everything a
// reader needs to trust it: the model (finite-time free expansion or far-field approximation),
// the pixel scales in momentum, the far-field check and its notice, the visibility measured on
// the picture itself and the far-field visibility of the momentum distribution.
//
// - 'free-expansion' (freeExpansion.ts): the exact density after a free flight t of the
//   Gutzwiller state with the site orbitals, interactions neglected during the flight,
//   evaluated on the camera's pixels. What the camera sees at any t.
// - 'far-field' (timeOfFlight.ts): n(k) at k = m x / (hbar t) on the momentum grid,
//   resampled to the camera's pixels; the t -> infinity limit of the former, an approximation
//   for t below the far-field time m R^2 / hbar (timeOfFlightScales.ts).
//
// Coordinates: micrometres in the plane of the atoms after the flight, measured from the
// zero-momentum point (the projected trap centre), image axis 0 = first kept lattice axis.

import { columnDensity } from './columnDensity.js';
import { resampleToCamera } from './cameraResample.js';
import { freeExpansionImage } from './freeExpansion.js';
import { interferenceVisibility, pictureVisibility, type InterferenceVisibility, type PictureVisibility } from './interferenceVisibility.js';
import { timeOfFlightImage } from './timeOfFlight.js';
import { cloudRadiusUm, farFieldCheck, timeOfFlightScales, type FarFieldCheck, type TimeOfFlightModel, type TimeOfFlightScales } from './timeOfFlightScales.js';
import { orbitalEnvelope } from './wannierEnvelope.js';
import { withBondCoherence, type BondCoherenceColumns } from './particleHoleCoherence.js';
import type { SiteOrbital1d } from './siteOrbital.js';
import { pixelCentresUm, type PixelPicture } from './pixelPicture.js';
import { momentumStructureFactor, type OrderParameterField } from '../observables/momentumStructureFactor.js';

export interface TimeOfFlightPictureInput {
  /** phi and n per site over the lattice shape (C order). */
  field: OrderParameterField;
  /** Lattice axis the camera looks along. */
  imagingAxis: 0 | 1 | 2;
  massKg: number;
  /** Lattice spacing, um (the same along both kept axes). */
  latticeSpacingUm: number;
  /** Site orbitals along image axes 0 and 1 (siteOrbitalsForAxes). */
  orbitals: readonly [SiteOrbital1d, SiteOrbital1d];
  flightTimeMs: number;
  model: TimeOfFlightModel;
  /** Camera pixel / magnification, um; default: the far-field momentum grid step h t / (m a M). */
  objectPixelUm?: number;
  /** Brillouin zones spanned per axis by the default frame (odd); default 3. */
  brillouinZones?: number;
  /** Frame in pixels [along image axis 0, along image axis 1], centred on the zero-momentum point; default: the zones plus the cloud. */
  framePixels?: readonly [number, number];
  /** Centre of site (0, 0) of the kept axes relative to the trap centre, um; default: the lattice centre is the trap centre. */
  originUm?: { x: number; y: number };
  /** Visibility disk radius in units of 2 hbar k_L; default 0.15. */
  visibilityDiskRadiusInTwoHbarKl?: number;
  /** Optional strong-coupling bond coherences (particleHoleCoherence.ts), already column-summed for imagingAxis. */
  bondCoherence?: BondCoherenceColumns;
  /** Sub-pixel samples per pixel and axis for the free expansion; default automatic. */
  subSamplesPerPixel?: number;
}

/** Atoms per pixel in `values`, index i * ny + j, with pixel centres (um after the flight). */
export interface TimeOfFlightPicture extends PixelPicture {
  model: TimeOfFlightModel;
  /** Title suffix and sidecar description, naming the model (and 'far-field approximation' when it is one). */
  label: string;
  description: string;
  scales: TimeOfFlightScales;
  farField: FarFieldCheck;
  /** V measured on this picture (disks at the far-field peak places). */
  visibility: PictureVisibility;
  /** V of the momentum distribution n(k) (the far-field limit), with the same envelope. */
  momentumVisibility: InterferenceVisibility;
  atomsInPicture: number;
  atomNumber: number;
  /** Atoms of the momentum grid that fall outside a user-given frame (far field only). */
  atomsOutsideFrame: number;
  /** Sub-pixel samples per axis (free expansion), 1 for the far field. */
  subSamplesPerPixel: number;
  /** Whether the strong-coupling bond coherences were included. */
  strongCouplingCorrection: boolean;
  /** Entries for the picture's sidecar: units spelled out, no key read two ways. */
  metadata: Record<string, unknown>;
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString();
}

export function timeOfFlightPicture(input: TimeOfFlightPictureInput): TimeOfFlightPicture {
  const { field, imagingAxis, massKg, latticeSpacingUm: a, orbitals, flightTimeMs: t, model } = input;
  const zones = input.brillouinZones ?? 3;
  if (!Number.isInteger(zones) || zones < 1 || zones % 2 !== 1) {
    throw new RangeError(`timeOfFlightPicture: brillouinZones must be an odd integer >= 1, got ${zones}`);
  }
  const column = columnDensity(field.density, field.shape, imagingAxis);
  const origin = input.originUm ?? { x: (-(column.nx - 1) * a) / 2, y: (-(column.ny - 1) * a) / 2 };
  let structure = momentumStructureFactor(field, { imagingAxis });
  if (input.bondCoherence !== undefined) structure = withBondCoherence(structure, input.bondCoherence);
  const envelope = orbitalEnvelope(orbitals);
  const momentumVisibility = interferenceVisibility(structure, {
    latticeSpacingUm: a,
    envelope,
    ...(input.visibilityDiskRadiusInTwoHbarKl !== undefined ? { diskRadiusInTwoHbarKl: input.visibilityDiskRadiusInTwoHbarKl } : {}),
  });
  const firstOrderPeakUm = timeOfFlightScales({ objectPixelUm: 1, flightTimeMs: t, massKg, latticeSpacingUm: a }).firstOrderPeakUm;
  const gridStepUm = firstOrderPeakUm / structure.samplesPerZone;
  const pixelUm = input.objectPixelUm ?? gridStepUm;
  const frameFor = (extraUm: number): { nx: number; ny: number; firstXUm: number; firstYUm: number } => {
    const [fx, fy] = input.framePixels ?? [0, 0];
    const half = (zones * firstOrderPeakUm) / 2 + extraUm;
    const nx = fx > 0 ? fx : 2 * Math.ceil(half / pixelUm) + 1;
    const ny = fy > 0 ? fy : 2 * Math.ceil(half / pixelUm) + 1;
    return { nx, ny, firstXUm: (-(nx - 1) * pixelUm) / 2, firstYUm: (-(ny - 1) * pixelUm) / 2 };
  };

  let values: Float64Array;
  let frame: { nx: number; ny: number; firstXUm: number; firstYUm: number };
  let atomsOutsideFrame = 0;
  let subSamples = 1;
  let atomNumber = structure.atomNumber;
  let description: string;
  let label: string;
  if (model === 'free-expansion') {
    // The frame holds the zones plus the lattice's own extent (the picture is the far-field
    // pattern convolved with the cloud, roughly).
    const extent = Math.max(Math.abs(origin.x), Math.abs(origin.x + (column.nx - 1) * a), Math.abs(origin.y), Math.abs(origin.y + (column.ny - 1) * a));
    frame = frameFor(extent);
    const image = freeExpansionImage(field, {
      massKg,
      flightTimeMs: t,
      latticeSpacingUm: a,
      orbitals,
      imagingAxis,
      grid: { ...frame, pixelUm },
      originUm: origin,
      ...(input.subSamplesPerPixel !== undefined ? { subSamplesPerPixel: input.subSamplesPerPixel } : {}),
      ...(input.bondCoherence !== undefined ? { bondCoherence: input.bondCoherence } : {}),
    });
    values = image.values;
    subSamples = image.subSamplesPerPixel;
    atomNumber = image.atomNumber;
    label = 'free expansion';
    description =
      `density after a free flight of ${fmt(t)} ms (interactions neglected during the flight): exact expansion of ` +
      '|sum_i phi_i w_t(r - r_i)|^2 + sum_i (n_i - |phi_i|^2) |w_t(r - r_i)|^2 with the site orbitals ' +
      `(${orbitals[0].description}; ${orbitals[1].description})` +
      (input.bondCoherence !== undefined ? ' plus the first-order particle-hole coherence of Mott bonds' : '') +
      `, summed along the line of sight and integrated over each camera pixel (${subSamples} x ${subSamples} samples); atoms per pixel; ` +
      'coordinates from the zero-momentum point';
  } else {
    const image = timeOfFlightImage(structure, { latticeSpacingUm: a, massKg, flightTimeMs: t, envelope, brillouinZones: zones });
    if (input.objectPixelUm === undefined && input.framePixels === undefined) {
      values = image.values;
      frame = { nx: image.nx, ny: image.ny, firstXUm: image.xCentresUm[0], firstYUm: image.yCentresUm[0] };
    } else {
      frame = frameFor(0);
      const resampled = resampleToCamera(image, {
        cellUm: image.pixelUm,
        pixelUm,
        originUm: { x: image.xCentresUm[0], y: image.yCentresUm[0] },
        grid: frame,
      });
      values = resampled.values;
      atomsOutsideFrame = resampled.atomsOutside;
    }
    label = 'far-field approximation';
    description =
      `far-field approximation of the picture after ${fmt(t)} ms: n(k) = |w(k)|^2 [|sum_i e^{-ik.r_i} phi_i|^2 + sum_i (n_i - |phi_i|^2)]` +
      (input.bondCoherence !== undefined ? ' + 2 sum_bonds <b_i^+ b_j> cos(k.(r_i - r_j))' : '') +
      ` at k = m x / (hbar t), with the true Wannier envelope (${orbitals[0].description}; ${orbitals[1].description}); ` +
      'exact only for t >> m R^2 / hbar; atoms per pixel; coordinates from the zero-momentum point';
  }
  const xCentresUm = pixelCentresUm(frame.firstXUm, frame.nx, pixelUm);
  const yCentresUm = pixelCentresUm(frame.firstYUm, frame.ny, pixelUm);
  let atomsInPicture = 0;
  for (let i = 0; i < values.length; i++) atomsInPicture += values[i];
  const picture = { values, nx: frame.nx, ny: frame.ny, pixelUm, xCentresUm, yCentresUm };
  const visibility = pictureVisibility(picture, {
    firstOrderPeakUm,
    ...(input.visibilityDiskRadiusInTwoHbarKl !== undefined ? { diskRadiusInTwoHbarKl: input.visibilityDiskRadiusInTwoHbarKl } : {}),
  });
  const scales = timeOfFlightScales({ objectPixelUm: pixelUm, flightTimeMs: t, massKg, latticeSpacingUm: a });
  // Cloud radius about the trap centre (origin is site (0, 0) relative to it).
  const farField = farFieldCheck({ flightTimeMs: t, massKg, cloudRadiusUm: cloudRadiusUm(column, a, origin), model });
  const metadata: Record<string, unknown> = {
    timeOfFlightModel: model,
    modelNote:
      model === 'free-expansion'
        ? 'finite-time free expansion; interactions during the flight are neglected'
        : 'far-field approximation n(k), k = m x / (hbar t): valid for t >> farFieldTimeMs',
    flightTimeMs: t,
    objectPixelUm: scales.objectPixelUm,
    wavenumberPerPixelInverseUm: scales.wavenumberPerPixelInverseUm,
    momentumPerPixelHbarKL: scales.momentumPerPixelHbarKL,
    momentumScaleNote: 'momentum per pixel = m p / (hbar t) with p the pixel in the plane of the atoms (camera pixel / magnification); hbar k_L with k_L = pi / a',
    firstOrderPeakUm: scales.firstOrderPeakUm,
    firstOrderPeakPixels: scales.firstOrderPeakPixels,
    farFieldTimeMs: farField.farFieldTimeMs,
    cloudRadiusUm: farField.cloudRadiusUm,
    ...(model === 'free-expansion' ? { subSamplesPerPixel: subSamples } : {}),
    strongCouplingCorrection: input.bondCoherence !== undefined,
  };
  return {
    model,
    values,
    nx: frame.nx,
    ny: frame.ny,
    pixelUm,
    xCentresUm,
    yCentresUm,
    label,
    description,
    scales,
    farField,
    visibility,
    momentumVisibility,
    atomsInPicture,
    atomNumber,
    atomsOutsideFrame,
    subSamplesPerPixel: subSamples,
    strongCouplingCorrection: input.bondCoherence !== undefined,
    metadata,
  };
}

// From the raw frames of one or more shots to the measured picture the compare fit takes,
// in memory (the files are read by src/imaging/camera/frameSources.ts). Per shot, in this order:
//
// 1. hot and dead pixels replaced on every raw frame (removeHotPixels, 10 MAD);
// 2. atoms per pixel and their imaging-noise variance:
//    - absorption: optical depth from the with-atoms, probe-only and dark frames, column
//      density with the saturation term of Reinaudi et al., Opt. Lett. 32, 3143 (2007), or
//      plain Beer-Lambert when no saturation counts are given (absorptionImage.ts); pixels
//      with a weak probe or above the optical-depth limit are masked and counted;
//    - counts (fluorescence, or a picture already in atoms): (signal - background frame) /
//      counts per atom (fluorescenceImage.ts);
//    inside the region mask when one is given;
// 3. crop to the region rectangle, then a background plane fitted on the border of what is
//    left and subtracted (backgroundPlane.ts), when asked;
// 4. transpose, mirror, rotate (frameOrientation.ts), the same for every shot.
// The shots are then summarised (shotStack.ts: per-shot atoms on the pixels used in every
// shot, mean and standard-deviation pictures) and their mean, on the pixels used in every
// shot, becomes the measured picture, with its noise: for counts the counts per atom of the
// mean (M times those of one shot: Poisson counts add up), for absorption the mean
// per-pixel variance divided by M.

import { absorptionImage, type AbsorptionImage } from '../imaging/camera/absorptionImage.js';
import { fluorescenceImage } from '../imaging/camera/fluorescenceImage.js';
import { removeHotPixels } from '../imaging/camera/hotPixels.js';
import { subtractBackgroundPlane } from '../imaging/camera/backgroundPlane.js';
import { regionMask, type PixelRectangle } from '../imaging/camera/regionOfInterest.js';
import { summariseShotStack, type ShotStackSummary } from '../imaging/camera/shotStack.js';
import { orientFrame, type FrameMap, type FrameOrientation } from '../imaging/camera/frameOrientation.js';
import type { CameraWarning, PixelImage, PixelMask } from '../imaging/camera/pixelImage.js';
import { cameraToPlanar } from '../imaging/cameraConvention.js';
import { measuredFromCamera, MeasuredImageError, type MeasuredImage } from '../imaging/measuredImage.js';

export type MeasurementSettings =
  | {
      kind: 'counts';
      /** Detected counts per atom of one shot. */
      countsPerAtom: number;
      /** Where the unit came from (option or sidecar), for the outputs. */
      unitSource: string;
    }
  | {
      kind: 'absorption';
      /** Resonant cross-section in the pictures' length unit squared. */
      crossSection: number;
      crossSectionSource: string;
      saturationCounts?: number;
      alpha?: number;
      maximumOpticalDepth?: number;
      minimumProbeCounts?: number;
    };

export interface RawShot {
  /** e.g. the file (and dataset or frame) the shot came from */
  label: string;
  /** counts picture, or the with-atoms frame of an absorption shot */
  signal: PixelImage;
  /** absorption: the probe-only frame */
  probe?: PixelImage;
  /** absorption: the dark frame; counts: the background frame */
  dark?: PixelImage;
}

export interface ShotPreparation {
  /** Object-plane pixel size, length unit. */
  pixelUm: number;
  hotPixels: boolean;
  region?: { rectangle?: PixelRectangle; mask?: PixelImage };
  /** Fit and subtract a background plane on a border of this many pixels (after the crop). */
  backgroundBorderPixels?: number;
  orientation: Omit<FrameOrientation, 'crop'>;
}

export interface PreparedShot {
  label: string;
  /** Atoms in the pixels used in every shot. */
  atoms: number;
  hotPixelsReplaced: number;
  absorption?: { beerLambertAtoms: number; saturationTermAtoms: number; maskedCounts: AbsorptionImage['maskedCounts']; peakProbeSaturation: number };
  plane?: { offset: number; slopeX: number; slopeY: number; residualRms: number };
}

export interface PreparedShots {
  /** The mean of the shots, ready for the fit. */
  measured: MeasuredImage;
  /** Every shot, grid layout, atoms per pixel (NaN where masked). */
  shots: Float64Array[];
  /** Mean imaging-noise variance of one shot per pixel, grid layout (thermometry subtracts it). */
  imagingVariance: Float64Array;
  map: FrameMap;
  /** The stack in the oriented frame (camera layout): per-shot atoms, mean and spread pictures. */
  stack: ShotStackSummary;
  perShot: PreparedShot[];
  warnings: CameraWarning[];
  /** How the atoms were obtained, one sentence. */
  method: string;
  saturationCorrected: boolean | null;
}

function sameSize(option: string, a: PixelImage, b: PixelImage, what: string): void {
  if (a.width !== b.width || a.height !== b.height) {
    throw new MeasuredImageError(option, `${what} is ${b.width} x ${b.height} pixels but the first frame is ${a.width} x ${a.height}; every frame must have the same size`);
  }
}

export function prepareShots(raw: readonly RawShot[], measurement: MeasurementSettings, prep: ShotPreparation): PreparedShots {
  if (raw.length === 0) throw new MeasuredImageError('--image', 'no shot was found; give a file, a dataset, a list of files or a folder of frames');
  const first = raw[0].signal;
  const option = measurement.kind === 'absorption' ? '--absorption-frames' : '--image';
  const warningCount = new Map<string, { warning: CameraWarning; shots: number }>();
  const warn = (w: CameraWarning) => {
    const seen = warningCount.get(w.code);
    if (seen === undefined) warningCount.set(w.code, { warning: w, shots: 1 });
    else seen.shots++;
  };
  const regionMaskOf = prep.region?.mask !== undefined ? regionMask({ kind: 'mask', mask: prep.region.mask }, first.width, first.height) : undefined;
  const clean = (image: PixelImage): { image: PixelImage; replaced: number } => {
    if (!prep.hotPixels) return { image, replaced: 0 };
    const r = removeHotPixels(image);
    return { image: r.image, replaced: r.hotCount + r.coldCount };
  };
  const orientedShots: Array<{ image: PixelImage; variance: Float64Array; mask: PixelMask }> = [];
  const perShot: PreparedShot[] = [];
  let map: FrameMap | undefined;
  for (const shot of raw) {
    sameSize(option, first, shot.signal, shot.label);
    if (shot.probe !== undefined) sameSize(option, first, shot.probe, `${shot.label} (probe frame)`);
    if (shot.dark !== undefined) sameSize(option, first, shot.dark, `${shot.label} (${measurement.kind === 'absorption' ? 'dark' : 'background'} frame)`);
    const signal = clean(shot.signal);
    const dark = shot.dark !== undefined ? clean(shot.dark) : undefined;
    let replaced = signal.replaced + (dark?.replaced ?? 0);
    let atoms: Float64Array;
    let variance: Float64Array;
    let mask: PixelMask;
    const record: PreparedShot = { label: shot.label, atoms: 0, hotPixelsReplaced: 0 };
    if (measurement.kind === 'absorption') {
      if (shot.probe === undefined) throw new MeasuredImageError('--absorption-frames', `${shot.label}: an absorption shot needs its probe-only frame`);
      const probe = clean(shot.probe);
      replaced += probe.replaced;
      const image = absorptionImage(
        { withAtoms: signal.image, probeOnly: probe.image, ...(dark !== undefined ? { dark: dark.image } : {}) },
        {
          crossSectionUm2: measurement.crossSection,
          pixelAreaUm2: prep.pixelUm * prep.pixelUm,
          ...(measurement.saturationCounts !== undefined ? { saturationCounts: measurement.saturationCounts } : {}),
          ...(measurement.alpha !== undefined ? { alpha: measurement.alpha } : {}),
          ...(measurement.maximumOpticalDepth !== undefined ? { maximumOpticalDepth: measurement.maximumOpticalDepth } : {}),
          ...(measurement.minimumProbeCounts !== undefined ? { minimumProbeCounts: measurement.minimumProbeCounts } : {}),
          ...(regionMaskOf !== undefined ? { region: regionMaskOf } : {}),
        },
      );
      image.warnings.forEach(warn);
      atoms = image.atomsPerPixel;
      variance = image.atomsVariance;
      mask = image.mask;
      record.absorption = {
        beerLambertAtoms: image.beerLambertAtoms,
        saturationTermAtoms: image.saturationTermAtoms,
        maskedCounts: image.maskedCounts,
        peakProbeSaturation: image.peakProbeSaturation,
      };
    } else {
      const image = fluorescenceImage(signal.image, dark?.image, { countsPerAtom: measurement.countsPerAtom, ...(regionMaskOf !== undefined ? { region: regionMaskOf } : {}) });
      atoms = image.atomsPerPixel;
      variance = image.atomsVariance;
      mask = image.mask;
    }
    record.hotPixelsReplaced = replaced;
    const { width, height } = first;
    // Crop first, then the background plane on the border of what is left, then the rest of the orientation.
    const cropped = orientFrame({ width, height, values: atoms }, variance, mask, prep.region?.rectangle !== undefined ? { crop: prep.region.rectangle } : {});
    let values = cropped.image;
    if (prep.backgroundBorderPixels !== undefined) {
      const plane = subtractBackgroundPlane(values, { borderPixels: prep.backgroundBorderPixels, mask: cropped.mask });
      values = plane.subtracted;
      record.plane = { offset: plane.offset, slopeX: plane.slopeX, slopeY: plane.slopeY, residualRms: plane.residualRms };
    }
    const oriented = orientFrame(values, cropped.variance, cropped.mask, prep.orientation);
    map = {
      givenWidth: width,
      givenHeight: height,
      orientedWidth: oriented.map.orientedWidth,
      orientedHeight: oriented.map.orientedHeight,
      steps: [...cropped.map.steps, ...oriented.map.steps],
    };
    orientedShots.push({ image: oriented.image, variance: oriented.variance as Float64Array, mask: oriented.mask });
    perShot.push(record);
  }
  if (map === undefined) throw new Error('prepareShots: no shot');
  if (prep.hotPixels) {
    const total = perShot.reduce((s, r) => s + r.hotPixelsReplaced, 0);
    if (total > 0) warn({ code: 'hot-pixels-replaced', message: `${total} hot or dead pixel(s) replaced by the median of their neighbours` });
  }
  const M = orientedShots.length;
  const stack = summariseShotStack(orientedShots.map((s) => ({ image: s.image, mask: s.mask })));
  stack.atomsPerShot.forEach((n, k) => (perShot[k].atoms = n));
  const { width, height } = stack;
  const meanVariance = new Float64Array(width * height);
  for (const s of orientedShots) for (let i = 0; i < meanVariance.length; i++) meanVariance[i] += s.variance[i] / M;
  const meanValues = Float64Array.from(stack.meanImage.values, (v, i) => (stack.commonMask[i] !== 0 ? v : NaN));
  const measured = measuredFromCamera(
    { width, height, values: meanValues },
    {
      pixelUm: prep.pixelUm,
      ...(measurement.kind === 'counts' ? { countsPerAtom: measurement.countsPerAtom * M } : { variance: Float64Array.from(meanVariance, (v) => v / M) }),
      mask: stack.commonMask,
      shotCount: M,
      name: M === 1 ? raw[0].label : `the mean of ${M} shots`,
    },
  );
  const warnings = [...warningCount.values()].map(({ warning, shots }) => (M > 1 ? { ...warning, message: `${warning.message} (in ${shots} of ${M} shots)` } : warning));
  const saturationCorrected = measurement.kind === 'absorption' ? measurement.saturationCounts !== undefined : null;
  const method =
    measurement.kind === 'absorption'
      ? saturationCorrected
        ? `absorption imaging with the saturation term: sigma0 n = alpha ln(I0/I) + (I0 - I)/I_sat, I_sat = ${measurement.saturationCounts} counts per pixel, alpha = ${measurement.alpha ?? 1} (Reinaudi et al., Opt. Lett. 32, 3143 (2007)); sigma0 = ${measurement.crossSection} (${measurement.crossSectionSource})`
        : `absorption imaging, plain Beer-Lambert: sigma0 n = alpha ln(I0/I), alpha = ${measurement.alpha ?? 1} (no --saturation-counts given: the atom number is too low unless the probe is far below saturation); sigma0 = ${measurement.crossSection} (${measurement.crossSectionSource})`
      : `counts picture: atoms = (counts - background frame) / ${measurement.countsPerAtom} counts per atom (${measurement.unitSource})`;
  return {
    measured,
    shots: orientedShots.map((s) => cameraToPlanar({ width, height, values: Float64Array.from(s.image.values, (v, i) => (stack.commonMask[i] !== 0 ? v : NaN)) }).values),
    imagingVariance: cameraToPlanar({ width, height, values: meanVariance }).values,
    map,
    stack,
    perShot,
    warnings,
    method,
    saturationCorrected,
  };
}

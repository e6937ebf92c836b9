// The shots `compare` is pointed at, from the option values to prepared shots in atoms per
// pixel: the frames are read (src/imaging/camera/frameSources.ts), paired into raw shots
// (with-atoms, probe and dark frames, or a picture and its background frame), the region mask
// is read, and measuredShots.ts prepares them. Three ways to give shots:
// - --shots FILES: one file per shot, each role (--image, the frames of --absorption-frames,
//   --background-frame) an address inside it (HDF5 dataset path or frame index);
// - --absorption-frames A,P[,D]: every frame of A is a shot; P and D give one frame for all
//   shots or one per shot;
// - --image SOURCES: every frame is a shot; --background-frame as P above.
// Every fault is an InputError naming the option.

import { readFrameSource, readFrameSources, readShotFrames, shotFiles } from '../imaging/camera/frameSources.js';
import type { PixelImage } from '../imaging/camera/pixelImage.js';
import type { PixelRectangle } from '../imaging/camera/regionOfInterest.js';
import { InputError } from '../scenario/inputError.js';
import { compareInputError } from './compareInputErrors.js';
import { absorptionRoles } from './compareMeasurement.js';
import { prepareShots, type MeasurementSettings, type PreparedShots, type RawShot, type ShotPreparation } from './measuredShots.js';

/** The option values that name the frames. */
export interface CompareShotSources {
  image?: string;
  absorptionFrames?: string;
  backgroundFrame?: string;
  shots?: string;
  regionMask?: string;
}

export interface RawShotSet {
  shots: RawShot[];
  /** Format of the first file, e.g. 'tiff uint16', or the number of shot files. */
  format: string;
  /** Every file and folder read. */
  inputs: string[];
}

/** Pairs one frame list with the signal frames: one frame for all shots or one per shot. */
export function perShot(frames: PixelImage[], count: number, option: string, what: string): (k: number) => PixelImage {
  if (frames.length !== 1 && frames.length !== count) {
    throw new InputError(`${option}: ${frames.length} ${what} frame(s) for ${count} shot(s); give one for all shots or one per shot`);
  }
  return (k) => frames[frames.length === 1 ? 0 : k];
}

/** The raw shots named by the options (files read here). */
export async function readRawShots(o: CompareShotSources): Promise<RawShotSet> {
  const absorption = o.absorptionFrames !== undefined;
  const option = absorption ? '--absorption-frames' : '--image';
  const roles = absorption ? absorptionRoles(o.absorptionFrames as string) : [(o.image as string).trim()];
  if (o.shots !== undefined) {
    const files = shotFiles(o.shots, '--shots');
    const all = [...roles, ...(o.backgroundFrame !== undefined ? [o.backgroundFrame] : [])];
    const shots: RawShot[] = [];
    for (const file of files) {
      const frames = await readShotFrames(file, all, option);
      shots.push({
        label: file,
        signal: frames[0],
        ...(absorption ? { probe: frames[1], ...(roles.length === 3 ? { dark: frames[2] } : {}) } : o.backgroundFrame !== undefined ? { dark: frames[1] } : {}),
      });
    }
    return { shots, format: `${files.length} shot file(s)`, inputs: o.shots.split(',').map((s) => s.trim()) };
  }
  if (absorption) {
    const [withAtoms, probe, dark] = await Promise.all(roles.map((r) => readFrameSource(r, '--absorption-frames')));
    const K = withAtoms.frames.length;
    const probeOf = perShot(probe.frames, K, '--absorption-frames', 'probe');
    const darkOf = dark !== undefined ? perShot(dark.frames, K, '--absorption-frames', 'dark') : undefined;
    const shots = withAtoms.frames.map((signal, k) => ({ label: withAtoms.labels[k], signal, probe: probeOf(k), ...(darkOf !== undefined ? { dark: darkOf(k) } : {}) }));
    return { shots, format: withAtoms.format, inputs: [...withAtoms.inputs, ...probe.inputs, ...(dark?.inputs ?? [])] };
  }
  const images = await readFrameSources(o.image as string, '--image');
  const background = o.backgroundFrame !== undefined ? await readFrameSource(o.backgroundFrame, '--background-frame') : undefined;
  const backgroundOf = background !== undefined ? perShot(background.frames, images.frames.length, '--background-frame', 'background') : undefined;
  const shots = images.frames.map((signal, k) => ({ label: images.labels[k], signal, ...(backgroundOf !== undefined ? { dark: backgroundOf(k) } : {}) }));
  return { shots, format: images.format, inputs: [...images.inputs, ...(background?.inputs ?? [])] };
}

/** What is done to every shot; the region mask picture is read from --region-mask. */
export type ShotPreparationOptions = Omit<ShotPreparation, 'region'> & { region?: PixelRectangle };

export interface CompareShots extends RawShotSet {
  prepared: PreparedShots;
  /** The preparation as applied (with the region mask picture), for the outputs. */
  preparation: ShotPreparation;
}

/** Reads the frames and the region mask, then prepares the shots (measuredShots.ts). */
export async function readCompareShots(o: CompareShotSources, measurement: MeasurementSettings, options: ShotPreparationOptions): Promise<CompareShots> {
  const raw = await readRawShots(o);
  const regionMaskImage = o.regionMask !== undefined ? (await readFrameSource(o.regionMask, '--region-mask')).frames[0] : undefined;
  const { region, ...rest } = options;
  const preparation: ShotPreparation = {
    pixelUm: rest.pixelUm,
    hotPixels: rest.hotPixels,
    ...(region !== undefined || regionMaskImage !== undefined ? { region: { ...(region !== undefined ? { rectangle: region } : {}), ...(regionMaskImage !== undefined ? { mask: regionMaskImage } : {}) } } : {}),
    ...(rest.backgroundBorderPixels !== undefined ? { backgroundBorderPixels: rest.backgroundBorderPixels } : {}),
    orientation: rest.orientation,
  };
  try {
    return { ...raw, prepared: prepareShots(raw.shots, measurement, preparation), preparation };
  } catch (err) {
    compareInputError(err, o.absorptionFrames !== undefined ? '--absorption-frames' : '--image');
  }
}

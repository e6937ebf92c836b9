// The files of the camera pictures (src/imaging/cameraPictures.ts) of a cloud: for each
// picture a .npy (atoms per pixel), a 16-bit PNG with its JSON sidecar and a colour PNG
// (pictureFiles.ts), and the "imaging" block of summary.json with the file names.
// Writers only: the pictures and the visibility are computed in src/imaging.

import type { CameraPictureSet } from '../imaging/cameraPictures.js';
import { lengthEntry } from '../imaging/lengthKeys.js';
import { colourPictureFigure, pictureFiles } from './pictureFiles.js';
import { figureImage, type WrittenImage } from './solveOutputs.js';
import type { ImageEntry } from './fieldIndex.js';

/** Decades of the logarithmic colour scale of a picture's log view (the far wings of a time-of-flight picture). */
export const LOG_VIEW_DECADES = 4;

export interface CameraPictureFiles {
  /** Colour PNGs (for the report). */
  images: WrittenImage[];
  /** .npy and 16-bit PNG files. */
  arrays: Array<{ file: string; bytes: Uint8Array }>;
  /** JSON sidecars. */
  texts: Array<{ file: string; text: string }>;
  /** Goes into summary.json under "imaging". */
  summary: Record<string, unknown>;
  /** Each file with its unit and meaning (summary.json "images"). */
  index: ImageEntry[];
}

export function cameraPictureFiles(set: CameraPictureSet): CameraPictureFiles {
  const images: WrittenImage[] = [];
  const arrays: CameraPictureFiles['arrays'] = [];
  const texts: CameraPictureFiles['texts'] = [];
  const pictures: Array<Record<string, unknown>> = [];
  const index: ImageEntry[] = [];
  for (const entry of set.pictures) {
    const { picture, atomsOutside, logView, ...description } = entry;
    const files = pictureFiles(picture, { ...description, axisNames: set.axisNames, lengthUnit: set.lengthUnit });
    images.push(files.image);
    const logFile = `images/${entry.name}_log.png`;
    if (logView === true) {
      // Colour only: the .npy and the 16-bit PNG of the picture hold the numbers.
      const title = `${entry.title}, log scale (${LOG_VIEW_DECADES} decades)`;
      const svg = colourPictureFigure(picture, {
        title,
        quantity: 'atoms per pixel (log scale)',
        axisNames: set.axisNames,
        lengthUnit: set.lengthUnit,
        ...(entry.axisNote !== undefined ? { axisNote: entry.axisNote } : {}),
        colorScale: 'log',
        logDecades: LOG_VIEW_DECADES,
      });
      images.push(figureImage(logFile, title, svg));
    }
    arrays.push(...files.arrays);
    texts.push(...files.texts);
    const sidecarFile = files.texts[0]?.file;
    const meta = sidecarFile !== undefined ? { sidecar: sidecarFile } : {};
    index.push(
      { file: files.image.file, meaning: `${entry.title} (colour view)`, unit: 'atoms per pixel (colour bar)', ...meta },
      ...(logView === true ? [{ file: logFile, meaning: `${entry.title} on a logarithmic colour scale, ${LOG_VIEW_DECADES} decades (colour view only)`, unit: 'atoms per pixel (colour bar)', ...meta }] : []),
      ...files.arrays.map((f) => ({
        file: f.file,
        meaning: f.file.endsWith('.npy') ? entry.description : `${entry.title}: 16-bit grey levels (atoms = grey level x atomsPerGreyLevel of the sidecar)`,
        unit: f.file.endsWith('.npy') ? 'atoms per pixel' : 'grey level',
        ...meta,
      })),
    );
    pictures.push({
      name: entry.name,
      title: entry.title,
      files: [files.image.file, ...(logView === true ? [logFile] : []), ...files.arrays.map((a) => a.file), ...files.texts.map((t) => t.file)],
      widthPx: picture.nx,
      heightPx: picture.ny,
      ...lengthEntry('pixelSize', 'pixelUm', picture.pixelUm, set.lengthUnit),
      atomsInPicture: files.sidecar.atomsInPicture,
      atomsOutsideFrame: atomsOutside,
    });
  }
  const { lengthUnit, lengthUnitNote, camera, timeOfFlight, visibility } = set.summary;
  return { images, arrays, texts, summary: { lengthUnit, lengthUnitNote, camera, pictures, timeOfFlight, visibility }, index };
}

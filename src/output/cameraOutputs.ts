// The files of the camera pictures (src/imaging/cameraPictures.ts) of a cloud: for each
// picture a .npy (atoms per pixel), a 16-bit PNG with its JSON sidecar and a colour PNG
// (pictureFiles.ts), and the "imaging" block of summary.json with the file names.
// Writers only: the pictures and the visibility are computed in src/imaging.

import type { CameraPictureSet } from '../imaging/cameraPictures.js';
import { pictureFiles } from './pictureFiles.js';
import type { WrittenImage } from './solveOutputs.js';

export interface CameraPictureFiles {
  /** Colour PNGs (for the report). */
  images: WrittenImage[];
  /** .npy and 16-bit PNG files. */
  arrays: Array<{ file: string; bytes: Uint8Array }>;
  /** JSON sidecars. */
  texts: Array<{ file: string; text: string }>;
  /** Goes into summary.json under "imaging". */
  summary: Record<string, unknown>;
}

export function cameraPictureFiles(set: CameraPictureSet): CameraPictureFiles {
  const images: WrittenImage[] = [];
  const arrays: CameraPictureFiles['arrays'] = [];
  const texts: CameraPictureFiles['texts'] = [];
  const pictures: Array<Record<string, unknown>> = [];
  for (const entry of set.pictures) {
    const { picture, atomsOutside, ...description } = entry;
    const files = pictureFiles(picture, { ...description, axisNames: set.axisNames, lengthUnit: set.lengthUnit });
    images.push(files.image);
    arrays.push(...files.arrays);
    texts.push(...files.texts);
    pictures.push({
      name: entry.name,
      title: entry.title,
      files: [files.image.file, ...files.arrays.map((a) => a.file), ...files.texts.map((t) => t.file)],
      widthPx: picture.nx,
      heightPx: picture.ny,
      pixelUm: picture.pixelUm,
      atomsInPicture: files.sidecar.atomsInPicture,
      atomsOutsideFrame: atomsOutside,
    });
  }
  const { lengthUnit, camera, timeOfFlight, visibility } = set.summary;
  return { images, arrays, texts, summary: { lengthUnit, camera, pictures, timeOfFlight, visibility } };
}

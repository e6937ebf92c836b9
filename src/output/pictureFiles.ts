// The files of one camera picture: the quantitative float image (.npy, atoms per pixel),
// a 16-bit greyscale PNG with its scale in a JSON sidecar, and a colour PNG for viewing
// (colour bar, scale bar, title). Writers only: the picture itself comes from
// the camera model (src/imaging/cameraPictures.ts) or the compare fit.
//
// Orientation, the same in every file: the camera convention a[row, col], column = image x
// growing to the right, row = image y with row 0 at the top (y grows upwards, rows count
// downwards), as camera software, numpy's imshow and the PNG specification (section 4.1:
// rows from the top) have it. The .npy has shape (ny, nx), the 16-bit PNG and the colour
// PNG show the same layout, so picture point (x index i, y index j) is array element
// [ny - 1 - j, i] in all three. The sidecar states this (`arrayOrder`, `orientation`) and
// where the bottom-left pixel sits. (Lattice fields under fields/ keep the lattice's axis
// order (x, y, z); only pictures follow the camera.)
//
// Grey levels: grey = round(value / atomsPerGreyLevel), clipped to 0 .. 65535. When the
// picture holds whole detected counts (a noisy exposure with c counts per atom) and they
// fit in 16 bits, atomsPerGreyLevel = 1 / c and the PNG stores the counts exactly;
// otherwise the largest value maps to 65535 and the quantisation error is at most half a
// grey level.

import { encodeNpy } from '../formats/npy.js';
import { encodeGray16 } from '../formats/pngCodec.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import type { LengthUnit, PixelPicture } from '../imaging/pixelPicture.js';
import { lengthEntry, lengthUnitEntries } from '../imaging/lengthKeys.js';
import type { WrittenImage } from './solveOutputs.js';

export interface PictureDescription {
  /** File stem under images/, e.g. 'in_situ'. */
  name: string;
  /** Title of the colour figure and of the report entry. */
  title: string;
  /** Longer text for the sidecar. */
  description: string;
  /** Colour bar label, default 'atoms per pixel'. */
  quantity?: string;
  /** Axis names of the two image axes, e.g. ['x', 'y']. */
  axisNames: readonly [string, string];
  /** Suffix for the axis labels, e.g. ' after 20 ms'. */
  axisNote?: string;
  lengthUnit: LengthUnit;
  /** Counts per atom when the values are whole detected counts divided by it (noisy exposures). */
  countsPerAtom?: number;
  colorMap?: string;
  /** Extra entries for the sidecar (e.g. flight time). */
  extra?: Record<string, unknown>;
}

export interface PictureFiles {
  image: WrittenImage;
  arrays: Array<{ file: string; bytes: Uint8Array }>;
  texts: Array<{ file: string; text: string }>;
  /** The sidecar contents (also in texts), for summaries. */
  sidecar: Record<string, unknown>;
}

const greyMax = 65535;

/** Grey levels of a picture and the scale that turns them back into atoms. */
export function quantiseGray16(values: Float64Array, countsPerAtom?: number): { gray: Uint16Array; atomsPerGreyLevel: number; clippedPixels: number } {
  let max = 0;
  let integerCounts = countsPerAtom !== undefined;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v > max) max = v;
    if (integerCounts) {
      const c = v * (countsPerAtom as number);
      if (Math.abs(c - Math.round(c)) > 1e-6) integerCounts = false;
    }
  }
  let atomsPerGreyLevel: number;
  if (integerCounts && max * (countsPerAtom as number) <= greyMax + 0.5) atomsPerGreyLevel = 1 / (countsPerAtom as number);
  else atomsPerGreyLevel = max > 0 ? max / greyMax : 1;
  const gray = new Uint16Array(values.length);
  let clippedPixels = 0;
  for (let i = 0; i < values.length; i++) {
    const level = Math.round(values[i] / atomsPerGreyLevel);
    if (level < 0 || level > greyMax || !Number.isFinite(level)) clippedPixels++;
    gray[i] = Number.isFinite(level) ? Math.min(greyMax, Math.max(0, level)) : 0;
  }
  return { gray, atomsPerGreyLevel, clippedPixels };
}

/** The one statement of the picture layout, written into every sidecar. */
export const PICTURE_ARRAY_ORDER = 'row = y (top first), column = x';

/** Picture element (i, j) (x index i, y index j, y up) -> sample at column i, row ny - 1 - j from the top. */
export function toPngRowOrder<T extends Uint16Array | Float64Array>(values: T, nx: number, ny: number, out: T): T {
  for (let i = 0; i < nx; i++) for (let j = 0; j < ny; j++) out[(ny - 1 - j) * nx + i] = values[i * ny + j];
  return out;
}

/** A 1-2-5 length of at most a fifth of the extent, for the scale bar. */
export function scaleBarLength(extent: number): number {
  const target = extent / 5;
  if (!(target > 0) || !Number.isFinite(target)) return 1;
  const decade = 10 ** Math.floor(Math.log10(target));
  for (const m of [5, 2, 1]) if (m * decade <= target) return m * decade;
  return decade;
}

function formatLength(x: number): string {
  return Number(x.toPrecision(3)).toString();
}

export interface ColourPictureOptions {
  title: string;
  quantity: string;
  axisNames: readonly [string, string];
  axisNote?: string;
  lengthUnit: LengthUnit;
  colorMap?: string;
  symmetricRange?: boolean;
  /** Fixed colour scale, e.g. shared by two pictures shown side by side. */
  valueRange?: { min: number; max: number };
  /** Smallest length of the image's longer side, pixels (default 420; smaller for pictures shown side by side). */
  minImagePx?: number;
  maxImagePx?: number;
  /** 'log': logarithmic colour scale over `logDecades` decades below the maximum (default linear). */
  colorScale?: 'linear' | 'log';
  logDecades?: number;
}

/** Colour figure of a picture (SVG): axes in the length unit, colour bar, scale bar, title. */
export function colourPictureFigure(picture: PixelPicture, options: ColourPictureOptions): string {
  const unit = options.lengthUnit.short;
  const note = options.axisNote ?? '';
  const extent = picture.nx * picture.pixelUm;
  const bar = scaleBarLength(extent);
  return renderFieldMapSvg({
    values: picture.values,
    nx: picture.nx,
    ny: picture.ny,
    title: options.title,
    xAxis: { label: `${options.axisNames[0]}${note} (${unit})`, origin: picture.xCentresUm[0], step: picture.pixelUm },
    yAxis: { label: `${options.axisNames[1]}${note} (${unit})`, origin: picture.yCentresUm[0], step: picture.pixelUm },
    colorBarLabel: options.quantity,
    scaleBar: { length: bar, label: `${formatLength(bar)} ${unit}` },
    ...(options.colorMap !== undefined ? { colorMap: options.colorMap } : {}),
    ...(options.symmetricRange !== undefined ? { symmetricRange: options.symmetricRange } : {}),
    ...(options.valueRange !== undefined ? { valueRange: options.valueRange } : {}),
    ...(options.minImagePx !== undefined ? { minImagePx: options.minImagePx } : {}),
    ...(options.maxImagePx !== undefined ? { maxImagePx: options.maxImagePx } : {}),
    ...(options.colorScale !== undefined ? { colorScale: options.colorScale } : {}),
    ...(options.logDecades !== undefined ? { logDecades: options.logDecades } : {}),
  });
}

/** The colour figure rendered to an 8-bit PNG. */
export function colourPicturePng(picture: PixelPicture, options: ColourPictureOptions): Uint8Array {
  return svgToPng(colourPictureFigure(picture, options));
}

/** The .npy, 16-bit PNG, sidecar and colour PNG of one picture (paths under images/). */
export function pictureFiles(picture: PixelPicture, d: PictureDescription): PictureFiles {
  const { nx, ny, values } = picture;
  const quantity = d.quantity ?? 'atoms per pixel';
  const npyFile = `images/${d.name}.npy`;
  const grayFile = `images/${d.name}.gray16.png`;
  const sidecarFile = `images/${d.name}.json`;
  const colourFile = `images/${d.name}.png`;

  const q = quantiseGray16(values, d.countsPerAtom);
  const rows = toPngRowOrder(q.gray, nx, ny, new Uint16Array(nx * ny));
  const floatRows = toPngRowOrder(values, nx, ny, new Float64Array(nx * ny));
  let total = 0;
  for (let i = 0; i < values.length; i++) total += values[i];
  const sidecar: Record<string, unknown> = {
    title: d.title,
    description: d.description,
    quantity,
    files: { float: `${d.name}.npy`, gray16: `${d.name}.gray16.png`, colour: `${d.name}.png` },
    atomsPerGreyLevel: q.atomsPerGreyLevel,
    greyToAtoms: 'atoms in a pixel = grey level x atomsPerGreyLevel',
    clippedPixels: q.clippedPixels,
    widthPx: nx,
    heightPx: ny,
    // Lengths under neutral keys with their unit; ...Um keys only when they are micrometres (lengthKeys.ts).
    ...lengthEntry('pixelSize', 'pixelUm', picture.pixelUm, d.lengthUnit),
    ...lengthUnitEntries(d.lengthUnit),
    ...lengthEntry('firstPixelCentre', 'firstPixelCentreUm', { x: picture.xCentresUm[0], y: picture.yCentresUm[0] }, d.lengthUnit),
    arrayOrder: PICTURE_ARRAY_ORDER,
    shape: [ny, nx],
    origin: 'coordinates are measured from the trap centre (in-situ) or from the zero-momentum point (time of flight)',
    orientation:
      `camera convention a[row, col]: the .npy has shape (${ny}, ${nx}) (rows, columns), column = ${d.axisNames[0]} growing to the right, ` +
      `row = ${d.axisNames[1]} with row 0 at the top (${d.axisNames[1]} grows upwards); the 16-bit PNG and the colour PNG show the same layout; ` +
      `the bottom-left pixel, a[${ny - 1}, 0], is centred at firstPixelCentre`,
    atomsInPicture: total,
    ...(d.countsPerAtom !== undefined ? { countsPerAtom: d.countsPerAtom } : {}),
    ...(d.extra ?? {}),
  };
  const svg = colourPictureFigure(picture, {
    title: d.title,
    quantity,
    axisNames: d.axisNames,
    lengthUnit: d.lengthUnit,
    ...(d.axisNote !== undefined ? { axisNote: d.axisNote } : {}),
    ...(d.colorMap !== undefined ? { colorMap: d.colorMap } : {}),
  });
  return {
    image: { file: colourFile, title: d.title, svg, png: svgToPng(svg) },
    arrays: [
      { file: npyFile, bytes: encodeNpy(floatRows, [ny, nx]) },
      { file: grayFile, bytes: encodeGray16(nx, ny, rows) },
    ],
    texts: [{ file: sidecarFile, text: `${JSON.stringify(sidecar, null, 2)}\n` }],
    sidecar,
  };
}

// A measured camera image brought into the project's picture convention: a PlanarField in
// atoms per pixel, axis 0 = image x (to the right), axis 1 = image y (upwards), with the
// pixel size in the object plane. Pure: takes the file bytes, never touches the disk.
//
// Formats:
// - NumPy .npy (NEP 1), any numeric dtype (decodeNpy converts to float64), C order,
//   2 axes (singleton axes are dropped). Read as tiercake writes its own pictures:
//   axis 0 = x, axis 1 = y. A camera frame stored as rows from the top (row = -y) and
//   columns (x) therefore appears turned: use rotateDeg = 270 (or flip and rotate) to bring
//   it upright. Values are atoms per pixel, or counts when countsPerAtom is given.
// - PNG (W3C PNG 2nd ed.), greyscale, 8 or 16 bits: grey levels are counts, atoms =
//   grey / countsPerAtom (required). Column c, row r from the top is pixel
//   (x = c, y = height - 1 - r), so a PNG shows the cloud as it appears on screen, and
//   tiercake's own 16-bit pictures read back unchanged.
//
// Orientation is applied after reading, in this order: mirror x -> -x (flipX), then
// rotate counter-clockwise by rotateDeg as seen with x right and y up.

import { decodeNpy, NpyFormatError } from '../formats/npy.js';
import { decodePng, pngSignature } from '../formats/pngCodec.js';
import type { PlanarField } from './planarField.js';
import { ParameterError } from '../physics/parameterError.js';

export type RotationDeg = 0 | 90 | 180 | 270;

export interface MeasuredImageOptions {
  /** Pixel size in the object plane (camera pixel / magnification), µm (lattice spacings in dimensionless mode). */
  pixelUm: number;
  /** Detected counts per atom; required for PNG, optional for .npy (values are then counts). */
  countsPerAtom?: number;
  /** Counter-clockwise rotation, degrees (0, 90, 180, 270). */
  rotateDeg?: number;
  /** Mirror the x axis before rotating. */
  flipX?: boolean;
}

export interface MeasuredImage extends PlanarField {
  /** Object-plane pixel size, as given. */
  pixelUm: number;
  format: 'npy' | 'png';
  /** Counts per atom used to convert (1 when the values were atoms already). */
  countsPerAtom: number;
  /** Size of the file's array before orientation, [axis 0, axis 1] (PNG: [width, height]). */
  sourceShape: [number, number];
  rotateDeg: RotationDeg;
  flipX: boolean;
  /** Sum over all pixels, atoms. */
  totalAtoms: number;
}

/** An error in the measured image or in an option about it; `option` names the command-line option. */
export class MeasuredImageError extends ParameterError {
  constructor(option: string, message: string) {
    super(option, message);
    this.name = 'MeasuredImageError';
  }

  get option(): string {
    return this.parameter;
  }
}

const npyMagic = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

function detectFormat(bytes: Uint8Array, fileName: string): 'npy' | 'png' {
  if (bytes.length >= 6 && npyMagic.every((b, i) => bytes[i] === b)) return 'npy';
  if (bytes.length >= 8 && pngSignature.every((b, i) => bytes[i] === b)) return 'png';
  throw new MeasuredImageError('--image', `${fileName} is neither a NumPy .npy file nor a PNG (checked the first bytes); save the frame as .npy or 16-bit greyscale PNG`);
}

function normaliseRotation(deg: number | undefined): RotationDeg {
  const d = deg ?? 0;
  if (!Number.isInteger(d) || d % 90 !== 0) {
    throw new MeasuredImageError('--rotate', `expected 0, 90, 180 or 270 degrees (counter-clockwise), got ${d}`);
  }
  return (((d % 360) + 360) % 360) as RotationDeg;
}

/** Flip x, then rotate counter-clockwise (x right, y up). */
export function orientField(field: PlanarField, rotateDeg: RotationDeg, flipX: boolean): PlanarField {
  const { nx, ny, values } = field;
  const swap = rotateDeg === 90 || rotateDeg === 270;
  const outNx = swap ? ny : nx;
  const outNy = swap ? nx : ny;
  const out = new Float64Array(values.length);
  for (let i = 0; i < nx; i++) {
    const x = flipX ? nx - 1 - i : i;
    for (let j = 0; j < ny; j++) {
      // (x, y) -> rotated: 90: (-y, x); 180: (-x, -y); 270: (y, -x), shifted into range.
      let u: number;
      let v: number;
      if (rotateDeg === 0) [u, v] = [x, j];
      else if (rotateDeg === 90) [u, v] = [ny - 1 - j, x];
      else if (rotateDeg === 180) [u, v] = [nx - 1 - x, ny - 1 - j];
      else [u, v] = [j, nx - 1 - x];
      out[u * outNy + v] = values[i * ny + j];
    }
  }
  return { values: out, nx: outNx, ny: outNy };
}

/** Decode a measured image file (its bytes) into atoms per pixel in the project's orientation. */
export function decodeMeasuredImage(bytes: Uint8Array, fileName: string, options: MeasuredImageOptions): MeasuredImage {
  const { pixelUm } = options;
  if (!(pixelUm > 0) || !Number.isFinite(pixelUm)) {
    throw new MeasuredImageError('--pixel-um', `expected the object-plane pixel size (camera pixel / magnification) as a positive number, got ${pixelUm}`);
  }
  if (options.countsPerAtom !== undefined && !(options.countsPerAtom > 0 && Number.isFinite(options.countsPerAtom))) {
    throw new MeasuredImageError('--counts-per-atom', `expected a positive number of detected counts per atom, got ${options.countsPerAtom}`);
  }
  const rotateDeg = normaliseRotation(options.rotateDeg);
  const flipX = options.flipX ?? false;
  const format = detectFormat(bytes, fileName);

  let raw: PlanarField;
  let countsPerAtom = options.countsPerAtom ?? 1;
  if (format === 'npy') {
    let decoded;
    try {
      decoded = decodeNpy(bytes, fileName);
    } catch (err) {
      if (err instanceof NpyFormatError) throw new MeasuredImageError('--image', err.message);
      throw err;
    }
    const axes = decoded.shape.filter((n) => n !== 1);
    if (decoded.shape.length < 1 || axes.length > 2) {
      throw new MeasuredImageError('--image', `${fileName} holds an array of shape (${decoded.shape.join(', ')}); expected one 2D frame`);
    }
    const nx = axes.length === 0 ? 1 : axes[0];
    const ny = axes.length === 2 ? axes[1] : 1;
    raw = { values: decoded.data, nx, ny };
  } else {
    if (options.countsPerAtom === undefined) {
      throw new MeasuredImageError(
        '--counts-per-atom',
        `${fileName} is a PNG of grey levels; give the detected counts per atom (grey levels per atom) to turn it into atoms`,
      );
    }
    let png;
    try {
      png = decodePng(bytes);
    } catch (err) {
      throw new MeasuredImageError('--image', `${fileName}: ${(err as Error).message}`);
    }
    if (png.channelCount !== 1 && png.channelCount !== 2) {
      throw new MeasuredImageError('--image', `${fileName} is a colour PNG; a measurement must be greyscale (export the raw frame as 16-bit greyscale PNG or .npy)`);
    }
    const { width, height } = png;
    const values = new Float64Array(width * height);
    for (let r = 0; r < height; r++) for (let c = 0; c < width; c++) values[c * height + (height - 1 - r)] = png.gray[r * width + c];
    raw = { values, nx: width, ny: height };
  }
  if (raw.nx * raw.ny < 9) {
    throw new MeasuredImageError('--image', `${fileName} has only ${raw.nx} x ${raw.ny} pixels; a cloud image needs at least 3 x 3`);
  }
  let bad = 0;
  for (let i = 0; i < raw.values.length; i++) if (!Number.isFinite(raw.values[i])) bad++;
  if (bad > 0) {
    throw new MeasuredImageError('--image', `${fileName} has ${bad} pixels that are NaN or infinite; replace them (e.g. by the background level) before comparing`);
  }
  // A frame in which every pixel has the same value (all zero: a dark frame, a blank
  // export) holds no cloud to centre on or fit.
  let constant = true;
  for (let i = 1; i < raw.values.length && constant; i++) if (raw.values[i] !== raw.values[0]) constant = false;
  if (constant) {
    throw new MeasuredImageError('--image', `${fileName} holds no image: every pixel is ${raw.values[0]}; check that this is the exposure of the cloud`);
  }
  if (countsPerAtom !== 1) {
    const scaled = new Float64Array(raw.values.length);
    for (let i = 0; i < scaled.length; i++) scaled[i] = raw.values[i] / countsPerAtom;
    raw = { ...raw, values: scaled };
  } else {
    countsPerAtom = 1;
  }
  const oriented = orientField(raw, rotateDeg, flipX);
  let totalAtoms = 0;
  for (let i = 0; i < oriented.values.length; i++) totalAtoms += oriented.values[i];
  return {
    ...oriented,
    pixelUm,
    format,
    countsPerAtom,
    sourceShape: [raw.nx, raw.ny],
    rotateDeg,
    flipX,
    totalAtoms,
  };
}

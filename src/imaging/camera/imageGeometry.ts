// Image geometry for bringing a camera frame upright: transpose, mirror, and rotation by any
// angle about the frame centre.
//
// Convention: angles in degrees, positive = counter-clockwise as the frame is displayed (row
// 0 at the top). A point at offset (dx, dy) from the input centre ((W-1)/2, (H-1)/2), with dy
// counted downwards, lands at offset (dx cos t + dy sin t, -dx sin t + dy cos t) from the
// output centre: for t = 90 a point right of the centre moves above it.
//
// Rotation conserves the total exactly by area-weighted resampling: each input pixel is a
// unit square carrying its value; rotated, it overlaps a few output pixels, and each
// receives value * (overlap area), the overlap being computed exactly by clipping the
// rotated square against the output pixel (Sutherland & Hodgman, Commun. ACM 17, 32 (1974))
// and the shoelace formula. The overlap areas of one input pixel sum to 1, so the output
// total equals the input total minus what falls outside the output frame (`lostOutside`;
// zero with `expand`). A uniform image stays uniform wherever the output is fully covered.
// This is the drizzle algorithm with pixfrac = 1 (Fruchter & Hook, PASP 114, 144 (2002));
// its smoothing is comparable to bilinear interpolation (an effective kernel about one
// pixel wide). Multiples of 90 degrees that map pixel centres onto pixel centres are done
// as exact permutations.

import { ParameterError } from '../../physics/parameterError.js';
import { checkImage, checkMask, type PixelImage, type PixelMask } from './pixelImage.js';
import { quadrilateralSquareOverlap, touchedPixels } from '../squareOverlap.js';

/** Rows become columns: out(x = y, y = x); the result is height x width. */
export function transposeImage(image: PixelImage): PixelImage {
  checkImage('image', image);
  const { width, height, values } = image;
  const out = new Float64Array(values.length);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) out[x * height + y] = values[y * width + x];
  return { width: height, height: width, values: out };
}

/** Mirror left-right: column x -> width - 1 - x. */
export function flipColumns(image: PixelImage): PixelImage {
  checkImage('image', image);
  const { width, height, values } = image;
  const out = new Float64Array(values.length);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) out[y * width + (width - 1 - x)] = values[y * width + x];
  return { width, height, values: out };
}

/** Mirror top-bottom: row y -> height - 1 - y. */
export function flipRows(image: PixelImage): PixelImage {
  checkImage('image', image);
  const { width, height, values } = image;
  const out = new Float64Array(values.length);
  for (let y = 0; y < height; y++) out.set(values.subarray(y * width, (y + 1) * width), (height - 1 - y) * width);
  return { width, height, values: out };
}

/** Where a rotation puts things: sizes, centres and the angle. */
export interface RotationGeometry {
  angleDeg: number;
  inputWidth: number;
  inputHeight: number;
  outputWidth: number;
  outputHeight: number;
}

/** Output size of a rotation: the same frame, or (expand) the smallest frame holding all of the input. */
export function rotationGeometry(width: number, height: number, angleDeg: number, expand = false): RotationGeometry {
  if (!Number.isFinite(angleDeg)) throw new ParameterError('angleDeg', `expected a finite rotation angle in degrees, got ${angleDeg}`);
  if (!expand) return { angleDeg, inputWidth: width, inputHeight: height, outputWidth: width, outputHeight: height };
  const t = (angleDeg * Math.PI) / 180;
  const c = Math.abs(Math.cos(t));
  const s = Math.abs(Math.sin(t));
  const outputWidth = Math.ceil(width * c + height * s - 1e-9);
  const outputHeight = Math.ceil(width * s + height * c - 1e-9);
  return { angleDeg, inputWidth: width, inputHeight: height, outputWidth, outputHeight };
}

/** Map a position (pixel units, x = column, y = row) of the input frame into the rotated frame. */
export function rotatedPosition(geometry: RotationGeometry, x: number, y: number): { x: number; y: number } {
  const t = (geometry.angleDeg * Math.PI) / 180;
  const c = Math.cos(t);
  const s = Math.sin(t);
  const dx = x - (geometry.inputWidth - 1) / 2;
  const dy = y - (geometry.inputHeight - 1) / 2;
  return { x: (geometry.outputWidth - 1) / 2 + dx * c + dy * s, y: (geometry.outputHeight - 1) / 2 - dx * s + dy * c };
}

/**
 * Map a position of the rotated frame back into the input frame (inverse of rotatedPosition):
 * the rotation by the opposite angle from the output frame to the input frame. Bit for bit
 * the direct formula, since cos and sin of -t are cos t and -sin t exactly and a + (-b) is a - b.
 */
export function unrotatedPosition(geometry: RotationGeometry, x: number, y: number): { x: number; y: number } {
  const inverse: RotationGeometry = {
    angleDeg: -geometry.angleDeg,
    inputWidth: geometry.outputWidth,
    inputHeight: geometry.outputHeight,
    outputWidth: geometry.inputWidth,
    outputHeight: geometry.inputHeight,
  };
  return rotatedPosition(inverse, x, y);
}

export interface RotationOptions {
  /** Grow the frame to hold the whole rotated input (default false: same size, corners lost). */
  expand?: boolean;
  /** Input pixels to leave out (0); their values are ignored (may be NaN). */
  mask?: PixelMask;
}

export interface RotatedImage extends PixelImage {
  geometry: RotationGeometry;
  /** Fraction of each output pixel covered by used input pixels (1 inside the rotated frame). */
  coverage: Float64Array;
  /** Sum of the used input values. */
  totalIn: number;
  /** Sum of the output values. */
  totalOut: number;
  /** Part of totalIn that fell outside the output frame. */
  lostOutside: number;
}

/** Rotate by any angle about the frame centre, conserving the total (see the file header). */
export function rotateImage(image: PixelImage, angleDeg: number, options: RotationOptions = {}): RotatedImage {
  checkImage('image', image);
  const { width, height, values } = image;
  const mask = options.mask;
  if (mask !== undefined) checkMask('mask', mask, width, height);
  const geometry = rotationGeometry(width, height, angleDeg, options.expand ?? false);
  const W = geometry.outputWidth;
  const H = geometry.outputHeight;
  const out = new Float64Array(W * H);
  const coverage = new Float64Array(W * H);
  let totalIn = 0;
  for (let i = 0; i < values.length; i++) {
    if (mask !== undefined && mask[i] === 0) continue;
    if (!Number.isFinite(values[i])) {
      throw new ParameterError('image', `pixel (x = ${i % width}, y = ${Math.floor(i / width)}) is not finite; mask it (mask option) before rotating`);
    }
    totalIn += values[i];
  }
  const t = (angleDeg * Math.PI) / 180;
  const quarter = angleDeg / 90;
  const isQuarter = Math.abs(quarter - Math.round(quarter)) < 1e-12;
  const turns = ((Math.round(quarter) % 4) + 4) % 4;
  const centresAlign = turns % 2 === 0 ? W === width && H === height : (W - height) % 2 === 0 && (H - width) % 2 === 0;
  if (isQuarter && centresAlign) {
    // Exact permutation: every input centre lands on an output centre.
    const q = { ...geometry, angleDeg: turns * 90 };
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const i = y * width + x;
        if (mask !== undefined && mask[i] === 0) continue;
        const p = rotatedPosition(q, x, y);
        const X = Math.round(p.x);
        const Y = Math.round(p.y);
        if (X < 0 || Y < 0 || X >= W || Y >= H) continue;
        out[Y * W + X] += values[i];
        coverage[Y * W + X] += 1;
      }
    }
  } else {
    const c = Math.cos(t);
    const s = Math.sin(t);
    const cx = (width - 1) / 2;
    const cy = (height - 1) / 2;
    const ox = (W - 1) / 2;
    const oy = (H - 1) / 2;
    const corners = new Float64Array(8);
    const range = new Float64Array(4);
    // Output-pixel squares are [X - 0.5, X + 0.5]; shift by 0.5 so that pixel X spans [X, X + 1].
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const i = y * width + x;
        if (mask !== undefined && mask[i] === 0) continue;
        const v = values[i];
        for (let k = 0; k < 4; k++) {
          const du = x - cx + (k === 1 || k === 2 ? 0.5 : -0.5);
          const dv = y - cy + (k >= 2 ? 0.5 : -0.5);
          corners[2 * k] = ox + du * c + dv * s + 0.5;
          corners[2 * k + 1] = oy - du * s + dv * c + 0.5;
        }
        touchedPixels(corners, W, H, range);
        for (let Y = range[2]; Y <= range[3]; Y++) {
          for (let X = range[0]; X <= range[1]; X++) {
            const area = quadrilateralSquareOverlap(corners, X, Y);
            if (area > 0) {
              out[Y * W + X] += v * area;
              coverage[Y * W + X] += area;
            }
          }
        }
      }
    }
  }
  let totalOut = 0;
  for (let i = 0; i < out.length; i++) totalOut += out[i];
  return { width: W, height: H, values: out, geometry, coverage, totalIn, totalOut, lostOutside: totalIn - totalOut };
}

// Bringing a camera frame upright before it is compared with a model, and the way back:
// crop to a rectangle, transpose, mirror columns, mirror rows, rotate by any angle, in this
// order, applied to the values, their variance and the mask alike. The result keeps a map
// of the steps, so that a position found on the oriented frame (a fitted cloud centre) is
// reported in pixels of the frame as given (x = column, y = row from the top), with its
// covariance carried by the linear part of the map.
//
// Positions are pixel centres, (col, row) = (0, 0) at the top-left pixel; every step maps
// them exactly (imageGeometry.ts for the rotation: rotatedPosition / unrotatedPosition).
// The rotation resamples by exact overlap areas (drizzle, imageGeometry.ts) with the frame
// grown to hold all of the input (`expand`); output pixels not fully covered by used input
// pixels are masked. The variance is carried through the same area weights, which gives
// sum_i w_i var_i instead of sum_i w_i^2 var_i: an upper bound for a pixel shared between
// inputs, and neighbouring output pixels become correlated (the smoothing of any
// interpolation; common practice). Turns by multiples of 90 degrees are exact permutations.

import { ParameterError } from '../../physics/parameterError.js';
import { cropImage, type PixelRectangle } from './regionOfInterest.js';
import { checkImage, checkMask, type PixelImage, type PixelMask } from './pixelImage.js';
import { flipColumns, flipRows, rotateImage, rotatedPosition, rotationGeometry, transposeImage, unrotatedPosition, type RotationGeometry } from './imageGeometry.js';

export interface FrameOrientation {
  /** Keep only this rectangle of the given frame (first step). */
  crop?: PixelRectangle;
  /** Rows become columns. */
  transpose?: boolean;
  /** Mirror left-right (column x -> width - 1 - x). */
  flipColumns?: boolean;
  /** Mirror top-bottom (row y -> height - 1 - y). */
  flipRows?: boolean;
  /** Counter-clockwise as displayed (row 0 at the top), any angle, degrees. */
  rotateDeg?: number;
}

export interface OrientedFrame {
  image: PixelImage;
  /** Per-pixel variance carried along (null when none was given). */
  variance: Float64Array | null;
  /** 1 = used; pixels masked before or not fully covered after a rotation are 0. */
  mask: PixelMask;
}

type Step =
  | { kind: 'crop'; x0: number; y0: number }
  | { kind: 'transpose' }
  | { kind: 'flipColumns'; width: number }
  | { kind: 'flipRows'; height: number }
  | { kind: 'rotate'; geometry: RotationGeometry };

/** The steps from the given frame to the oriented one, for positions. */
export interface FrameMap {
  givenWidth: number;
  givenHeight: number;
  orientedWidth: number;
  orientedHeight: number;
  steps: readonly Step[];
}

function forward(step: Step, x: number, y: number): { x: number; y: number } {
  switch (step.kind) {
    case 'crop': return { x: x - step.x0, y: y - step.y0 };
    case 'transpose': return { x: y, y: x };
    case 'flipColumns': return { x: step.width - 1 - x, y };
    case 'flipRows': return { x, y: step.height - 1 - y };
    case 'rotate': return rotatedPosition(step.geometry, x, y);
  }
}

function backward(step: Step, x: number, y: number): { x: number; y: number } {
  switch (step.kind) {
    case 'crop': return { x: x + step.x0, y: y + step.y0 };
    case 'transpose': return { x: y, y: x };
    case 'flipColumns': return { x: step.width - 1 - x, y };
    case 'flipRows': return { x, y: step.height - 1 - y };
    case 'rotate': return unrotatedPosition(step.geometry, x, y);
  }
}

/** A position of the oriented frame (col, row) in pixels of the given frame (x = column, y = row). */
export function toGivenFrame(map: FrameMap, col: number, row: number): { x: number; y: number } {
  let p = { x: col, y: row };
  for (let k = map.steps.length - 1; k >= 0; k--) p = backward(map.steps[k], p.x, p.y);
  return p;
}

/** A position of the given frame in pixels of the oriented frame. */
export function toOrientedFrame(map: FrameMap, x: number, y: number): { col: number; row: number } {
  let p = { x, y };
  for (const step of map.steps) p = forward(step, p.x, p.y);
  return { col: p.x, row: p.y };
}

/**
 * d(given x, given y) / d(oriented col, oriented row), row-major [dx/dcol, dx/drow, dy/dcol, dy/drow].
 * Every step is affine, so this is exact and the same everywhere.
 */
export function givenFrameJacobian(map: FrameMap): [number, number, number, number] {
  const o = toGivenFrame(map, 0, 0);
  const c = toGivenFrame(map, 1, 0);
  const r = toGivenFrame(map, 0, 1);
  return [c.x - o.x, r.x - o.x, c.y - o.y, r.y - o.y];
}

function permuteMask(mask: PixelMask, width: number, height: number, transform: (img: PixelImage) => PixelImage): PixelMask {
  const image = transform({ width, height, values: Float64Array.from(mask) });
  return Uint8Array.from(image.values, (v) => (v !== 0 ? 1 : 0));
}

/** Apply the orientation to one shot (values, optional variance, mask), see the file header. */
export function orientFrame(image: PixelImage, variance: Float64Array | null, mask: PixelMask, orientation: FrameOrientation): OrientedFrame & { map: FrameMap } {
  checkImage('image', image);
  checkMask('mask', mask, image.width, image.height);
  if (variance !== null && variance.length !== image.values.length) {
    throw new ParameterError('variance', `expected ${image.values.length} per-pixel variances, got ${variance.length}`);
  }
  const steps: Step[] = [];
  let current: OrientedFrame = { image, variance, mask };
  const each = (transform: (img: PixelImage) => PixelImage): void => {
    const { width, height } = current.image;
    current = {
      image: transform(current.image),
      variance: current.variance === null ? null : transform({ width, height, values: current.variance }).values,
      mask: permuteMask(current.mask, width, height, transform),
    };
  };
  if (orientation.crop !== undefined) {
    const r = orientation.crop;
    each((img) => cropImage(img, r));
    steps.push({ kind: 'crop', x0: r.x0, y0: r.y0 });
  }
  if (orientation.transpose) {
    each(transposeImage);
    steps.push({ kind: 'transpose' });
  }
  if (orientation.flipColumns) {
    steps.push({ kind: 'flipColumns', width: current.image.width });
    each(flipColumns);
  }
  if (orientation.flipRows) {
    steps.push({ kind: 'flipRows', height: current.image.height });
    each(flipRows);
  }
  const angle = orientation.rotateDeg ?? 0;
  if (!Number.isFinite(angle)) throw new ParameterError('rotateDeg', `expected a finite angle in degrees, got ${angle}`);
  if (angle !== 0) {
    const { width, height } = current.image;
    const used = current.mask;
    const rotated = rotateImage(current.image, angle, { expand: true, mask: used });
    const rotatedVariance = current.variance === null ? null : rotateImage({ width, height, values: current.variance }, angle, { expand: true, mask: used }).values;
    // A pixel is used only where used input pixels cover it completely (to rounding).
    const mask = Uint8Array.from(rotated.coverage, (c) => (c > 1 - 1e-9 ? 1 : 0));
    const values = rotated.values;
    for (let i = 0; i < values.length; i++) {
      if (mask[i] === 0) {
        values[i] = NaN;
        if (rotatedVariance !== null) rotatedVariance[i] = NaN;
      }
    }
    current = { image: { width: rotated.width, height: rotated.height, values }, variance: rotatedVariance, mask };
    steps.push({ kind: 'rotate', geometry: rotationGeometry(width, height, angle, true) });
  }
  return {
    ...current,
    map: { givenWidth: image.width, givenHeight: image.height, orientedWidth: current.image.width, orientedHeight: current.image.height, steps },
  };
}

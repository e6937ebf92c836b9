// Region of interest: a rectangle of pixels or a mask image, turned into a PixelMask, and
// cropping of an image to a rectangle. Rectangles are in pixel indices of the full frame:
// columns x0 .. x0 + width - 1, rows y0 .. y0 + height - 1 (row 0 at the top).

import { ParameterError } from '../../physics/parameterError.js';
import { checkImage, type PixelImage, type PixelMask } from './pixelImage.js';

export interface PixelRectangle {
  /** First column. */
  x0: number;
  /** First row (from the top). */
  y0: number;
  width: number;
  height: number;
}

export type RegionOfInterest = { kind: 'rectangle'; rectangle: PixelRectangle } | { kind: 'mask'; mask: PixelImage };

function checkRectangle(parameter: string, r: PixelRectangle, width: number, height: number): void {
  const ok = [r.x0, r.y0, r.width, r.height].every((v) => Number.isInteger(v)) && r.x0 >= 0 && r.y0 >= 0 && r.width >= 1 && r.height >= 1;
  if (!ok || r.x0 + r.width > width || r.y0 + r.height > height) {
    throw new ParameterError(
      parameter,
      `rectangle x0=${r.x0}, y0=${r.y0}, width=${r.width}, height=${r.height} must be whole pixels inside the ${width} x ${height} frame (columns 0..${width - 1}, rows 0..${height - 1})`,
    );
  }
}

/** Parse 'x0,y0,width,height' (whole pixels), e.g. "40,30,120,100". */
export function parseRectangle(text: string, parameter = '--roi'): PixelRectangle {
  const parts = text.split(',').map((s) => s.trim());
  const values = parts.map(Number);
  if (parts.length !== 4 || values.some((v, i) => parts[i] === '' || !Number.isInteger(v))) {
    throw new ParameterError(parameter, `expected x0,y0,width,height in whole pixels (first column, first row from the top, width, height), got "${text}"`);
  }
  return { x0: values[0], y0: values[1], width: values[2], height: values[3] };
}

/** The mask (1 = inside) of a region on a width x height frame. A mask image counts pixels != 0 (and finite) as inside. */
export function regionMask(region: RegionOfInterest, width: number, height: number): PixelMask {
  const mask = new Uint8Array(width * height);
  if (region.kind === 'rectangle') {
    const r = region.rectangle;
    checkRectangle('region', r, width, height);
    for (let y = r.y0; y < r.y0 + r.height; y++) mask.fill(1, y * width + r.x0, y * width + r.x0 + r.width);
    return mask;
  }
  checkImage('region.mask', region.mask);
  if (region.mask.width !== width || region.mask.height !== height) {
    throw new ParameterError('region.mask', `mask image is ${region.mask.width} x ${region.mask.height} but the frames are ${width} x ${height}`);
  }
  for (let i = 0; i < mask.length; i++) {
    const v = region.mask.values[i];
    mask[i] = Number.isFinite(v) && v !== 0 ? 1 : 0;
  }
  return mask;
}

/** The part of an image inside a rectangle (a copy). */
export function cropImage(image: PixelImage, rectangle: PixelRectangle): PixelImage {
  checkImage('image', image);
  checkRectangle('rectangle', rectangle, image.width, image.height);
  const out = new Float64Array(rectangle.width * rectangle.height);
  for (let y = 0; y < rectangle.height; y++) {
    const from = (rectangle.y0 + y) * image.width + rectangle.x0;
    out.set(image.values.subarray(from, from + rectangle.width), y * rectangle.width);
  }
  return { width: rectangle.width, height: rectangle.height, values: out };
}

// Background plane b(x, y) = a + b_x x + b_y y fitted by linear least squares to the pixels
// of a border region (every pixel within `borderPixels` of an edge of the frame and not
// masked; crop to a region of interest first to fit the border of that region), then
// subtracted from the whole image. The cloud must lie inside the border. The normal equations of the three
// parameters are solved in coordinates centred on the border pixels' mean, which keeps
// them well conditioned for any frame size (any textbook on linear regression, e.g.
// Bevington & Robinson, Data Reduction and Error Analysis, 3rd ed. (2003), ch. 7).

import { Matrix, solve } from 'ml-matrix';
import { ParameterError } from '../../physics/parameterError.js';
import { checkImage, checkMask, type PixelImage, type PixelMask } from './pixelImage.js';

export interface BackgroundPlaneOptions {
  /** Width of the border band, pixels; default 5. */
  borderPixels?: number;
  /** Pixels to leave out of the fit (0 = leave out), e.g. the absorption mask. */
  mask?: PixelMask;
}

export interface BackgroundPlane {
  /** Plane value at pixel (x = 0, y = 0), in the image's units. */
  offset: number;
  /** Change per column (x), units per pixel. */
  slopeX: number;
  /** Change per row (y, downwards), units per pixel. */
  slopeY: number;
  /** RMS of the fit residuals on the border, the image's units (noise estimate). */
  residualRms: number;
  /** Border pixels used. */
  borderPixelCount: number;
  /** The image minus the plane (masked pixels keep their value, NaN stays NaN). */
  subtracted: PixelImage;
}

/** Fit and subtract a + b_x x + b_y y using the border of the frame (see the file header). */
export function subtractBackgroundPlane(image: PixelImage, options: BackgroundPlaneOptions = {}): BackgroundPlane {
  checkImage('image', image);
  const border = options.borderPixels ?? 5;
  const { width, height, values } = image;
  if (!Number.isInteger(border) || border < 1 || 2 * border >= Math.min(width, height)) {
    throw new ParameterError('borderPixels', `expected a whole number of pixels from 1 to ${Math.floor((Math.min(width, height) - 1) / 2)} for a ${width} x ${height} frame, got ${border}`);
  }
  if (options.mask !== undefined) checkMask('mask', options.mask, width, height);
  const inBorder = (x: number, y: number) => x < border || y < border || x >= width - border || y >= height - border;
  let n = 0;
  let mx = 0;
  let my = 0;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (!inBorder(x, y) || (options.mask !== undefined && options.mask[i] === 0) || !Number.isFinite(values[i])) continue;
      n++;
      mx += x;
      my += y;
    }
  }
  if (n < 3) throw new ParameterError('borderPixels', `only ${n} usable border pixels; widen the border or unmask it`);
  mx /= n;
  my /= n;
  let sxx = 0, sxy = 0, syy = 0, sx = 0, sy = 0, sv = 0, sxv = 0, syv = 0;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (!inBorder(x, y) || (options.mask !== undefined && options.mask[i] === 0) || !Number.isFinite(values[i])) continue;
      const u = x - mx;
      const w = y - my;
      const v = values[i];
      sxx += u * u; sxy += u * w; syy += w * w; sx += u; sy += w;
      sv += v; sxv += u * v; syv += w * v;
    }
  }
  const normal = new Matrix([[n, sx, sy], [sx, sxx, sxy], [sy, sxy, syy]]);
  const rhs = Matrix.columnVector([sv, sxv, syv]);
  const p = solve(normal, rhs).to1DArray();
  const [c0, slopeX, slopeY] = p;
  const offset = c0 - slopeX * mx - slopeY * my;
  let r2 = 0;
  const out = new Float64Array(values.length);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const plane = offset + slopeX * x + slopeY * y;
      out[i] = values[i] - plane;
      if (inBorder(x, y) && (options.mask === undefined || options.mask[i] !== 0) && Number.isFinite(values[i])) r2 += out[i] * out[i];
    }
  }
  return {
    offset,
    slopeX,
    slopeY,
    residualRms: Math.sqrt(r2 / Math.max(n - 3, 1)),
    borderPixelCount: n,
    subtracted: { width, height, values: out },
  };
}

// The two layouts of a picture in this project and the one conversion between them.
//
// - Camera convention (src/imaging/camera/pixelImage.ts, every file read or written as an
//   image): a[row, col], column x from the left, row from the top, values[row * width + col].
// - Picture grid (src/imaging/planarField.ts, what the camera model renders and the figures
//   draw): value(i, j) = values[i * ny + j] with i along image x and j along image y, y
//   pointing upwards.
//
// The same picture in both: column = i and row = ny - 1 - j (y grows upwards, rows count
// downwards), so the top row of a file is the highest y of the grid. Sub-pixel positions
// map the same way: (x, y) on the grid is (col = x, row = ny - 1 - y).

import type { PixelImage, PixelMask } from './camera/pixelImage.js';
import type { PlanarField } from './planarField.js';

/** A grid picture (x index slowest, y up) as a camera image (row from the top). */
export function planarToCamera(field: PlanarField): PixelImage {
  const { nx, ny, values } = field;
  const out = new Float64Array(nx * ny);
  for (let i = 0; i < nx; i++) {
    const from = i * ny;
    for (let j = 0; j < ny; j++) out[(ny - 1 - j) * nx + i] = values[from + j];
  }
  return { width: nx, height: ny, values: out };
}

/** A camera image (row from the top) as a grid picture (x index slowest, y up). */
export function cameraToPlanar(image: PixelImage): PlanarField {
  const { width, height, values } = image;
  const out = new Float64Array(width * height);
  for (let r = 0; r < height; r++) {
    const from = r * width;
    const j = height - 1 - r;
    for (let c = 0; c < width; c++) out[c * height + j] = values[from + c];
  }
  return { values: out, nx: width, ny: height };
}

/** A camera-layout mask in the grid layout (the same permutation as cameraToPlanar). */
export function cameraMaskToPlanar(mask: PixelMask, width: number, height: number): Uint8Array {
  const out = new Uint8Array(width * height);
  for (let r = 0; r < height; r++) for (let c = 0; c < width; c++) out[c * height + (height - 1 - r)] = mask[r * width + c];
  return out;
}

/** A grid-layout mask in the camera layout. */
export function planarMaskToCamera(mask: Uint8Array, nx: number, ny: number): PixelMask {
  const out = new Uint8Array(nx * ny);
  for (let i = 0; i < nx; i++) for (let j = 0; j < ny; j++) out[(ny - 1 - j) * nx + i] = mask[i * ny + j];
  return out;
}

/** Grid position (x, y up) -> camera position (column, row from the top) on a grid of ny rows. */
export function gridToCameraPosition(x: number, y: number, ny: number): { col: number; row: number } {
  return { col: x, row: ny - 1 - y };
}

// Area-weighted resampling of a site field onto camera pixels.
//
// Model: the atoms of site (i, j) are spread uniformly over its a x a lattice cell,
// and a camera pixel (size p = camera pixel / magnification in the object plane)
// collects the atoms in the part of the cell it overlaps. Both are axis-aligned
// rectangles, so the overlap area factorises into an x overlap times a y overlap and
// the whole map is separable: image = Wx . sites . Wy^T with sparse 1D weight matrices
// W[k, i] = |pixel k  intersect  cell i| / a. Every cell lying inside the pixel grid has
// weights summing to 1, so atoms are conserved (to rounding); atoms of cells that stick
// out of a user-given grid are reported in `atomsOutside` rather than silently dropped.
// The same routine resamples any regular grid (e.g. a time-of-flight image) when
// `cellUm` is that grid's spacing.
//
// Order with the point-spread function: we resample first and blur afterwards on the
// pixel grid (gaussianBlur with sigma / p pixels). Both steps are convolutions, so the
// order only matters through the discretisation: either way the picture carries the
// PSF variance plus the box-car variances of cell and pixel (a^2 + p^2) / 12, which is
// what a real camera records. Blurring on the coarser pixel grid is much cheaper than
// on a fine sub-site grid, and the discrete Gaussian used there keeps the PSF variance
// exact even when sigma is below one pixel.
//
// Coordinates: micrometres in the object plane, site (0, 0) centred at `originUm`
// (default: the lattice centre sits at 0, 0); axis 0 of the field is x.

import { assertPlanarField, type PlanarField } from './planarField.js';
import { pixelCentresUm, type PixelPicture } from './pixelPicture.js';

/** Pixel grid in the object plane: pixel (k, l) is centred at (firstXUm + k p, firstYUm + l p). */
export interface CameraGrid {
  nx: number;
  ny: number;
  firstXUm: number;
  firstYUm: number;
}

export interface CameraResampleOptions {
  /** Lattice spacing a (or spacing of whatever regular grid is resampled), micrometres. */
  cellUm: number;
  /** Pixel size in the object plane, micrometres; see objectPlanePixelUm. */
  pixelUm: number;
  /** Centre of site (0, 0), micrometres; default puts the centre of the lattice at 0, 0. */
  originUm?: { x: number; y: number };
  /** Output grid; default: the smallest centred grid covering the whole lattice plus marginUm. */
  grid?: CameraGrid;
  /** Extra border (each side) for the automatic grid, micrometres, e.g. 4 PSF sigmas. Default 0. */
  marginUm?: number;
}

/** Atoms per pixel in `values`; pixel size and pixel centres in the object plane, micrometres. */
export interface CameraImage extends PixelPicture {
  /** Atoms in cells that the pixel grid does not cover (0 for the automatic grid). */
  atomsOutside: number;
}

/** Pixel size in the object plane from the camera pixel and the magnification. */
export function objectPlanePixelUm(cameraPixelUm: number, magnification: number): number {
  if (!(cameraPixelUm > 0) || !Number.isFinite(cameraPixelUm)) {
    throw new Error(`objectPlanePixelUm: camera pixel size must be a positive number of micrometres, got ${cameraPixelUm}`);
  }
  if (!(magnification > 0) || !Number.isFinite(magnification)) {
    throw new Error(`objectPlanePixelUm: magnification must be a positive number, got ${magnification}`);
  }
  return cameraPixelUm / magnification;
}

interface OverlapWeights {
  /** For cell i, entries start[i] .. start[i + 1] - 1 of pixel/weight. */
  start: Int32Array;
  pixel: Int32Array;
  weight: Float64Array;
}

/** 1D overlaps of cells [c_i - a/2, c_i + a/2] with pixels [e_k, e_k + p]. */
function overlapWeights(nCells: number, firstCellUm: number, cellUm: number, nPixels: number, firstPixelUm: number, pixelUm: number): OverlapWeights {
  const edge0 = firstPixelUm - pixelUm / 2;
  const gridEnd = edge0 + nPixels * pixelUm;
  // Upper bound on entries: each cell touches at most ceil(a/p) + 1 pixels.
  const perCell = Math.ceil(cellUm / pixelUm) + 2;
  const start = new Int32Array(nCells + 1);
  const pixel = new Int32Array(nCells * perCell);
  const weight = new Float64Array(nCells * perCell);
  let entry = 0;
  for (let i = 0; i < nCells; i++) {
    start[i] = entry;
    const lo = firstCellUm + i * cellUm - cellUm / 2;
    const hi = lo + cellUm;
    const kFirst = Math.max(0, Math.floor((lo - edge0) / pixelUm));
    const kLast = Math.min(nPixels - 1, Math.ceil((hi - edge0) / pixelUm) - 1);
    const entryFirst = entry;
    let covered = 0;
    for (let k = kFirst; k <= kLast; k++) {
      const left = edge0 + k * pixelUm;
      const overlap = Math.min(hi, left + pixelUm) - Math.max(lo, left);
      if (overlap <= 0) continue;
      pixel[entry] = k;
      weight[entry] = overlap;
      covered += overlap;
      entry++;
    }
    // A cell fully inside the grid must hand out exactly all its atoms: divide by the
    // summed overlaps (equal to a up to rounding) so the weights sum to 1 to rounding.
    // A cell sticking out keeps the geometric fraction overlap / a.
    const inside = lo >= edge0 && hi <= gridEnd;
    const norm = inside && covered > 0 ? covered : cellUm;
    for (let e = entryFirst; e < entry; e++) weight[e] /= norm;
  }
  start[nCells] = entry;
  return { start, pixel, weight };
}

/** Resample a site field (atoms per site) to camera pixels (atoms per pixel). */
export function resampleToCamera(sites: PlanarField, options: CameraResampleOptions): CameraImage {
  assertPlanarField(sites, 'resampleToCamera sites');
  const { cellUm, pixelUm } = options;
  if (!(cellUm > 0) || !Number.isFinite(cellUm)) {
    throw new Error(`resampleToCamera: lattice spacing (cellUm) must be a positive number of micrometres, got ${cellUm}`);
  }
  if (!(pixelUm > 0) || !Number.isFinite(pixelUm)) {
    throw new Error(`resampleToCamera: object-plane pixel size (pixelUm) must be a positive number of micrometres, got ${pixelUm}`);
  }
  const marginUm = options.marginUm ?? 0;
  if (!(marginUm >= 0) || !Number.isFinite(marginUm)) {
    throw new Error(`resampleToCamera: marginUm must be >= 0, got ${marginUm}`);
  }
  const origin = options.originUm ?? {
    x: (-(sites.nx - 1) * cellUm) / 2,
    y: (-(sites.ny - 1) * cellUm) / 2,
  };
  let grid = options.grid;
  if (grid === undefined) {
    const auto = (n: number, first: number) => {
      const lo = first - cellUm / 2 - marginUm;
      const width = n * cellUm + 2 * marginUm;
      // 1e-12 slack so that a width that is a whole number of pixels up to rounding
      // does not get an extra pixel.
      const count = Math.max(1, Math.ceil(width / pixelUm - 1e-12));
      return { count, first: lo + width / 2 - ((count - 1) * pixelUm) / 2 };
    };
    const ax = auto(sites.nx, origin.x);
    const ay = auto(sites.ny, origin.y);
    grid = { nx: ax.count, ny: ay.count, firstXUm: ax.first, firstYUm: ay.first };
  } else if (!Number.isInteger(grid.nx) || !Number.isInteger(grid.ny) || grid.nx < 1 || grid.ny < 1) {
    throw new Error(`resampleToCamera: grid size must be positive integers, got ${grid.nx} x ${grid.ny}`);
  }

  const wx = overlapWeights(sites.nx, origin.x, cellUm, grid.nx, grid.firstXUm, pixelUm);
  const wy = overlapWeights(sites.ny, origin.y, cellUm, grid.ny, grid.firstYUm, pixelUm);
  const ny = sites.ny;
  const src = sites.values;

  // Along axis 0: tmp[k, j] = sum_i Wx[k, i] sites[i, j].
  const tmp = new Float64Array(grid.nx * ny);
  for (let i = 0; i < sites.nx; i++) {
    const rowIn = i * ny;
    for (let e = wx.start[i]; e < wx.start[i + 1]; e++) {
      const w = wx.weight[e];
      const rowOut = wx.pixel[e] * ny;
      for (let j = 0; j < ny; j++) tmp[rowOut + j] += w * src[rowIn + j];
    }
  }
  // Along axis 1: image[k, l] = sum_j Wy[l, j] tmp[k, j].
  const values = new Float64Array(grid.nx * grid.ny);
  for (let k = 0; k < grid.nx; k++) {
    const rowIn = k * ny;
    const rowOut = k * grid.ny;
    for (let j = 0; j < ny; j++) {
      const v = tmp[rowIn + j];
      if (v === 0) continue;
      for (let e = wy.start[j]; e < wy.start[j + 1]; e++) values[rowOut + wy.pixel[e]] += wy.weight[e] * v;
    }
  }

  let totalIn = 0;
  for (let i = 0; i < src.length; i++) totalIn += src[i];
  let totalOut = 0;
  for (let i = 0; i < values.length; i++) totalOut += values[i];

  const xCentresUm = pixelCentresUm(grid.firstXUm, grid.nx, pixelUm);
  const yCentresUm = pixelCentresUm(grid.firstYUm, grid.ny, pixelUm);
  return {
    values,
    nx: grid.nx,
    ny: grid.ny,
    pixelUm,
    xCentresUm,
    yCentresUm,
    atomsOutside: totalIn - totalOut,
  };
}

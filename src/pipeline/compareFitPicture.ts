// The model picture of the compare fit on the measured pixel grid: the per-site density of a
// solution through the camera model (column along the imaging axis, area-weighted
// resampling onto the pixels, Gaussian PSF on the pixel grid in 'reflect' mode, as
// inSituImage.ts), placed with the trap centre at a pixel position, turned by an angle,
// blurred with a PSF width and lifted by a flat background offset: the picture parameters
// of the fit. Changing them re-renders the picture; only the physics parameters need a
// solve (compareFitModel.ts).
//
// Without a turn the separable resampling of cameraResample.ts is used (the picture is
// then bit for bit that of `solve`'s camera for the same grid); when the angle is a fit
// parameter every evaluation, theta = 0 included, goes through rotatedResample.ts, so that
// the finite differences of the fit compare like with like.
//
// The fit asks for the same picture more than once: the weights of the first pass come
// from the picture at the start, which is also the fit's first evaluation; each weighting
// pass starts where the last one ended and takes its Jacobian again at the same points;
// the best picture is rendered after each pass. The last pictures (up to 64, about 32 MB
// at most) are therefore kept, keyed by the solution (its density array, which, as for the
// kept columns, must not be changed in place once rendered) and the picture parameters; a
// repeat returns a copy of the kept picture, bit for bit what a new render would give.

import { columnDensity } from '../imaging/columnDensity.js';
import { resampleToCamera, type CameraGrid } from '../imaging/cameraResample.js';
import { resampleRotated } from '../imaging/rotatedResample.js';
import { gaussianBlur } from '../imaging/pointSpreadFunction.js';
import type { CameraOptics } from '../imaging/cameraOptics.js';
import type { PlanarField } from '../imaging/planarField.js';

export interface PictureParameters {
  /** Trap centre on the measured grid, pixel index along x and along y (y up). */
  centreX: number;
  centreY: number;
  /** Turn of the lattice x axis against the picture x axis, counter-clockwise (y up), radians. */
  angleRad: number;
  /** Gaussian PSF sigma in the object plane, length unit. */
  psfSigmaUm: number;
  /** Flat background added to every pixel, atoms per pixel. */
  offset: number;
}

export interface PictureRenderer {
  /** Atoms per pixel on the measured grid (nx x ny, grid layout). */
  render(density: Float64Array, p: PictureParameters): Float64Array;
  /** The pixel grid with the trap centre at (centreX, centreY). */
  gridAt(centreX: number, centreY: number): CameraGrid;
}

/** Pictures kept for repeats: up to 64, at most about 32 MB of them. */
const keptPictures = (pixels: number): number => Math.max(8, Math.min(64, Math.floor(4e6 / Math.max(1, pixels))));

export function createPictureRenderer(shape: readonly number[], optics: CameraOptics, nx: number, ny: number, rotated: boolean): PictureRenderer {
  const p = optics.pixelUm;
  // The column of a solution is the same for every picture parameter: keep the last few.
  const columns = new WeakMap<Float64Array, PlanarField>();
  const columnOf = (density: Float64Array): PlanarField => {
    let column = columns.get(density);
    if (column === undefined) {
      column = columnDensity(density, shape, optics.axis);
      columns.set(density, column);
    }
    return column;
  };
  const gridAt = (x0: number, y0: number): CameraGrid => ({ nx, ny, firstXUm: -x0 * p, firstYUm: -y0 * p });
  const renderNew = (density: Float64Array, q: PictureParameters): Float64Array => {
    const grid = gridAt(q.centreX, q.centreY);
    const column = columnOf(density);
    const image = rotated
      ? resampleRotated(column, { cellUm: optics.cellUm, pixelUm: p, originUm: optics.originUm, angleRad: q.angleRad, grid })
      : resampleToCamera(column, { cellUm: optics.cellUm, pixelUm: p, originUm: optics.originUm, grid });
    const values = q.psfSigmaUm > 0 ? gaussianBlur(image, { sigmaPixels: q.psfSigmaUm / p, border: 'reflect' }).values : image.values;
    if (q.offset !== 0) for (let i = 0; i < values.length; i++) values[i] += q.offset;
    return values;
  };
  // Kept pictures (file header), oldest first, keyed by a number per density array and the
  // parameters (String of a double reads back as the same double).
  const densityIds = new WeakMap<Float64Array, number>();
  let nextDensityId = 0;
  const kept = new Map<string, Float64Array>();
  const keep = keptPictures(nx * ny);
  const keyOf = (density: Float64Array, q: PictureParameters): string => {
    let id = densityIds.get(density);
    if (id === undefined) {
      id = nextDensityId++;
      densityIds.set(density, id);
    }
    return `${id}|${q.centreX},${q.centreY},${q.angleRad},${q.psfSigmaUm},${q.offset}`;
  };
  return {
    gridAt,
    render(density, q) {
      const key = keyOf(density, q);
      const known = kept.get(key);
      if (known !== undefined) return Float64Array.from(known);
      const values = renderNew(density, q);
      kept.set(key, Float64Array.from(values));
      if (kept.size > keep) kept.delete(kept.keys().next().value as string);
      return values;
    },
  };
}

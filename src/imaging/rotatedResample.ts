// Area-weighted resampling of a site field onto camera pixels when the lattice is turned
// against the camera by an angle theta: the generalisation of cameraResample.ts (which
// handles theta = 0 separably) with the same model. The atoms of a site are spread
// uniformly over its a x a cell; the cell, turned by theta counter-clockwise (x right,
// y up) about the trap centre, is clipped against every pixel square it touches
// (Sutherland & Hodgman, Commun. ACM 17, 32 (1974)) and each pixel receives
// atoms x (overlap area) / a^2 (shoelace formula for the area). The overlap areas of a
// cell inside the grid add up to a^2, so atoms are conserved to rounding; atoms of cells
// that stick out of the grid are counted in `atomsOutside`.
//
// Coordinates: lattice-frame position (u, v) of a point, from the trap centre, lands at
// (X, Y) = (u cos t - v sin t, u sin t + v cos t) in the picture frame, and picture pixel
// (k, l) is centred at (firstXUm + k p, firstYUm + l p), as in cameraResample.ts.

import type { CameraGrid, CameraImage } from './cameraResample.js';
import { assertPlanarField, type PlanarField } from './planarField.js';
import { quadrilateralSquareOverlap, touchedPixels } from './squareOverlap.js';
import { pixelCentresUm } from './pixelPicture.js';

export interface RotatedResampleOptions {
  /** Lattice spacing, length unit. */
  cellUm: number;
  /** Object-plane pixel, length unit. */
  pixelUm: number;
  /** Centre of site (0, 0) in the lattice frame, from the trap centre, length unit. */
  originUm: { x: number; y: number };
  /** Turn of the lattice x axis against the picture x axis, counter-clockwise, radians. */
  angleRad: number;
  grid: CameraGrid;
}

/** Resample a site field (atoms per site) onto a pixel grid turned by angleRad (see the file header). */
export function resampleRotated(sites: PlanarField, options: RotatedResampleOptions): CameraImage {
  assertPlanarField(sites, 'resampleRotated sites');
  const { cellUm, pixelUm, originUm, angleRad, grid } = options;
  if (!(cellUm > 0) || !(pixelUm > 0) || !Number.isFinite(cellUm) || !Number.isFinite(pixelUm)) {
    throw new Error(`resampleRotated: cellUm and pixelUm must be positive lengths, got ${cellUm} and ${pixelUm}`);
  }
  if (!Number.isFinite(angleRad)) throw new Error(`resampleRotated: angleRad must be finite, got ${angleRad}`);
  const { nx: gx, ny: gy } = grid;
  const values = new Float64Array(gx * gy);
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  // Pixel-index coordinates with pixel k spanning [k, k + 1]: q = (X - firstX) / p + 1/2.
  const inv = 1 / pixelUm;
  const ox = 0.5 - grid.firstXUm * inv;
  const oy = 0.5 - grid.firstYUm * inv;
  const perArea = (pixelUm * pixelUm) / (cellUm * cellUm); // weight per unit of pixel-area overlap
  const half = cellUm / 2;
  const corners = new Float64Array(8);
  const range = new Float64Array(4);
  const { nx, ny } = sites;
  let totalIn = 0;
  let totalOut = 0;
  for (let i = 0; i < nx; i++) {
    const u = originUm.x + i * cellUm;
    for (let j = 0; j < ny; j++) {
      const atoms = sites.values[i * ny + j];
      if (atoms === 0) continue;
      totalIn += atoms;
      const v = originUm.y + j * cellUm;
      for (let k = 0; k < 4; k++) {
        const du = k === 1 || k === 2 ? half : -half;
        const dv = k >= 2 ? half : -half;
        corners[2 * k] = (c * (u + du) - s * (v + dv)) * inv + ox;
        corners[2 * k + 1] = (s * (u + du) + c * (v + dv)) * inv + oy;
      }
      touchedPixels(corners, gx, gy, range);
      for (let k = range[0]; k <= range[1]; k++) {
        for (let l = range[2]; l <= range[3]; l++) {
          const area = quadrilateralSquareOverlap(corners, k, l);
          if (area > 0) {
            const w = atoms * area * perArea;
            values[k * gy + l] += w;
            totalOut += w;
          }
        }
      }
    }
  }
  const xCentresUm = pixelCentresUm(grid.firstXUm, gx, pixelUm);
  const yCentresUm = pixelCentresUm(grid.firstYUm, gy, pixelUm);
  return { values, nx: gx, ny: gy, pixelUm, xCentresUm, yCentresUm, atomsOutside: totalIn - totalOut };
}

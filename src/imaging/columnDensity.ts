// In-situ column density: absorption or fluorescence imaging along one lattice axis
// records the number of atoms in each line of sight, i.e. the site occupations summed
// along that axis (DESIGN.md section 4). A 2D layer imaged perpendicular to its plane
// is its own column density; a 1D chain becomes a one-pixel-wide strip.
//
// The field is a flat C-order array over `shape` (first axis slowest, index
// (x * ny + y) * nz + z). Shorter shapes are read as [nx, 1, 1] and [nx, ny, 1], so
// "the axis perpendicular to a 2D layer" is axis 2, the default.

import type { PlanarField } from './planarField.js';
import { gridSizes } from '../lattice/gridShape.js';

export type ImagingAxis = 0 | 1 | 2;

export interface ColumnDensity extends PlanarField {
  /** The two lattice axes that remain, in order: image axis 0, then image axis 1. */
  keptAxes: [number, number];
}

/**
 * Sum `siteField` along `axis`. The remaining two axes keep their order (the first
 * remaining axis becomes the slow image axis). Summation is in the input order, so the
 * total equals the plain sum of the input to rounding (about 1e-16 relative per term).
 */
export function columnDensity(
  siteField: Float64Array,
  shape: readonly number[],
  axis: ImagingAxis = 2,
): ColumnDensity {
  const [n0, n1, n2] = gridSizes(shape, 'columnDensity');
  if (axis !== 0 && axis !== 1 && axis !== 2) {
    throw new Error(`columnDensity: imaging axis must be 0, 1 or 2, got ${String(axis)}`);
  }
  if (siteField.length !== n0 * n1 * n2) {
    throw new Error(
      `columnDensity: shape [${shape.join(', ')}] holds ${n0 * n1 * n2} sites, field has ${siteField.length}`,
    );
  }

  if (axis === 2) {
    // Contiguous innermost runs: one pass, summing each run of n2 values.
    const values = new Float64Array(n0 * n1);
    for (let p = 0, q = 0; p < values.length; p++) {
      let s = 0;
      for (let z = 0; z < n2; z++, q++) s += siteField[q];
      values[p] = s;
    }
    return { values, nx: n0, ny: n1, keptAxes: [0, 1] };
  }
  if (axis === 1) {
    const values = new Float64Array(n0 * n2);
    for (let x = 0; x < n0; x++) {
      const out = x * n2;
      for (let y = 0; y < n1; y++) {
        const base = (x * n1 + y) * n2;
        for (let z = 0; z < n2; z++) values[out + z] += siteField[base + z];
      }
    }
    return { values, nx: n0, ny: n2, keptAxes: [0, 2] };
  }
  const plane = n1 * n2;
  const values = new Float64Array(plane);
  for (let x = 0; x < n0; x++) {
    const base = x * plane;
    for (let p = 0; p < plane; p++) values[p] += siteField[base + p];
  }
  return { values, nx: n1, ny: n2, keptAxes: [1, 2] };
}

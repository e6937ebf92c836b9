// A picture on a regular pixel grid with the coordinates of its pixel centres, and how its
// lengths are labelled: micrometres in laboratory mode, lattice spacings in dimensionless
// mode (no lattice spacing is known, so 1 site = 1 length unit). Plain data shared by the
// camera model (cameraPictures.ts), the compare fit and the writers (src/output).

import type { PlanarField } from './planarField.js';

/** Centres of `count` pixels of size pixelUm along one axis, the first at firstUm. */
export function pixelCentresUm(firstUm: number, count: number, pixelUm: number): Float64Array {
  const out = new Float64Array(count);
  for (let k = 0; k < count; k++) out[k] = firstUm + k * pixelUm;
  return out;
}

export interface PixelPicture extends PlanarField {
  /** Pixel size in the plane the coordinates refer to (object plane, or the plane after the flight). */
  pixelUm: number;
  /** Pixel-centre coordinates along image axes 0 and 1. */
  xCentresUm: Float64Array;
  yCentresUm: Float64Array;
}

/** How lengths are labelled: micrometres, or lattice spacings in dimensionless mode. */
export interface LengthUnit {
  /**
   * Code written in metadata beside neutral keys (pixelSize, ...): 'um' or 'sites' (as the
   * scenario's landscape lengthUnit), or 'lattice-momentum' for momentum pictures in units of 2 hbar k_L.
   */
  code: 'um' | 'sites' | 'lattice-momentum';
  /** Short unit for axis labels, e.g. 'µm' or 'sites'. */
  short: string;
  /** Sentence for sidecars and summaries. */
  note: string;
}

export const micrometres: LengthUnit = { code: 'um', short: 'µm', note: 'micrometres' };
export const latticeSites: LengthUnit = {
  code: 'sites',
  short: 'sites',
  note: 'lattice spacings (dimensionless mode: no lattice spacing is known, so 1 site = 1 length unit)',
};

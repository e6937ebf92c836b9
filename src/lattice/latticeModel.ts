// The Bose-Hubbard model on a lattice as arrays (DESIGN.md section 1): site potential eps_i,
// on-site interaction U_i and nearest-neighbour hoppings J_ij, each uniform (a number, the
// cheap common case) or site/bond resolved (a Float64Array), plus the truncation nmax.
// Bond arrays hold, at index i, the bond from site i to its neighbour i + e_d along
// physical axis d (on an open boundary the entry of the last site is unused; on a periodic
// one it is the bond that wraps around).

import type { LatticeGeometry } from './latticeGeometry.js';

export interface LatticeModel {
  geometry: LatticeGeometry;
  /** highest occupation kept in each site's Fock space */
  nmax: number;
  /** site potential eps_i (trap + disorder + anything else), energy units */
  eps: Float64Array;
  /** on-site interaction: uniform or per site */
  interactionU: number | Float64Array;
  /** hopping per physical axis: uniform or per bond */
  hopping: Array<number | Float64Array>;
}

/** A model with uniform U and J and a zero site potential. */
export function uniformModel(geometry: LatticeGeometry, interactionU: number, hopping: number, nmax: number): LatticeModel {
  return {
    geometry,
    nmax,
    eps: new Float64Array(geometry.siteCount),
    interactionU,
    hopping: geometry.shape.map(() => hopping),
  };
}

/** Largest U of the model (used for scales and truncation estimates). */
export function maxInteraction(model: LatticeModel): number {
  const u = model.interactionU;
  if (typeof u === 'number') return u;
  let m = -Infinity;
  for (let i = 0; i < u.length; i++) if (u[i] > m) m = u[i];
  return m;
}

/** Largest hopping on any axis. */
export function maxHopping(model: LatticeModel): number {
  let m = 0;
  for (const h of model.hopping) {
    if (typeof h === 'number') m = Math.max(m, h);
    else for (let i = 0; i < h.length; i++) if (h[i] > m) m = h[i];
  }
  return m;
}

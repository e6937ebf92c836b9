// Harmonic trap as a site potential: eps_i = sum_d k_d (x_d - c_d)^2, with x_d the site
// coordinate in lattice sites, c_d the trap centre (may sit between sites) and k_d the
// trap coefficient in energy units per site^2. In laboratory units
// k_d = (1/2) m omega_d^2 a^2 (harmonic potential energy at one lattice spacing).

import type { LatticeGeometry } from './latticeGeometry.js';

export interface HarmonicTrap {
  /** energy per site^2 along each physical axis */
  coefficient: readonly number[];
  /** centre in site coordinates along each physical axis */
  centre: readonly number[];
}

/** Adds the trap potential to `eps` (length = site count). */
export function addHarmonicTrap(geometry: LatticeGeometry, trap: HarmonicTrap, eps: Float64Array): void {
  const { dims } = geometry;
  const [n0, n1, n2] = geometry.inner;
  const pad = 3 - dims;
  const k = [0, 0, 0];
  const c = [0, 0, 0];
  for (let d = 0; d < dims; d++) {
    k[pad + d] = trap.coefficient[d] ?? 0;
    c[pad + d] = trap.centre[d] ?? 0;
  }
  let i = 0;
  for (let a = 0; a < n0; a++) {
    const ea = k[0] * (a - c[0]) * (a - c[0]);
    for (let b = 0; b < n1; b++) {
      const eab = ea + k[1] * (b - c[1]) * (b - c[1]);
      for (let z = 0; z < n2; z++) {
        eps[i++] += eab + k[2] * (z - c[2]) * (z - c[2]);
      }
    }
  }
}

/** Geometric centre of the lattice, (n - 1)/2 per axis. */
export function latticeCentre(geometry: LatticeGeometry): number[] {
  return geometry.shape.map((n) => (n - 1) / 2);
}

// A linear tilt of the site potential: eps_i = slope * (e . (r_i - r_0)), with e the unit
// vector of `direction` (the direction in which the energy rises), r_i the site position
// measured from the lattice centre and r_0 the point where the tilt is zero. Lengths are in
// whatever unit `lengthPerSite` sets (1: lattice sites; the spacing in µm: micrometres) and
// the slope is energy per that length. Gravity along a tilted lattice is a slope m g sin(tilt)
// and a magnetic gradient a slope m_F g_F mu_B B' (common practice).

import type { LatticeGeometry } from '../latticeGeometry.js';
import { ParameterError } from '../../physics/parameterError.js';
import { axisOffsets } from './axisOffsets.js';

export interface GradientTerm {
  /** direction in which the energy rises, one component per lattice axis (normalised here) */
  direction: readonly number[];
  /** energy per unit length along the direction */
  slope: number;
  /** where the tilt is zero, offset from the lattice centre per axis, in the length unit */
  offset: readonly number[];
  /** length unit per site along each axis (1 for lattice sites) */
  lengthPerSite: readonly number[];
}

/** Site energies of a linear tilt (flat C order). */
export function gradientPotential(geometry: LatticeGeometry, term: GradientTerm): Float64Array {
  const dims = geometry.dims;
  if (term.direction.length !== dims) throw new ParameterError('direction', `expected ${dims} components, got ${term.direction.length}`);
  if (term.offset.length !== dims) throw new ParameterError('offset', `expected ${dims} components, got ${term.offset.length}`);
  let norm = 0;
  for (const c of term.direction) norm += c * c;
  norm = Math.sqrt(norm);
  if (!(norm > 0) || !Number.isFinite(norm)) throw new ParameterError('direction', 'expected a non-zero, finite vector');
  if (!Number.isFinite(term.slope)) throw new ParameterError('slope', `expected a finite number, got ${term.slope}`);
  const offsets = axisOffsets(geometry, term.lengthPerSite);
  // Per-axis contribution tables: the tilt is a sum of one function per axis.
  const pad = 3 - dims;
  const tables: Float64Array[] = [new Float64Array(1), new Float64Array(1), new Float64Array(1)];
  for (let d = 0; d < dims; d++) {
    const e = term.direction[d] / norm;
    const t = new Float64Array(geometry.shape[d]);
    for (let k = 0; k < t.length; k++) t[k] = term.slope * e * (offsets[d][k] - term.offset[d]);
    tables[pad + d] = t;
  }
  const [n0, n1, n2] = geometry.inner;
  const [t0, t1, t2] = tables;
  const out = new Float64Array(geometry.siteCount);
  let i = 0;
  for (let a = 0; a < n0; a++) {
    for (let b = 0; b < n1; b++) {
      const ab = t0[a] + t1[b];
      for (let c = 0; c < n2; c++) out[i++] = ab + t2[c];
    }
  }
  return out;
}

// Site positions for the landscape terms. Every term works with positions measured from the
// lattice centre ((n - 1) / 2 per axis, in site coordinates), scaled per axis by a length per
// site (1 to work in lattice sites, the lattice spacing in micrometres to work in µm), and
// visits the sites in the flat C order of latticeGeometry.ts: index = (x * ny + y) * nz + z.
// `axisOffsets` gives, per physical axis, the offset of each coordinate from the centre; the
// terms loop over the internal [n0, n1, n2] layout and read the offsets of the axes they need
// (no closure or allocation per site).

import type { LatticeGeometry } from '../latticeGeometry.js';
import { ParameterError } from '../../physics/parameterError.js';

/** Offsets from the lattice centre per physical axis: out[d][k] = (k - (n_d - 1) / 2) * lengthPerSite[d]. */
export function axisOffsets(geometry: LatticeGeometry, lengthPerSite: readonly number[]): Float64Array[] {
  if (lengthPerSite.length !== geometry.dims) {
    throw new ParameterError('lengthPerSite', `expected ${geometry.dims} values (one per lattice axis), got ${lengthPerSite.length}`);
  }
  return geometry.shape.map((n, d) => {
    const a = lengthPerSite[d];
    if (!(a > 0) || !Number.isFinite(a)) throw new ParameterError(`lengthPerSite[${d}]`, `expected a positive length, got ${a}`);
    const out = new Float64Array(n);
    for (let k = 0; k < n; k++) out[k] = (k - (n - 1) / 2) * a;
    return out;
  });
}

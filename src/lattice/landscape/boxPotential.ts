// A flat-bottomed box: zero inside a disc, a ring or a rectangle, a wall of height H outside,
// with a smooth edge. The edge is that of a sharp mask seen through a Gaussian blur of
// standard deviation sigma (the way a projected DMD or mask pattern reaches the atoms through
// imaging optics): eps = H (1 - inside), with Phi the standard normal distribution function,
//     rectangle:  inside = prod_d [Phi((h_d - u_d)/sigma) - Phi((-h_d - u_d)/sigma)]
//                 (exact for a Gaussian-blurred rectangle: the Gaussian factorises per axis;
//                 u = site position in the rectangle's frame, h_d its half-widths),
//     disc:       inside = Phi((R - rho)/sigma)
//     ring:       inside = Phi((R_out - rho)/sigma) - Phi((R_in - rho)/sigma)
// with rho the distance from the centre in the x-y plane (along x for a chain). For the disc
// and the ring this is the one-dimensional (straight-edge) blur across the boundary, exact
// as sigma / R -> 0; the 10-90 % rise of every edge is 2.563 sigma. sigma = 0 gives a sharp
// step, with H / 2 at a site lying exactly on the boundary (the limit of the smooth profile).
// 3D lattices: disc and ring are cylinders along z; the rectangle has a size per axis.

import { mapSites, type LatticeGeometry } from '../latticeGeometry.js';
import { ParameterError } from '../../physics/parameterError.js';
import { normalCdf } from '../../numerics/errorFunction.js';
import { axisOffsets } from './axisOffsets.js';

export type BoxShape =
  | { kind: 'disc'; radius: number }
  | { kind: 'ring'; innerRadius: number; outerRadius: number }
  /** full widths per lattice axis, the first two rotated by angleRad in the x-y plane */
  | { kind: 'rectangle'; size: readonly number[]; angleRad: number };

export interface BoxTerm {
  shape: BoxShape;
  /** energy outside the box (any sign: negative makes a dimple) */
  wallHeight: number;
  /** Gaussian blur sigma of the edge, length unit (0: sharp) */
  edgeWidth: number;
  /** centre of the box, offset from the lattice centre per axis, length unit */
  offset: readonly number[];
  /** length unit per site along each axis (1 for lattice sites) */
  lengthPerSite: readonly number[];
}

/** Heaviside step with the value 1/2 at 0 (the sigma -> 0 limit of Phi(z / sigma)). */
function step(z: number): number {
  return z > 0 ? 1 : z < 0 ? 0 : 0.5;
}

/** Fraction of a blurred slab [lo, hi] covering position u: Phi((hi - u)/s) - Phi((lo - u)/s); a step for s = 0. */
function slab(u: number, lo: number, hi: number, sigma: number): number {
  if (sigma > 0) return normalCdf((hi - u) / sigma) - normalCdf((lo - u) / sigma);
  return step(hi - u) - step(lo - u);
}

function checkTerm(geometry: LatticeGeometry, term: BoxTerm): void {
  const dims = geometry.dims;
  if (term.offset.length !== dims) throw new ParameterError('offset', `expected ${dims} components, got ${term.offset.length}`);
  if (!Number.isFinite(term.wallHeight)) throw new ParameterError('wallHeight', `expected a finite energy, got ${term.wallHeight}`);
  if (!(term.edgeWidth >= 0) || !Number.isFinite(term.edgeWidth)) {
    throw new ParameterError('edgeWidth', `expected a length >= 0, got ${term.edgeWidth}`);
  }
  const s = term.shape;
  if (s.kind === 'disc' && !(s.radius > 0)) throw new ParameterError('radius', `expected a positive radius, got ${s.radius}`);
  if (s.kind === 'ring' && !(s.innerRadius >= 0 && s.outerRadius > s.innerRadius)) {
    throw new ParameterError('innerRadius', `expected 0 <= innerRadius < outerRadius, got ${s.innerRadius} and ${s.outerRadius}`);
  }
  if (s.kind === 'rectangle') {
    if (s.size.length !== dims) throw new ParameterError('size', `expected ${dims} widths (one per lattice axis), got ${s.size.length}`);
    s.size.forEach((w, d) => {
      if (!(w > 0) || !Number.isFinite(w)) throw new ParameterError(`size[${d}]`, `expected a positive width, got ${w}`);
    });
    if (!Number.isFinite(s.angleRad)) throw new ParameterError('angle', `expected a finite angle, got ${s.angleRad}`);
  }
}

/** Site energies of a flat-bottomed box (flat C order). */
export function boxPotential(geometry: LatticeGeometry, term: BoxTerm): Float64Array {
  checkTerm(geometry, term);
  const dims = geometry.dims;
  const pad = 3 - dims;
  const offsets = axisOffsets(geometry, term.lengthPerSite);
  // Positions relative to the box centre, per internal axis (a length-1 table of 0 where the
  // internal axis is padding).
  const rel: Float64Array[] = [new Float64Array(1), new Float64Array(1), new Float64Array(1)];
  for (let d = 0; d < dims; d++) {
    const t = new Float64Array(geometry.shape[d]);
    for (let k = 0; k < t.length; k++) t[k] = offsets[d][k] - term.offset[d];
    rel[pad + d] = t;
  }
  // Internal axes of physical x, y, z (-1 when absent).
  const ix = pad;
  const iy = dims >= 2 ? pad + 1 : -1;
  const iz = dims === 3 ? 2 : -1;
  const s = term.shape;
  const sigma = term.edgeWidth;
  const H = term.wallHeight;
  const cos = s.kind === 'rectangle' ? Math.cos(s.angleRad) : 1;
  const sin = s.kind === 'rectangle' ? Math.sin(s.angleRad) : 0;
  const half = s.kind === 'rectangle' ? s.size.map((w) => w / 2) : [];
  return mapSites(geometry, (q) => {
    const x = rel[ix][q[ix]];
    const y = iy >= 0 ? rel[iy][q[iy]] : 0;
    let inside: number;
    if (s.kind === 'rectangle') {
      const u = cos * x + sin * y;
      const v = -sin * x + cos * y;
      inside = slab(u, -half[0], half[0], sigma);
      if (dims >= 2) inside *= slab(v, -half[1], half[1], sigma);
      if (iz >= 0) inside *= slab(rel[iz][q[iz]], -half[2], half[2], sigma);
    } else {
      const rho = Math.sqrt(x * x + y * y);
      inside = s.kind === 'disc' ? slab(rho, -Infinity, s.radius, sigma) : slab(rho, s.innerRadius, s.outerRadius, sigma);
    }
    return H * (1 - inside);
  });
}

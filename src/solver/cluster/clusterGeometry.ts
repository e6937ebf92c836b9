// Geometry of one cluster of cluster Gutzwiller (cluster mean field) theory of the
// Bose-Hubbard model: a block of cx [x cy [x cz]] sites of the hypercubic lattice that is
// solved exactly, while its bonds to the rest of the lattice are decoupled by mean fields
// (multi-site mean-field theory: McIntosh, Pisarski, Gooding & Zaremba, arXiv:1111.4102;
// cluster Gutzwiller in inhomogeneous lattices: Luhmann, arXiv:1608.02905).
//
// Sites are numbered in C order like the lattice, first axis slowest:
// site = (x * cy + y) * cz + z. Bonds inside the cluster are open (no wrap-around). For
// each site the directions (axis, +-1) whose neighbour lies outside the cluster are listed;
// `externalImage` is that neighbour translated back into the cluster by one cluster
// length (periodic image), which is the neighbour's field in the uniform embedding where
// every cluster carries the same order parameters.

import { ParameterError } from '../../physics/parameterError.js';

export interface ClusterGeometry {
  /** cluster extent per lattice axis, e.g. [2, 2] */
  readonly shape: readonly number[];
  /** lattice dimension (1, 2 or 3) = shape.length */
  readonly dims: number;
  readonly siteCount: number;
  /** site coordinates, dims per site */
  readonly coords: Int32Array;
  readonly bondCount: number;
  /** bond b joins bondSiteA[b] and bondSiteB[b] = bondSiteA[b] + e_axis */
  readonly bondSiteA: Int32Array;
  readonly bondSiteB: Int32Array;
  readonly bondAxis: Int32Array;
  /** CSR over sites: external directions of site i are entries externalStart[i] .. externalStart[i+1]-1 */
  readonly externalStart: Int32Array;
  readonly externalAxis: Int32Array;
  /** +1 or -1 */
  readonly externalSign: Int8Array;
  /** site of the neighbour's periodic image inside the cluster (uniform embedding) */
  readonly externalImage: Int32Array;
  /** lattice coordination number 2 * dims */
  readonly coordination: number;
}

/** Largest number of sites in one cluster (the Fock dimension limits it long before). */
export const MAX_CLUSTER_SITES = 16;

export function createClusterGeometry(shape: readonly number[], parameter = 'cluster'): ClusterGeometry {
  const dims = shape.length;
  if (dims < 1 || dims > 3) throw new ParameterError(parameter, `expected 1 to 3 extents ([cx], [cx, cy] or [cx, cy, cz]), got ${dims}`);
  shape.forEach((c, d) => {
    if (!Number.isInteger(c) || c < 1) throw new ParameterError(`${parameter}[${d}]`, `expected an integer >= 1, got ${c}`);
  });
  let siteCount = 1;
  for (const c of shape) siteCount *= c;
  if (siteCount > MAX_CLUSTER_SITES) {
    throw new ParameterError(parameter, `at most ${MAX_CLUSTER_SITES} sites per cluster, got ${siteCount} (${shape.join('x')}); choose a smaller cluster`);
  }
  const stride = new Array<number>(dims);
  let s = 1;
  for (let d = dims - 1; d >= 0; d--) {
    stride[d] = s;
    s *= shape[d];
  }
  const coords = new Int32Array(siteCount * dims);
  for (let i = 0; i < siteCount; i++) {
    let r = i;
    for (let d = 0; d < dims; d++) {
      coords[i * dims + d] = Math.floor(r / stride[d]);
      r -= coords[i * dims + d] * stride[d];
    }
  }
  const a: number[] = [];
  const b: number[] = [];
  const ax: number[] = [];
  const extStart = new Int32Array(siteCount + 1);
  const extAxis: number[] = [];
  const extSign: number[] = [];
  const extImage: number[] = [];
  for (let i = 0; i < siteCount; i++) {
    extStart[i] = extAxis.length;
    for (let d = 0; d < dims; d++) {
      const x = coords[i * dims + d];
      if (x + 1 < shape[d]) {
        a.push(i);
        b.push(i + stride[d]);
        ax.push(d);
      }
      for (const sign of [-1, 1]) {
        const y = x + sign;
        if (y >= 0 && y < shape[d]) continue;
        const wrapped = (y + shape[d]) % shape[d];
        extAxis.push(d);
        extSign.push(sign);
        extImage.push(i + (wrapped - x) * stride[d]);
      }
    }
  }
  extStart[siteCount] = extAxis.length;
  return {
    shape: [...shape],
    dims,
    siteCount,
    coords,
    bondCount: a.length,
    bondSiteA: Int32Array.from(a),
    bondSiteB: Int32Array.from(b),
    bondAxis: Int32Array.from(ax),
    externalStart: extStart,
    externalAxis: Int32Array.from(extAxis),
    externalSign: Int8Array.from(extSign),
    externalImage: Int32Array.from(extImage),
    coordination: 2 * dims,
  };
}

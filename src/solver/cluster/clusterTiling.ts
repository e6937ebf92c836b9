// Tiling of a hypercubic lattice by clusters for the lattice-level cluster mean-field
// solver, and a colouring of the clusters for the Gauss-Seidel sweep.
//
// Tiling. Cluster origins are at multiples of the cluster shape. On an open axis whose
// length is not a multiple of the cluster extent the last cluster is shorter (a partial
// cluster, solved exactly like the others with its own geometry); on a periodic axis the
// extent must divide the length, so that every cluster sees the same translation
// environment. Bonds between two sites of one cluster that are adjacent inside it are
// exact; every other bond (to another cluster, or the wrap-around bond of a cluster that
// spans a whole periodic axis) is decoupled by the mean field.
//
// Colouring. Nearest-neighbour bonds join clusters whose cluster coordinates differ by one
// step along one axis, so colouring the clusters of each axis and adding the axis colours
// gives a proper colouring: with two colours per axis (X mod 2, open axes and periodic
// ones with an even number of clusters) the sum mod 2; if some periodic axis has an odd
// number K >= 3 of clusters it gets the colours 0, 1, 0, 1, ..., 2 (last cluster 2), and
// every sum is taken mod 3 (neighbours then differ by 1 or 2 mod 3). Clusters of one colour
// never touch, so updating them from the others is an exact block Gauss-Seidel step whose
// result does not depend on the order (or the thread) in which they are updated.

import { ParameterError } from '../../physics/parameterError.js';
import { createClusterGeometry, type ClusterGeometry } from './clusterGeometry.js';

export interface ClusterTiling {
  readonly latticeShape: readonly number[];
  readonly periodic: readonly boolean[];
  readonly clusterShape: readonly number[];
  /** clusters per axis */
  readonly counts: readonly number[];
  readonly clusterCount: number;
  /** distinct (clipped) cluster geometries */
  readonly geometries: readonly ClusterGeometry[];
  /** geometry index per cluster */
  readonly geometryOf: Uint8Array;
  readonly colourCount: number;
  readonly colour: Uint8Array;
  /** clusters of colour c: colourOrder[colourStart[c] .. colourStart[c+1]) */
  readonly colourStart: Int32Array;
  readonly colourOrder: Int32Array;
  /** lattice sites of cluster c in its geometry's site order: sites[siteStart[c] ..) */
  readonly siteStart: Int32Array;
  readonly sites: Int32Array;
  /** internal bonds of cluster c in its geometry's bond order: the site the bond is stored at, and the axis */
  readonly bondStart: Int32Array;
  readonly bondSite: Int32Array;
  readonly bondAxis: Uint8Array;
  /** mean-field bonds of the cluster site at position p of `sites`: entries externalStart[p] .. */
  readonly externalStart: Int32Array;
  /** the neighbouring lattice site */
  readonly externalSite: Int32Array;
  /** the site the bond is stored at (hopping arrays, LatticeModel convention) */
  readonly externalBondSite: Int32Array;
  readonly externalAxis: Uint8Array;
}

export function createClusterTiling(latticeShape: readonly number[], periodic: readonly boolean[], clusterShape: readonly number[]): ClusterTiling {
  const dims = latticeShape.length;
  if (clusterShape.length !== dims) {
    throw new ParameterError('cluster', `expected ${dims} extents for a ${dims}D lattice, got [${clusterShape.join(', ')}]`);
  }
  const counts: number[] = [];
  for (let d = 0; d < dims; d++) {
    const c = clusterShape[d];
    const L = latticeShape[d];
    if (!Number.isInteger(c) || c < 1) throw new ParameterError(`cluster[${d}]`, `expected an integer >= 1, got ${c}`);
    if (c > L) throw new ParameterError(`cluster[${d}]`, `the cluster extent ${c} exceeds the lattice length ${L}`);
    if (periodic[d] && L % c !== 0) {
      throw new ParameterError(`cluster[${d}]`, `on a periodic axis the cluster extent must divide the lattice length ${L}, got ${c}; choose a divisor or make the boundary open`);
    }
    counts.push(Math.ceil(L / c));
  }
  const latticeStride = new Array<number>(dims);
  const clusterStride = new Array<number>(dims);
  for (let d = dims - 1, s = 1, t = 1; d >= 0; d--) {
    latticeStride[d] = s;
    clusterStride[d] = t;
    s *= latticeShape[d];
    t *= counts[d];
  }
  let clusterCount = 1;
  for (const k of counts) clusterCount *= k;

  // Axis colourings.
  const threeColour = counts.some((k, d) => periodic[d] && k >= 3 && k % 2 === 1);
  const colourCount = threeColour ? 3 : 2;
  const axisColour = (d: number, X: number): number => (periodic[d] && counts[d] >= 3 && counts[d] % 2 === 1 && X === counts[d] - 1 ? 2 : X & 1);

  const geometries: ClusterGeometry[] = [];
  const geometryKeys: string[] = [];
  const geometryOf = new Uint8Array(clusterCount);
  const colour = new Uint8Array(clusterCount);
  const siteStart = new Int32Array(clusterCount + 1);
  const bondStart = new Int32Array(clusterCount + 1);
  const sites: number[] = [];
  const bondSite: number[] = [];
  const bondAxis: number[] = [];
  const extStart: number[] = [];
  const extSite: number[] = [];
  const extBond: number[] = [];
  const extAxis: number[] = [];
  const X = new Array<number>(dims);
  const origin = new Array<number>(dims);
  const pos = new Array<number>(dims);
  for (let c = 0; c < clusterCount; c++) {
    let r = c;
    let colourSum = 0;
    const shape: number[] = [];
    for (let d = 0; d < dims; d++) {
      X[d] = Math.floor(r / clusterStride[d]);
      r -= X[d] * clusterStride[d];
      origin[d] = X[d] * clusterShape[d];
      shape.push(Math.min(clusterShape[d], latticeShape[d] - origin[d]));
      colourSum += axisColour(d, X[d]);
    }
    colour[c] = colourSum % colourCount;
    const key = shape.join('x');
    let gi = geometryKeys.indexOf(key);
    if (gi < 0) {
      gi = geometries.length;
      geometryKeys.push(key);
      geometries.push(createClusterGeometry(shape));
    }
    geometryOf[c] = gi;
    const g = geometries[gi];
    siteStart[c] = sites.length;
    bondStart[c] = bondSite.length;
    const globalOf = (local: number): number => {
      let idx = 0;
      for (let d = 0; d < dims; d++) idx += (origin[d] + g.coords[local * dims + d]) * latticeStride[d];
      return idx;
    };
    for (let l = 0; l < g.siteCount; l++) sites.push(globalOf(l));
    for (let b = 0; b < g.bondCount; b++) {
      bondSite.push(globalOf(g.bondSiteA[b]));
      bondAxis.push(g.bondAxis[b]);
    }
    for (let l = 0; l < g.siteCount; l++) {
      extStart.push(extSite.length);
      const here = sites[siteStart[c] + l];
      for (let d = 0; d < dims; d++) {
        const x = origin[d] + g.coords[l * dims + d];
        for (const sign of [-1, 1]) {
          const local = g.coords[l * dims + d] + sign;
          if (local >= 0 && local < g.shape[d]) continue; // internal bond (exact)
          let y = x + sign;
          if (y < 0 || y >= latticeShape[d]) {
            if (!periodic[d] || latticeShape[d] < 2) continue;
            y = (y + latticeShape[d]) % latticeShape[d];
          }
          for (let e = 0; e < dims; e++) pos[e] = e === d ? y : origin[e] + g.coords[l * dims + e];
          let nb = 0;
          for (let e = 0; e < dims; e++) nb += pos[e] * latticeStride[e];
          extSite.push(nb);
          extBond.push(sign > 0 ? here : nb);
          extAxis.push(d);
        }
      }
    }
  }
  extStart.push(extSite.length);
  siteStart[clusterCount] = sites.length;
  bondStart[clusterCount] = bondSite.length;

  const colourStart = new Int32Array(colourCount + 1);
  for (let c = 0; c < clusterCount; c++) colourStart[colour[c] + 1]++;
  for (let k = 0; k < colourCount; k++) colourStart[k + 1] += colourStart[k];
  const fill = colourStart.slice(0, colourCount);
  const colourOrder = new Int32Array(clusterCount);
  for (let c = 0; c < clusterCount; c++) colourOrder[fill[colour[c]]++] = c;

  return {
    latticeShape: [...latticeShape],
    periodic: [...periodic],
    clusterShape: [...clusterShape],
    counts,
    clusterCount,
    geometries,
    geometryOf,
    colourCount,
    colour,
    colourStart,
    colourOrder,
    siteStart,
    sites: Int32Array.from(sites),
    bondStart,
    bondSite: Int32Array.from(bondSite),
    bondAxis: Uint8Array.from(bondAxis),
    externalStart: Int32Array.from(extStart),
    externalSite: Int32Array.from(extSite),
    externalBondSite: Int32Array.from(extBond),
    externalAxis: Uint8Array.from(extAxis),
  };
}

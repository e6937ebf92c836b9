// Connected superfluid clusters and whether one spans the cloud.
//
// In site-decoupled (Gutzwiller) mean-field theory a Bose glass shows up as superfluid
// puddles that do not connect across the system (Buonsante et al., PRA 76, 011602
// (2007)); the phase-coherent superfluid needs a connected path of superfluid sites
// from one side of the cloud to the other. This file labels clusters of marked sites
// (nearest-neighbour connectivity on the 1D chain, square or simple-cubic lattice) by
// breadth-first search with a preallocated queue, which is iterative (no recursion, so
// 128^3 = 2M sites are fine) and linear in the number of sites.
//
// Spanning, precisely:
// - The cloud is the set of occupied sites (option `occupied`; default every site).
//   Its bounding box along axis d is [lo_d, hi_d], the smallest and largest coordinate
//   of an occupied site.
// - Along an OPEN axis d with hi_d > lo_d, a cluster spans if it contains a site with
//   coordinate <= lo_d and a site with coordinate >= hi_d: it touches both opposite
//   faces of the cloud's bounding box. Axes along which the cloud is one site thick
//   (hi_d = lo_d), or the lattice is one site long, do not count: there is no distance
//   to cross.
// - Along a PERIODIC axis d (length >= 2), a cluster spans if it wraps around: it
//   contains a closed path of nearest-neighbour bonds whose net displacement along d is
//   a nonzero multiple of the length. This is detected by giving every visited site
//   an unwrapped coordinate (its winding number w_d: how many times the search path
//   crossed the boundary) and flagging a bond between two visited sites of the same
//   cluster whose winding numbers disagree with the bond (the breadth-first analogue of
//   the displacement-to-root bookkeeping that Newman & Ziff, PRE 64, 016706 (2001),
//   use to detect wrapping in union-find).
// - The result spans if at least one cluster spans along at least one axis.
//
// Labels are numbered 0, 1, ... in the order in which a C-order scan first meets each
// cluster, so they are deterministic.

import { gridSizes } from '../lattice/gridShape.js';

export interface ClusterLabellingOptions {
  /** Lattice shape [nx], [nx, ny] or [nx, ny, nz]; C order, first axis slowest. */
  shape: readonly number[];
  /** Periodic boundary per axis; default open along every axis. */
  periodic?: readonly boolean[];
  /** Sites that belong to the cloud (nonzero); default all sites. Sets the bounding box. */
  occupied?: Uint8Array;
}

export interface SuperfluidClusters {
  /** Cluster label per site, -1 where the mask is 0. */
  labels: Int32Array;
  /** Number of clusters. */
  count: number;
  /** Number of sites in each cluster, indexed by label. */
  sizes: Int32Array;
  /** Label of the largest cluster (lowest label on ties), -1 if there is none. */
  largestLabel: number;
  largestSize: number;
  /** Per cluster, bit d set when the cluster spans along axis d. */
  spanningAxes: Uint8Array;
  /** True when at least one cluster spans along at least one axis. */
  spans: boolean;
  /** Largest spanning cluster, -1 if none spans. */
  largestSpanningLabel: number;
  /** Marked sites, and marked sites that belong to a spanning cluster. */
  markedSites: number;
  sitesInSpanningClusters: number;
}

/**
 * Labels the connected clusters of sites where mask is nonzero and tests spanning
 * (definition in the file header).
 */
export function labelSuperfluidClusters(
  mask: Uint8Array,
  options: ClusterLabellingOptions,
): SuperfluidClusters {
  const { shape } = options;
  // Work in 3D: trailing axes of length 1 leave the C-order index unchanged.
  const sizes3 = gridSizes(shape, 'clusters');
  const [n0, n1, n2] = sizes3;
  const siteCount = n0 * n1 * n2;
  if (mask.length !== siteCount) {
    throw new RangeError(`clusters mask: expected ${siteCount} sites for shape ${JSON.stringify(shape)}, got ${mask.length}`);
  }
  const periodicIn = options.periodic ?? [];
  if (periodicIn.length > shape.length) {
    throw new RangeError(`clusters periodic: expected at most ${shape.length} flags, got ${periodicIn.length}`);
  }
  const periodic = [0, 1, 2].map((a) => periodicIn[a] === true && sizes3[a] >= 2);
  const occupied = options.occupied;
  if (occupied !== undefined && occupied.length !== siteCount) {
    throw new RangeError(`clusters occupied: expected ${siteCount} sites, got ${occupied.length}`);
  }

  // Bounding box of the cloud.
  const lo = [0, 0, 0];
  const hi = [n0 - 1, n1 - 1, n2 - 1];
  if (occupied !== undefined) {
    lo.fill(Number.MAX_SAFE_INTEGER);
    hi.fill(-1);
    let s = 0;
    for (let x = 0; x < n0; x++) {
      for (let y = 0; y < n1; y++) {
        for (let z = 0; z < n2; z++, s++) {
          if (occupied[s] === 0) continue;
          if (x < lo[0]) lo[0] = x;
          if (x > hi[0]) hi[0] = x;
          if (y < lo[1]) lo[1] = y;
          if (y > hi[1]) hi[1] = y;
          if (z < lo[2]) lo[2] = z;
          if (z > hi[2]) hi[2] = z;
        }
      }
    }
  }
  const openSpanAxis = [0, 1, 2].map((a) => !periodic[a] && hi[a] > lo[a]);

  const labels = new Int32Array(siteCount).fill(-1);
  const queue = new Int32Array(siteCount);
  const anyPeriodic = periodic[0] || periodic[1] || periodic[2];
  // Winding numbers of every site along the three axes (3 s + axis), only with a periodic
  // axis; along an open axis they stay 0.
  const winding = new Int32Array(anyPeriodic ? 3 * siteCount : 0);
  const strides = [n1 * n2, n2, 1];
  const last = [n0 - 1, n1 - 1, n2 - 1];
  const clusterSizes: number[] = [];
  const clusterSpans: number[] = [];
  let markedSites = 0;
  // Scratch, allocated once: coordinates of the current site, the cluster's bounding box.
  const coord = new Int32Array(3);
  const boxMin = new Int32Array(3);
  const boxMax = new Int32Array(3);

  for (let seedSite = 0; seedSite < siteCount; seedSite++) {
    if (mask[seedSite] === 0 || labels[seedSite] >= 0) continue;
    const label = clusterSizes.length;
    let wraps = 0;
    let head = 0;
    let tail = 0;
    queue[tail++] = seedSite;
    labels[seedSite] = label;
    boxMin.set(sizes3);
    boxMax.fill(-1);

    while (head < tail) {
      const s = queue[head++];
      coord[0] = (s / strides[0]) | 0;
      const rest = s - coord[0] * strides[0];
      coord[1] = (rest / strides[1]) | 0;
      coord[2] = rest - coord[1] * strides[1];
      for (let a = 0; a < 3; a++) {
        if (coord[a] < boxMin[a]) boxMin[a] = coord[a];
        if (coord[a] > boxMax[a]) boxMax[a] = coord[a];
      }
      // Six neighbours, the low then the high face of each axis. A bond across a periodic
      // boundary changes that axis's winding number by -1 (leaving through the low face)
      // or +1 (through the high face). (An axis of length 1 is never periodic here, so it
      // has no neighbours.)
      for (let a = 0; a < 3; a++) {
        for (let step = -1; step <= 1; step += 2) {
          let t = -1;
          let crossing = 0;
          if (step < 0 ? coord[a] > 0 : coord[a] < last[a]) t = s + step * strides[a];
          else if (periodic[a]) {
            t = s - step * last[a] * strides[a];
            crossing = step;
          }
          if (t < 0 || mask[t] === 0) continue;
          if (labels[t] < 0) {
            labels[t] = label;
            queue[tail++] = t;
            if (anyPeriodic) {
              const from = 3 * s;
              const to = 3 * t;
              winding[to] = winding[from];
              winding[to + 1] = winding[from + 1];
              winding[to + 2] = winding[from + 2];
              winding[to + a] += crossing;
            }
          } else if (anyPeriodic) {
            // Already in this cluster: inconsistent windings mean a loop around the torus.
            for (let b = 0; b < 3; b++) {
              if (winding[3 * t + b] !== winding[3 * s + b] + (b === a ? crossing : 0)) wraps |= 1 << b;
            }
          }
        }
      }
    }

    let spanBits = wraps;
    for (let a = 0; a < 3; a++) if (openSpanAxis[a] && boxMin[a] <= lo[a] && boxMax[a] >= hi[a]) spanBits |= 1 << a;
    clusterSizes.push(tail);
    clusterSpans.push(spanBits);
    markedSites += tail;
  }

  const count = clusterSizes.length;
  const sizes = Int32Array.from(clusterSizes);
  const spanningAxes = Uint8Array.from(clusterSpans);
  let largestLabel = -1;
  let largestSize = 0;
  let largestSpanningLabel = -1;
  let sitesInSpanningClusters = 0;
  for (let label = 0; label < count; label++) {
    if (sizes[label] > largestSize) {
      largestSize = sizes[label];
      largestLabel = label;
    }
    if (spanningAxes[label] !== 0) {
      sitesInSpanningClusters += sizes[label];
      if (largestSpanningLabel < 0 || sizes[label] > sizes[largestSpanningLabel]) largestSpanningLabel = label;
    }
  }
  return {
    labels,
    count,
    sizes,
    largestLabel,
    largestSize,
    spanningAxes,
    spans: largestSpanningLabel >= 0,
    largestSpanningLabel,
    markedSites,
    sitesInSpanningClusters,
  };
}

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
  if (!Array.isArray(shape) || shape.length < 1 || shape.length > 3) {
    throw new RangeError(
      `clusters shape: expected [nx], [nx, ny] or [nx, ny, nz], got ${JSON.stringify(shape)}`,
    );
  }
  shape.forEach((n, axis) => {
    if (!Number.isInteger(n) || n < 1) {
      throw new RangeError(`clusters shape[${axis}]: expected an integer >= 1, got ${n}`);
    }
  });
  // Work in 3D: trailing axes of length 1 leave the C-order index unchanged.
  const n0 = shape[0];
  const n1 = shape.length > 1 ? shape[1] : 1;
  const n2 = shape.length > 2 ? shape[2] : 1;
  const sizes3 = [n0, n1, n2];
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
  // Winding numbers only for periodic axes (zero-length arrays otherwise).
  const winding = [0, 1, 2].map((a) => new Int32Array(periodic[a] ? siteCount : 0));
  const [w0, w1, w2] = winding;
  const [p0, p1, p2] = periodic;
  const anyPeriodic = p0 || p1 || p2;
  const stride0 = n1 * n2;
  const stride1 = n2;
  const clusterSizes: number[] = [];
  const clusterSpans: number[] = [];
  let markedSites = 0;

  const last0 = n0 - 1;
  const last1 = n1 - 1;
  const last2 = n2 - 1;

  for (let seedSite = 0; seedSite < siteCount; seedSite++) {
    if (mask[seedSite] === 0 || labels[seedSite] >= 0) continue;
    const label = clusterSizes.length;
    let wraps = 0;
    let head = 0;
    let tail = 0;
    queue[tail++] = seedSite;
    labels[seedSite] = label;
    if (p0) w0[seedSite] = 0;
    if (p1) w1[seedSite] = 0;
    if (p2) w2[seedSite] = 0;
    let min0 = n0, max0 = -1, min1 = n1, max1 = -1, min2 = n2, max2 = -1;

    while (head < tail) {
      const s = queue[head++];
      const x = (s / stride0) | 0;
      const rest = s - x * stride0;
      const y = (rest / stride1) | 0;
      const z = rest - y * stride1;
      if (x < min0) min0 = x;
      if (x > max0) max0 = x;
      if (y < min1) min1 = y;
      if (y > max1) max1 = y;
      if (z < min2) min2 = z;
      if (z > max2) max2 = z;
      const ws0 = p0 ? w0[s] : 0;
      const ws1 = p1 ? w1[s] : 0;
      const ws2 = p2 ? w2[s] : 0;
      // Six neighbours. A bond across a periodic boundary changes that axis's winding
      // number by -1 (leaving through the low face) or +1 (through the high face).
      // (An axis of length 1 is never periodic here, so it has no neighbours.)
      for (let slot = 0; slot < 6; slot++) {
        let t = -1;
        let d0 = 0;
        let d1 = 0;
        let d2 = 0;
        switch (slot) {
          case 0:
            if (x > 0) t = s - stride0;
            else if (p0) (t = s + last0 * stride0), (d0 = -1);
            break;
          case 1:
            if (x < last0) t = s + stride0;
            else if (p0) (t = s - last0 * stride0), (d0 = 1);
            break;
          case 2:
            if (y > 0) t = s - stride1;
            else if (p1) (t = s + last1 * stride1), (d1 = -1);
            break;
          case 3:
            if (y < last1) t = s + stride1;
            else if (p1) (t = s - last1 * stride1), (d1 = 1);
            break;
          case 4:
            if (z > 0) t = s - 1;
            else if (p2) (t = s + last2), (d2 = -1);
            break;
          default:
            if (z < last2) t = s + 1;
            else if (p2) (t = s - last2), (d2 = 1);
        }
        if (t < 0 || mask[t] === 0) continue;
        if (labels[t] < 0) {
          labels[t] = label;
          if (p0) w0[t] = ws0 + d0;
          if (p1) w1[t] = ws1 + d1;
          if (p2) w2[t] = ws2 + d2;
          queue[tail++] = t;
        } else if (anyPeriodic) {
          // Already in this cluster: inconsistent windings mean a loop around the torus.
          if (p0 && w0[t] !== ws0 + d0) wraps |= 1;
          if (p1 && w1[t] !== ws1 + d1) wraps |= 2;
          if (p2 && w2[t] !== ws2 + d2) wraps |= 4;
        }
      }
    }

    let spanBits = wraps;
    if (openSpanAxis[0] && min0 <= lo[0] && max0 >= hi[0]) spanBits |= 1;
    if (openSpanAxis[1] && min1 <= lo[1] && max1 >= hi[1]) spanBits |= 2;
    if (openSpanAxis[2] && min2 <= lo[2] && max2 >= hi[2]) spanBits |= 4;
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

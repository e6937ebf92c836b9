// Which superfluid clusters enclose the trap centre: the ring (2D) or spherical shell (3D)
// of superfluid between two Mott shells of a trapped cloud. Such a cluster is connected all
// the way around the cloud, so it is a global superfluid even though it touches no face of
// the cloud's bounding box; the trapped-cloud analogue of a cluster that wraps around a
// periodic axis. Puddles, which the disorder cuts out of such a ring, enclose nothing.
//
// A cluster encloses the centre site when the centre is not in the cluster and a flood fill
// from the centre through all sites outside the cluster cannot reach the outer faces of the
// lattice. The cluster is nearest-neighbour connected, so the fill must use the full
// neighbourhood (8 in 2D, 26 in 3D): the complementary connectivity of digital topology,
// under which a closed nearest-neighbour loop separates inside from outside and a loop that
// only closes across a diagonal does not (Rosenfeld, Am. Math. Monthly 86, 621 (1979), recalled
// from memory). Only clusters whose bounding box contains the centre
// strictly along every axis longer than one site can do so, so the fill (linear in the
// sites, preallocated queue) runs for a few candidates only.

import { gridSizes } from '../lattice/gridShape.js';

/**
 * Per cluster label, 1 when the cluster encloses `centreSite`. `labels` holds the cluster
 * label of each site, -1 elsewhere (superfluidClusters.ts).
 */
export function clustersEnclosing(labels: Int32Array, clusterCount: number, shape: readonly number[], centreSite: number): Uint8Array {
  const sizes = gridSizes(shape, 'clustersEnclosing');
  const [n0, n1, n2] = sizes;
  const count = n0 * n1 * n2;
  if (labels.length !== count) throw new RangeError(`clustersEnclosing labels: expected ${count} sites, got ${labels.length}`);
  const out = new Uint8Array(clusterCount);
  if (clusterCount === 0 || !(centreSite >= 0 && centreSite < count)) return out;
  const strides = [n1 * n2, n2, 1];
  const coords = (s: number, into: Int32Array): void => {
    into[0] = (s / strides[0]) | 0;
    const rest = s - into[0] * strides[0];
    into[1] = (rest / strides[1]) | 0;
    into[2] = rest - into[1] * strides[1];
  };
  // Bounding boxes of all clusters in one pass.
  const boxMin = new Int32Array(3 * clusterCount).fill(2 ** 30);
  const boxMax = new Int32Array(3 * clusterCount).fill(-1);
  const c = new Int32Array(3);
  for (let s = 0; s < count; s++) {
    const label = labels[s];
    if (label < 0) continue;
    coords(s, c);
    for (let a = 0; a < 3; a++) {
      if (c[a] < boxMin[3 * label + a]) boxMin[3 * label + a] = c[a];
      if (c[a] > boxMax[3 * label + a]) boxMax[3 * label + a] = c[a];
    }
  }
  const centre = new Int32Array(3);
  coords(centreSite, centre);
  const centreLabel = labels[centreSite];
  const visited = new Int32Array(count).fill(-1);
  const queue = new Int32Array(count);
  for (let label = 0; label < clusterCount; label++) {
    if (label === centreLabel) continue;
    let candidate = true;
    for (let a = 0; a < 3; a++) {
      if (sizes[a] === 1) continue;
      if (!(boxMin[3 * label + a] < centre[a] && centre[a] < boxMax[3 * label + a])) candidate = false;
    }
    if (!candidate) continue;
    // Flood fill from the centre through sites not in this cluster; `visited` is stamped
    // with the label so it needs no clearing between candidates.
    let head = 0;
    let tail = 0;
    queue[tail++] = centreSite;
    visited[centreSite] = label;
    let escaped = false;
    while (head < tail && !escaped) {
      const s = queue[head++];
      coords(s, c);
      for (let a = 0; a < 3; a++) {
        if (sizes[a] > 1 && (c[a] === 0 || c[a] === sizes[a] - 1)) escaped = true;
      }
      if (escaped) break;
      // The full neighbourhood; axes of length 1 have no neighbours (offset 0 only).
      for (let d0 = sizes[0] > 1 ? -1 : 0; d0 <= (sizes[0] > 1 ? 1 : 0); d0++) {
        for (let d1 = sizes[1] > 1 ? -1 : 0; d1 <= (sizes[1] > 1 ? 1 : 0); d1++) {
          for (let d2 = sizes[2] > 1 ? -1 : 0; d2 <= (sizes[2] > 1 ? 1 : 0); d2++) {
            if (d0 === 0 && d1 === 0 && d2 === 0) continue;
            const t = s + d0 * strides[0] + d1 * strides[1] + d2 * strides[2];
            if (labels[t] === label || visited[t] === label) continue;
            visited[t] = label;
            queue[tail++] = t;
          }
        }
      }
    }
    if (!escaped) out[label] = 1;
  }
  return out;
}

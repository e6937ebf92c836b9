// The bulk of a cloud, on which superfluid spanning is decided (DESIGN.md section 1: "test
// spanning on the bulk, not a one-site rim").
//
// Every trapped cloud ends in a dilute skin where the local filling goes to zero; at T = 0 in
// mean field that skin is always superfluid (a few atoms per hundred sites are enough), and
// it wraps around the whole cloud. Counted as part of the cloud it connects any two sides,
// so a cloud made of insulating shells and disconnected puddles would "span". The bulk is
// therefore (common practice for percolation in inhomogeneous samples, our choice of
// numbers, see phaseThresholds.ts):
//   1. the sites whose density is at least `densityFraction` of the peak density, then
//   2. eroded `erosionSites` times: a site stays only if all its nearest neighbours along the
//      axes longer than one site are in the bulk (across a periodic boundary the neighbour
//      wraps; beyond an open lattice face there is no bulk).

import { gridSizes } from '../lattice/gridShape.js';

export interface CloudBulk {
  /** 1 on bulk sites */
  mask: Uint8Array;
  sites: number;
  /** the density threshold used (fraction x peak) */
  densityThreshold: number;
  peakDensity: number;
}

export function cloudBulk(
  density: Float64Array,
  shape: readonly number[],
  periodic: readonly boolean[] | undefined,
  densityFraction: number,
  erosionSites: number,
): CloudBulk {
  const [n0, n1, n2] = gridSizes(shape, 'cloudBulk');
  const count = n0 * n1 * n2;
  if (density.length !== count) throw new RangeError(`cloudBulk density: expected ${count} sites, got ${density.length}`);
  // gridSizes pads with trailing axes of length 1, so physical axis d is grid axis d.
  const wrap = [0, 1, 2].map((d) => periodic?.[d] === true);
  let peak = 0;
  for (let i = 0; i < count; i++) if (density[i] > peak) peak = density[i];
  const threshold = densityFraction * peak;
  let mask = new Uint8Array(count);
  for (let i = 0; i < count; i++) mask[i] = peak > 0 && density[i] >= threshold ? 1 : 0;
  const sizes = [n0, n1, n2];
  const strides = [n1 * n2, n2, 1];
  let next = new Uint8Array(count);
  for (let pass = 0; pass < erosionSites; pass++) {
    let i = 0;
    for (let x = 0; x < n0; x++) {
      for (let y = 0; y < n1; y++) {
        for (let z = 0; z < n2; z++, i++) {
          if (mask[i] === 0) {
            next[i] = 0;
            continue;
          }
          let keep = 1;
          for (let a = 0; a < 3 && keep === 1; a++) {
            const len = sizes[a];
            if (len === 1) continue;
            const c = a === 0 ? x : a === 1 ? y : z;
            const s = strides[a];
            // low neighbour
            if (c > 0) keep &= mask[i - s];
            else keep &= wrap[a] ? mask[i + (len - 1) * s] : 0;
            // high neighbour
            if (c < len - 1) keep &= mask[i + s];
            else keep &= wrap[a] ? mask[i - (len - 1) * s] : 0;
          }
          next[i] = keep;
        }
      }
    }
    const swap = mask;
    mask = next;
    next = swap;
  }
  let sites = 0;
  for (let i = 0; i < count; i++) sites += mask[i];
  return { mask, sites, densityThreshold: threshold, peakDensity: peak };
}

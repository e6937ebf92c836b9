// The iterated windowed centroid (src/observables/cloudCentre.ts) on sampled Gaussians of
// known centre, and against the plain form of the same three steps written out here
// (background = median of the outer faces, start at the maximum of the 3-point box
// smoothing, centroid inside a disk of 3 sigma0 until it stops moving), which the fast
// loops must match to the bit. Why a sampled Gaussian's centroid is its centre to far below
// 1e-9 when the centre is a point of symmetry of the grid (an integer or half-integer
// index): every pixel in the window then has its mirror image in it, with the same value.
// At any other centre the disk window's discrete edge breaks the symmetry: its pixels lie
// near 3 sigma, where the Gaussian is exp(-4.5) = 1 % of its peak, so the centre may move by
// a few thousandths of a pixel (hand estimate: 1 % weight x the few edge pixels that come or
// go x a lever of 7.5 pixels, over the cloud's weight); 0.01 pixel is allowed.

import { describe, expect, it } from 'vitest';
import { findCloudCentre } from '../../src/observables/cloudCentre.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

function gaussian(shape: number[], centre: number[], sigma: number, offset: number): Float64Array {
  const total = shape.reduce((a, b) => a * b, 1);
  const out = new Float64Array(total);
  for (let i = 0; i < total; i++) {
    let rem = i;
    let d2 = 0;
    for (let d = shape.length - 1; d >= 0; d--) {
      const x = rem % shape[d];
      rem = (rem - x) / shape[d];
      d2 += (x - centre[d]) ** 2;
    }
    out[i] = Math.exp(-d2 / (2 * sigma * sigma)) + offset;
  }
  return out;
}

/** The plain form of findCloudCentre, written out independently of its loops. */
function plainCentre(values: Float64Array, shape: number[]): { centre: number[]; sigma: number[]; background: number; iterations: number } {
  const n = [shape[0], shape[1] ?? 1, shape[2] ?? 1];
  const at = (x: number, y: number, z: number) => values[(x * n[1] + y) * n[2] + z];
  const faces: number[] = [];
  const points: number[][] = [];
  for (let x = 0; x < n[0]; x++) for (let y = 0; y < n[1]; y++) for (let z = 0; z < n[2]; z++) points.push([x, y, z]);
  for (const [x, y, z] of points) {
    if ([x, y, z].some((v, d) => n[d] > 2 && (v === 0 || v === n[d] - 1))) faces.push(at(x, y, z));
  }
  faces.sort((a, b) => a - b);
  const m = faces.length >> 1;
  const background = faces.length === 0 ? 0 : faces.length % 2 ? faces[m] : (faces[m - 1] + faces[m]) / 2;
  let peak = -Infinity;
  let start = [0, 0, 0];
  const smooth: number[] = [];
  for (const [x, y, z] of points) {
    let s = 0;
    let c = 0;
    for (let a = Math.max(0, x - 1); a <= Math.min(n[0] - 1, x + 1); a++)
      for (let b = Math.max(0, y - 1); b <= Math.min(n[1] - 1, y + 1); b++)
        for (let e = Math.max(0, z - 1); e <= Math.min(n[2] - 1, z + 1); e++) {
          s += at(a, b, e);
          c++;
        }
    const v = s / c - background;
    smooth.push(v);
    if (v > peak) {
      peak = v;
      start = [x, y, z];
    }
  }
  const above = smooth.filter((v) => v > peak / 2).length;
  const span = n.filter((l) => l > 1).length || 1;
  const r = span === 1 ? above / 2 : span === 2 ? Math.sqrt(above / Math.PI) : Math.cbrt((3 * above) / (4 * Math.PI));
  const window = (3 * Math.max(r, 0.5)) / Math.sqrt(2 * Math.LN2);
  const c = start.slice();
  const moments = () => {
    let w = 0;
    const m1 = [0, 0, 0];
    const m2 = [0, 0, 0];
    for (let x = Math.max(0, Math.ceil(c[0] - window)); x <= Math.min(n[0] - 1, Math.floor(c[0] + window)); x++)
      for (let y = Math.max(0, Math.ceil(c[1] - window)); y <= Math.min(n[1] - 1, Math.floor(c[1] + window)); y++)
        for (let z = Math.max(0, Math.ceil(c[2] - window)); z <= Math.min(n[2] - 1, Math.floor(c[2] + window)); z++) {
          const d = [x - c[0], y - c[1], z - c[2]];
          if (d[0] * d[0] + d[1] * d[1] + d[2] * d[2] > window * window) continue;
          const v = at(x, y, z) - background;
          w += v;
          for (let k = 0; k < 3; k++) {
            m1[k] += v * d[k];
            m2[k] += v * d[k] * d[k];
          }
        }
    return { w, m1, m2 };
  };
  let iterations = 0;
  while (iterations < 100) {
    const { w, m1 } = moments();
    iterations++;
    if (!(w > 0)) break;
    const move = m1.map((v) => v / w);
    move.forEach((v, k) => (c[k] += v));
    if (Math.max(...move.map(Math.abs)) < 1e-9) break;
  }
  const { w, m1, m2 } = moments();
  const dims = shape.length;
  return {
    centre: c.slice(0, dims),
    sigma: c.slice(0, dims).map((_, d) => (w > 0 ? Math.sqrt(Math.max(m2[d] / w - (m1[d] / w) ** 2, 0)) : 0)),
    background,
    iterations,
  };
}

describe('findCloudCentre', () => {
  it.each([
    [[90, 90], [44.5, 47]],
    [[40, 31, 28], [19, 15.5, 13]],
    [[61], [29.5]],
  ])('shape %j: a sampled Gaussian on a flat offset, symmetric about %j, is centred there to 1e-9', (shape, centre) => {
    const r = findCloudCentre(gaussian(shape, centre, 2.5, 0.2), shape);
    r.centre.forEach((c, d) => expect(Math.abs(c - centre[d])).toBeLessThan(1e-9));
    expect(r.background).toBeCloseTo(0.2, 12);
  });

  it.each([
    [[90, 90], [44.37, 47.81]],
    [[40, 31, 28], [19.2, 15.6, 13.05]],
    [[61], [29.73]],
  ])('shape %j: a sampled Gaussian off the grid symmetry, at %j, is centred to 0.01 pixel', (shape, centre) => {
    const r = findCloudCentre(gaussian(shape, centre, 2.5, 0.2), shape);
    r.centre.forEach((c, d) => expect(Math.abs(c - centre[d])).toBeLessThan(0.01));
  });

  it('matches the plain form of the three steps to the bit, on noisy pictures of every rank', () => {
    const random = seededRandom('test/cloud-centre-plain');
    for (const shape of [[90, 90], [33, 41], [20, 18, 15], [50], [7, 1, 9], [3, 3]]) {
      for (let k = 0; k < 6; k++) {
        const centre = shape.map((s) => random.uniform() * s);
        const values = gaussian(shape, centre, 1 + 5 * random.uniform(), 0.3);
        for (let i = 0; i < values.length; i++) values[i] += 0.05 * random.normal();
        const fast = findCloudCentre(values, shape);
        const plain = plainCentre(values, shape);
        expect(Array.from(fast.centre)).toEqual(plain.centre);
        expect(Array.from(fast.sigma)).toEqual(plain.sigma);
        expect(fast.background).toBe(plain.background);
        expect(fast.iterations).toBe(plain.iterations);
      }
    }
  });

  it('refuses a picture with nothing above its background', () => {
    expect(() => findCloudCentre(new Float64Array(25).fill(1), [5, 5])).toThrow(/no positive values above its background/);
  });
});

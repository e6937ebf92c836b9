// Radial profiles and the cloud centre (moved from test/numerics/fit.test.ts).

import { describe, expect, it } from 'vitest';
import { findCloudCentre, radialProfile } from '../../src/observables/radialProfile.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

function gaussianImage(nx: number, ny: number, cx: number, cy: number, sx: number, sy: number, amplitude: number): Float64Array {
  const out = new Float64Array(nx * ny);
  for (let x = 0; x < nx; x++) {
    for (let y = 0; y < ny; y++) {
      out[x * ny + y] = amplitude * Math.exp(-((x - cx) ** 2) / (2 * sx * sx) - ((y - cy) ** 2) / (2 * sy * sy));
    }
  }
  return out;
}

describe('radial profile', () => {
  it('recovers an analytic 2D Gaussian at the bin radii', () => {
    // Inside a bin of width w the profile is the average of f over the bin's points;
    // f(<r>) differs from it by about f'' var(r) / 2 <= |f''| w^2 / 24, i.e. < 1e-3 A for
    // w = 0.5 px and s = 12 px (|f''| <= A / s^2). Tolerance 1e-3 A.
    const s = 12;
    const image = gaussianImage(81, 77, 40.3, 37.6, s, s, 5);
    const profile = radialProfile({ density: image }, { shape: [81, 77], binWidth: 0.5, centre: [40.3, 37.6] });
    let checked = 0;
    for (let b = 0; b < 60; b++) {
      const r = profile.meanRadius[b];
      if (Number.isNaN(r)) continue;
      expect(Math.abs(profile.fields.density.mean[b] - 5 * Math.exp((-r * r) / (2 * s * s)))).toBeLessThan(5e-3);
      checked++;
    }
    expect(checked).toBeGreaterThan(50);
  });

  it('counts about 2 pi r dr points per annulus', () => {
    // Elementary bound (unit cells of the points inside the circle of radius r - 1/sqrt 2
    // lie in the disk, and the disk lies in those within r + 1/sqrt 2; Gauss circle
    // problem): pi (r2 - h)^2 - pi (r1 + h)^2 <= count <= pi (r2 + h)^2 - pi (r1 - h)^2,
    // h = 1/sqrt 2. On average over 20 annuli the count is the area to 2 %: the lattice-point
    // error of a disk grows only like r^(2/3) (Hardy-Landau), ~10 points at r = 25.
    const size = 61;
    const image = new Float64Array(size * size).fill(1);
    const dr = 1;
    const profile = radialProfile({ one: image }, { shape: [size, size], binWidth: dr, centre: [30, 30] });
    const h = Math.SQRT1_2;
    let counted = 0;
    let area = 0;
    for (let b = 5; b < 25; b++) {
      const r1 = b * dr;
      const r2 = r1 + dr;
      const count = profile.count[b];
      expect(count).toBeGreaterThanOrEqual(Math.PI * ((r2 - h) ** 2 - (r1 + h) ** 2));
      expect(count).toBeLessThanOrEqual(Math.PI * ((r2 + h) ** 2 - (r1 - h) ** 2));
      counted += count;
      area += 2 * Math.PI * ((r1 + r2) / 2) * dr;
      expect(profile.fields.one.mean[b]).toBe(1);
      expect(profile.fields.one.std[b]).toBe(0);
    }
    expect(Math.abs(counted / area - 1)).toBeLessThan(0.02);
  });

  it('undoes an elliptical cloud with per-axis scale factors, also in 3D', () => {
    // A harmonic trap with omega_x = 2 omega_y gives sx = sy / 2; scaling x offsets by 2
    // makes the cloud round with width sy. Same tolerance argument as above.
    const sy = 10;
    const image = gaussianImage(51, 81, 25, 40, sy / 2, sy, 1);
    const profile = radialProfile({ n: image }, { shape: [51, 81], binWidth: 1, centre: [25, 40], axisScale: [2, 1] });
    for (let b = 1; b < 20; b++) {
      const r = profile.meanRadius[b];
      expect(Math.abs(profile.fields.n.mean[b] - Math.exp((-r * r) / (2 * sy * sy)))).toBeLessThan(3e-3);
    }
    const n = 31;
    const s = 5;
    const field = new Float64Array(n * n * n);
    for (let x = 0, i = 0; x < n; x++) for (let y = 0; y < n; y++) for (let z = 0; z < n; z++, i++) {
      field[i] = Math.exp(-((x - 15) ** 2 + (y - 15) ** 2 + (z - 15) ** 2) / (2 * s * s));
    }
    const p3 = radialProfile({ n: field }, { shape: [n, n, n], binWidth: 0.5 });
    for (let d = 0; d < 3; d++) expect(p3.centre[d]).toBeCloseTo(15, 9);
    let shells = 0;
    for (let b = 1; b < 25; b++) {
      const r = p3.meanRadius[b];
      if (Number.isNaN(r)) continue; // e.g. [0.5, 1): no grid point at those distances
      shells++;
      expect(Math.abs(p3.fields.n.mean[b] - Math.exp((-r * r) / (2 * s * s)))).toBeLessThan(2e-3);
    }
    expect(shells).toBeGreaterThan(20);
  });

  it('averages the local chemical potential mu - eps(r) per bin', () => {
    // Local-density approximation: mu_local = mu - V r^2 for eps = V r^2. Averaged over a
    // bin, <r^2> = <r>^2 + var(r) with var(r) <= w^2 / 4; tolerance V w^2 / 4.
    const size = 41;
    const v = 0.02;
    const mu = 3;
    const eps = new Float64Array(size * size);
    for (let x = 0; x < size; x++) for (let y = 0; y < size; y++) eps[x * size + y] = v * ((x - 20) ** 2 + (y - 20) ** 2);
    const profile = radialProfile({ eps }, { shape: [size, size], binWidth: 1, centre: [20, 20], localChemicalPotential: { mu, siteEnergy: eps } });
    const local = profile.localChemicalPotential!;
    for (let b = 0; b < 20; b++) {
      const r = profile.meanRadius[b];
      expect(Math.abs(local[b] - (mu - v * r * r))).toBeLessThanOrEqual(v / 4 + 1e-12);
      expect(local[b] + profile.fields.eps.mean[b]).toBeCloseTo(mu, 12);
    }
  });

  it('reports the sample standard deviation within a bin', () => {
    // Values 1, 3 in one bin: mean 2, sample standard deviation sqrt(2) (n - 1 denominator).
    const profile = radialProfile({ f: new Float64Array([1, 3]) }, { shape: [2], binWidth: 10, centre: [0.5] });
    expect(profile.count[0]).toBe(2);
    expect(profile.fields.f.mean[0]).toBe(2);
    expect(profile.fields.f.std[0]).toBeCloseTo(Math.SQRT2, 14);
  });
});

describe('cloud centre', () => {
  it('finds the centre of a noisy Gaussian on a background to 0.15 px', () => {
    // The centre of a symmetric cloud is its symmetry point. A flat background pulls a
    // plain centroid towards the image centre; the windowed centroid must not be.
    // Statistical error of a centroid: noise * sqrt(sum_window dx^2) / total weight
    // = 2 * sqrt(pi 18^4 / 4) / (2 pi 5 7 100) = 0.026 px per axis for this image
    // (window radius 3 sigma ~ 18 px); tolerance about 5 of those.
    const nx = 70;
    const ny = 90;
    const image = gaussianImage(nx, ny, 23.27, 61.81, 5, 7, 100);
    const random = seededRandom('centre/1');
    for (let i = 0; i < image.length; i++) image[i] += 2 + 2 * random.normal();
    const found = findCloudCentre(image, [nx, ny]);
    expect(Math.abs(found.centre[0] - 23.27)).toBeLessThan(0.15);
    expect(Math.abs(found.centre[1] - 61.81)).toBeLessThan(0.15);
    expect(found.background).toBeGreaterThan(1.5);
    expect(found.background).toBeLessThan(2.5);
    expect(() => findCloudCentre(new Float64Array(4), [2, 2])).toThrow(/no positive values/);
  });
});

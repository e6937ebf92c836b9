// Camera model: column density, point-spread function, resampling to pixels, shot noise
// and parity projection. Every check names the outside fact it rests on.

import { describe, expect, it } from 'vitest';
import { columnDensity } from '../../src/imaging/columnDensity.js';
import { discreteGaussianKernel, gaussianBlur, psfSigmaUm } from '../../src/imaging/pointSpreadFunction.js';
import { objectPlanePixelUm, resampleToCamera } from '../../src/imaging/cameraResample.js';
import { addShotNoise, logFactorial, samplePoisson } from '../../src/imaging/shotNoise.js';
import { expectedParityImage, oddOccupationProbability, sampleParityShot } from '../../src/imaging/parityProjection.js';
import { totalOf, type PlanarField } from '../../src/imaging/planarField.js';
import { inSituImage } from '../../src/imaging/inSituImage.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

function randomField(length: number, seed: string): Float64Array {
  const random = seededRandom(seed);
  return Float64Array.from({ length }, () => 3 * random.uniform());
}

function plainSum(values: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) s += values[i];
  return s;
}

/** Relative difference, for conservation checks. */
function relative(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

describe('column density', () => {
  // Column density is the sum of the occupations along the line of sight (DESIGN.md
  // section 4); the reference below indexes the C-order array directly.
  it('sums along each axis and conserves the atom number to 1e-9', () => {
    const shape = [5, 6, 7];
    const field = randomField(5 * 6 * 7, 'column/1');
    const at = (x: number, y: number, z: number) => field[(x * 6 + y) * 7 + z];
    for (const axis of [0, 1, 2] as const) {
      const col = columnDensity(field, shape, axis);
      const kept = [0, 1, 2].filter((d) => d !== axis);
      expect([col.nx, col.ny]).toEqual([shape[kept[0]], shape[kept[1]]]);
      expect(col.keptAxes).toEqual(kept);
      for (let u = 0; u < col.nx; u++) {
        for (let v = 0; v < col.ny; v++) {
          let reference = 0;
          for (let w = 0; w < shape[axis]; w++) {
            const idx = [0, 0, 0];
            idx[axis] = w;
            idx[kept[0]] = u;
            idx[kept[1]] = v;
            reference += at(idx[0], idx[1], idx[2]);
          }
          // Same terms, possibly summed in another order: rounding only.
          expect(Math.abs(col.values[u * col.ny + v] - reference)).toBeLessThan(1e-13);
        }
      }
      expect(relative(totalOf(col), plainSum(field))).toBeLessThan(1e-9);
    }
  });

  it('passes a 2D layer through unchanged when imaged perpendicular to it', () => {
    const layer = randomField(8 * 9, 'column/2');
    const col = columnDensity(layer, [8, 9]);
    expect(col.nx).toBe(8);
    expect(col.ny).toBe(9);
    expect(Array.from(col.values)).toEqual(Array.from(layer));
  });

  it('names the mismatch when the field does not fit the shape', () => {
    expect(() => columnDensity(new Float64Array(10), [3, 4], 2)).toThrow(/12 sites, field has 10/);
  });
});

describe('point-spread function', () => {
  it('uses sigma = 0.21 lambda / NA for the Airy core (Zhang, Zerubia, Olivo-Marin, Appl. Opt. 46, 1819 (2007))', () => {
    // 780 nm imaging light, NA 0.5: 0.21 * 0.780 um / 0.5 = 0.3276 um.
    expect(psfSigmaUm(780, 0.5)).toBeCloseTo(0.3276, 12);
    expect(psfSigmaUm(671, 0.8)).toBeCloseTo((0.21 * 0.671) / 0.8, 12);
    expect(() => psfSigmaUm(780, 0)).toThrow(/numerical aperture/);
  });

  it('has a FWHM within 5 % of the Airy disc it approximates', () => {
    // Airy pattern I(v) = [2 J1(v) / v]^2 with v = 2 pi NA r / lambda (Born & Wolf,
    // Principles of Optics, section 8.5.2). J1 from its power series (A&S 9.1.10); the
    // half-maximum point is found by bisection here, not taken from a table.
    const j1 = (v: number) => {
      let term = v / 2;
      let sum = term;
      for (let k = 1; k < 40; k++) {
        term *= -(v * v) / 4 / (k * (k + 1));
        sum += term;
      }
      return sum;
    };
    const airy = (v: number) => (2 * j1(v) / v) ** 2;
    let lo = 0.5;
    let hi = 3;
    for (let i = 0; i < 80; i++) {
      const mid = (lo + hi) / 2;
      if (airy(mid) > 0.5) lo = mid;
      else hi = mid;
    }
    const airyFwhmOverLambdaOverNa = (2 * lo) / (2 * Math.PI);
    const gaussFwhm = 2 * Math.sqrt(2 * Math.LN2) * (psfSigmaUm(1000, 1) / 1); // lambda = 1 um, NA = 1
    // Zhang et al. fit the whole core, not the half-maximum alone; 5 % is the spread
    // one expects between such criteria (their Table 1 approximations differ by a few %).
    expect(Math.abs(gaussFwhm / airyFwhmOverLambdaOverNa - 1)).toBeLessThan(0.05);
  });

  it('builds the discrete Gaussian exp(-t) I_n(t): weights from the Bessel power series, sum 1, variance sigma^2', () => {
    // I_n(t) = sum_k (t/2)^(2k+n) / (k! (k+n)!)  (Abramowitz & Stegun 9.6.10), and
    // Lindeberg, IEEE PAMI 12, 234 (1990): the kernel exp(-t) I_n(t) sums to 1 and has
    // variance exactly t. Tolerance: rounding in the series and the recurrence.
    const besselSeries = (n: number, t: number) => {
      let term = Math.exp(n * Math.log(t / 2) - logFactorial(n));
      let sum = term;
      for (let k = 1; k < 200; k++) {
        term *= (t * t) / 4 / (k * (k + n));
        sum += term;
        if (term < 1e-18 * sum) break;
      }
      return sum;
    };
    for (const sigma of [0.3, 0.7, 1.5, 3]) {
      const kernel = discreteGaussianKernel(sigma);
      const t = sigma * sigma;
      let sum = 0;
      let variance = 0;
      for (let n = -kernel.radius; n <= kernel.radius; n++) {
        const w = kernel.weights[n + kernel.radius];
        sum += w;
        variance += n * n * w;
        const expected = Math.exp(-t) * besselSeries(Math.abs(n), t);
        if (expected > 1e-12) expect(Math.abs(w - expected) / expected).toBeLessThan(1e-10);
      }
      expect(Math.abs(sum - 1)).toBeLessThan(1e-14);
      expect(Math.abs(variance / t - 1)).toBeLessThan(1e-12);
    }
    // Variance exact also for a wide kernel.
    const wide = discreteGaussianKernel(25);
    let v = 0;
    for (let n = -wide.radius; n <= wide.radius; n++) v += n * n * wide.weights[n + wide.radius];
    expect(Math.abs(v / 625 - 1)).toBeLessThan(1e-12);
  });

  it('approaches the sampled continuous Gaussian for wide kernels', () => {
    // Lindeberg (1990): exp(-t) I_n(t) -> exp(-n^2/2t)/sqrt(2 pi t); the leading
    // correction is (1 - (4n^2 - 1)/(8t)) (A&S 9.7.1), under 1 % of the peak for sigma = 4.
    const sigma = 4;
    const kernel = discreteGaussianKernel(sigma);
    const peak = 1 / Math.sqrt(2 * Math.PI * sigma * sigma);
    for (let n = -12; n <= 12; n++) {
      const g = peak * Math.exp((-n * n) / (2 * sigma * sigma));
      expect(Math.abs(kernel.weights[n + kernel.radius] - g) / peak).toBeLessThan(0.01);
    }
  });

  it('blurs a single bright pixel into a spot with second moments sigma_x^2, sigma_y^2 (analytic)', () => {
    for (const border of ['grow', 'reflect'] as const) {
      const nx = 61;
      const ny = 71;
      const image: PlanarField = { values: new Float64Array(nx * ny), nx, ny };
      image.values[30 * ny + 35] = 1000;
      const sx = 2.2;
      const sy = 0.6;
      const out = gaussianBlur(image, { sigmaPixels: sx, sigmaYPixels: sy, border });
      let total = 0;
      let mx = 0;
      let my = 0;
      for (let i = 0; i < out.nx; i++) {
        for (let j = 0; j < out.ny; j++) {
          const w = out.values[i * out.ny + j];
          total += w;
          mx += w * i;
          my += w * j;
        }
      }
      mx /= total;
      my /= total;
      let vx = 0;
      let vy = 0;
      let cxy = 0;
      for (let i = 0; i < out.nx; i++) {
        for (let j = 0; j < out.ny; j++) {
          const w = out.values[i * out.ny + j] / total;
          vx += w * (i - mx) ** 2;
          vy += w * (j - my) ** 2;
          cxy += w * (i - mx) * (j - my);
        }
      }
      expect(relative(total, 1000)).toBeLessThan(1e-12);
      expect(mx).toBeCloseTo(30 + out.marginX, 9);
      expect(my).toBeCloseTo(35 + out.marginY, 9);
      // Far from the edges, so both border modes give the exact kernel variance.
      expect(Math.abs(vx / (sx * sx) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(vy / (sy * sy) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(cxy)).toBeLessThan(1e-9);
    }
  });

  it('conserves the atom number to 1e-9 at the borders, also for a kernel wider than the image', () => {
    const image: PlanarField = { values: randomField(8 * 9, 'blur/1'), nx: 8, ny: 9 };
    const before = totalOf(image);
    for (const sigma of [0.4, 1.7, 11]) {
      const grown = gaussianBlur(image, { sigmaPixels: sigma, border: 'grow' });
      expect(grown.nx).toBe(8 + 2 * grown.marginX);
      expect(relative(totalOf(grown), before)).toBeLessThan(1e-9);
      const reflected = gaussianBlur(image, { sigmaPixels: sigma, border: 'reflect' });
      expect([reflected.nx, reflected.ny]).toEqual([8, 9]);
      expect(relative(totalOf(reflected), before)).toBeLessThan(1e-9);
    }
  });
});

describe('area-weighted resampling to camera pixels', () => {
  it('splits one site over pixels by overlap area (worked by hand)', () => {
    const site: PlanarField = { values: new Float64Array([1]), nx: 1, ny: 1 };
    // Cell [-0.5, 0.5] um, pixels 0.5 um wide with edges at -0.5, 0, 0.5: a quarter each.
    const aligned = resampleToCamera(site, {
      cellUm: 1, pixelUm: 0.5, grid: { nx: 2, ny: 2, firstXUm: -0.25, firstYUm: -0.25 },
    });
    expect(Array.from(aligned.values)).toEqual([0.25, 0.25, 0.25, 0.25]);
    // Pixel edges at -0.625, -0.125, 0.375, 0.875: overlaps 0.375, 0.5, 0.125 per axis.
    const shifted = resampleToCamera(site, {
      cellUm: 1, pixelUm: 0.5, grid: { nx: 3, ny: 3, firstXUm: -0.375, firstYUm: -0.375 },
    });
    const w = [0.375, 0.5, 0.125];
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) expect(shifted.values[i * 3 + j]).toBeCloseTo(w[i] * w[j], 15);
    }
    expect(Array.from(shifted.xCentresUm)).toEqual([-0.375, 0.125, 0.625]);
  });

  it('turns a uniform filling of one atom per site into p^2 / a^2 atoms per inner pixel', () => {
    // Uniform areal density 1 / a^2 (one atom per cell of area a^2).
    const a = 0.532;
    const p = objectPlanePixelUm(13, 16.4); // 13 um camera pixel, magnification 16.4
    const sites: PlanarField = { values: new Float64Array(40 * 30).fill(1), nx: 40, ny: 30 };
    const image = resampleToCamera(sites, { cellUm: a, pixelUm: p });
    const halfX = (40 * a) / 2;
    const halfY = (30 * a) / 2;
    let inner = 0;
    for (let k = 0; k < image.nx; k++) {
      for (let l = 0; l < image.ny; l++) {
        const x = image.xCentresUm[k];
        const y = image.yCentresUm[l];
        if (Math.abs(x) + p / 2 < halfX && Math.abs(y) + p / 2 < halfY) {
          expect(image.values[k * image.ny + l]).toBeCloseTo((p * p) / (a * a), 12);
          inner++;
        }
      }
    }
    expect(inner).toBeGreaterThan(100);
  });

  it('conserves the atom number to 1e-9 with incommensurate pixels, and then through the blur', () => {
    const sites: PlanarField = { values: randomField(37 * 23, 'resample/1'), nx: 37, ny: 23 };
    const before = totalOf(sites);
    const image = resampleToCamera(sites, { cellUm: 0.532, pixelUm: 0.6113, originUm: { x: -7.1, y: 3.3 }, marginUm: 1.2 });
    expect(relative(totalOf(image), before)).toBeLessThan(1e-9);
    expect(Math.abs(image.atomsOutside) / before).toBeLessThan(1e-9);
    const blurred = gaussianBlur(image, { sigmaPixels: psfSigmaUm(780, 0.68) / image.pixelUm });
    expect(relative(totalOf(blurred), before)).toBeLessThan(1e-9);
  });

  it('reports the atoms of cells outside a given grid', () => {
    // A uniform lattice centred at 0 and a grid covering exactly x < 0: half the atoms outside.
    const sites: PlanarField = { values: new Float64Array(20 * 10).fill(1), nx: 20, ny: 10 };
    const image = resampleToCamera(sites, {
      cellUm: 1, pixelUm: 0.5, grid: { nx: 20, ny: 20, firstXUm: -9.75, firstYUm: -4.75 },
    });
    expect(totalOf(image)).toBeCloseTo(100, 10);
    expect(image.atomsOutside).toBeCloseTo(100, 10);
  });
});

describe('Poisson shot noise', () => {
  // A Poisson variable has mean = variance = mu. Over N samples the sample mean has
  // standard error sqrt(mu / N) and the sample variance sqrt((mu + 2 mu^2) / N) (fourth
  // central moment mu (1 + 3 mu); Kendall & Stuart, The Advanced Theory of Statistics,
  // vol. 1, sampling moments). Tolerance: 5 standard errors.
  it('has mean and variance equal to mu for small and large means', () => {
    const samples = 100_000;
    for (const mu of [0.3, 3, 9.9, 10, 47, 1e4, 3e6]) {
      const random = seededRandom(`poisson/${mu}`);
      let sum = 0;
      let sumSq = 0;
      let allCounts = true;
      for (let s = 0; s < samples; s++) {
        const k = samplePoisson(mu, random);
        allCounts &&= Number.isInteger(k) && k >= 0;
        sum += k;
        sumSq += k * k;
      }
      const mean = sum / samples;
      const variance = (sumSq - samples * mean * mean) / (samples - 1);
      expect(allCounts).toBe(true);
      expect(Math.abs(mean - mu)).toBeLessThan(5 * Math.sqrt(mu / samples));
      expect(Math.abs(variance - mu)).toBeLessThan(5 * Math.sqrt((mu + 2 * mu * mu) / samples));
    }
  });

  it('matches the Poisson probabilities (Pearson chi-square test) on both sides of the PTRS threshold', () => {
    // Expected counts from p_k = p_{k-1} mu / k. Critical value: Wilson-Hilferty
    // approximation of the chi-square quantile (Wilson & Hilferty, PNAS 17, 684 (1931))
    // at z = 4.26, i.e. a false alarm probability of about 1e-5.
    const samples = 200_000;
    for (const mu of [4, 10, 30]) {
      const random = seededRandom(`poisson-gof/${mu}`);
      const kMax = Math.ceil(mu + 12 * Math.sqrt(mu) + 10);
      const observed = new Float64Array(kMax + 1);
      for (let s = 0; s < samples; s++) observed[Math.min(kMax, samplePoisson(mu, random))]++;
      const expected = new Float64Array(kMax + 1);
      let p = Math.exp(-mu);
      let cumulative = 0;
      for (let k = 0; k < kMax; k++) {
        expected[k] = p * samples;
        cumulative += p;
        p *= mu / (k + 1);
      }
      expected[kMax] = (1 - cumulative) * samples;
      // Merge bins until each expects at least 5 counts.
      let chi2 = 0;
      let bins = 0;
      let accObs = 0;
      let accExp = 0;
      for (let k = 0; k <= kMax; k++) {
        accObs += observed[k];
        accExp += expected[k];
        if (accExp >= 5 || k === kMax) {
          chi2 += (accObs - accExp) ** 2 / accExp;
          bins++;
          accObs = 0;
          accExp = 0;
        }
      }
      const dof = bins - 1;
      const z = 4.26;
      const critical = dof * (1 - 2 / (9 * dof) + z * Math.sqrt(2 / (9 * dof))) ** 3;
      expect(chi2).toBeLessThan(critical);
    }
  });

  it('computes ln k! to 1e-13 relative on both sides of the table/Stirling switch', () => {
    let exact = 0;
    for (let k = 1; k <= 200; k++) {
      exact += Math.log(k);
      expect(Math.abs(logFactorial(k) - exact)).toBeLessThan(1e-13 * Math.max(1, exact));
    }
  });

  it('adds reproducible noise in atom units, with variance mu / countsPerAtom', () => {
    const expected = new Float64Array(20_000).fill(2.5);
    const a = addShotNoise(expected, { seed: 'camera/1' });
    const b = addShotNoise(expected, { seed: 'camera/1' });
    const c = addShotNoise(expected, { seed: 'camera/2' });
    expect(Array.from(a)).toEqual(Array.from(b));
    expect(Array.from(a)).not.toEqual(Array.from(c));
    // 40 counts per atom: Poisson(100) / 40 has mean 2.5 and variance 2.5 / 40.
    const photons = addShotNoise(expected, { seed: 'camera/3', countsPerAtom: 40 });
    const n = photons.length;
    const mean = plainSum(photons) / n;
    let v = 0;
    for (const x of photons) v += (x - mean) ** 2;
    v /= n - 1;
    const mu = 100;
    expect(Math.abs(mean * 40 - mu)).toBeLessThan(5 * Math.sqrt(mu / n));
    expect(Math.abs(v * 1600 - mu)).toBeLessThan(5 * Math.sqrt((mu + 2 * mu * mu) / n));
    expect(() => addShotNoise(new Float64Array([1, -0.1]), { seed: 'x' })).toThrow(/index 1/);
  });
});

describe('parity projection', () => {
  it('shows odd Mott shells bright and even shells dark at J = 0 (Bakr et al. 2010; Sherson et al. 2010)', () => {
    // Atomic limit J = 0, T = 0: each site holds the Fock state n minimising
    // U n (n - 1) / 2 - (mu - eps) n (Fisher et al., PRB 40, 546 (1989); Jaksch et al.,
    // PRL 81, 3108 (1998)), found here by direct search over n. Trap eps = V r^2.
    const size = 41;
    const nStates = 6;
    const u = 1;
    const mu = 2.6;
    const v = 0.012;
    const probabilities = new Float64Array(size * size * nStates);
    const filling = new Int32Array(size * size);
    for (let x = 0; x < size; x++) {
      for (let y = 0; y < size; y++) {
        const r2 = (x - 20) ** 2 + (y - 20) ** 2;
        const local = mu - v * r2;
        let best = 0;
        let bestEnergy = 0;
        for (let n = 1; n < nStates; n++) {
          const e = (u * n * (n - 1)) / 2 - local * n;
          if (e < bestEnergy) {
            bestEnergy = e;
            best = n;
          }
        }
        filling[x * size + y] = best;
        probabilities[(x * size + y) * nStates + best] = 1;
      }
    }
    const pOdd = oddOccupationProbability(probabilities, nStates);
    const shot = sampleParityShot(pOdd, 'parity/1');
    const seen = new Set<number>();
    for (let i = 0; i < size * size; i++) {
      seen.add(filling[i]);
      expect(pOdd[i]).toBe(filling[i] % 2);
      expect(shot[i]).toBe(filling[i] % 2);
    }
    // The wedding cake has shells n = 3, 2, 1 and an empty edge.
    expect([...seen].sort()).toEqual([0, 1, 2, 3]);
    expect(Array.from(expectedParityImage(pOdd))).toEqual(Array.from(pOdd));
  });

  it('gives P_odd = (1 - exp(-2 nbar)) / 2 for Poisson number statistics', () => {
    // sum over odd n of exp(-nbar) nbar^n / n! = exp(-nbar) sinh(nbar).
    const nStates = 40;
    const nbars = [0.2, 1, 2.5];
    const probabilities = new Float64Array(nbars.length * nStates);
    nbars.forEach((nbar, s) => {
      let p = Math.exp(-nbar);
      for (let n = 0; n < nStates; n++) {
        probabilities[s * nStates + n] = p;
        p *= nbar / (n + 1);
      }
    });
    const pOdd = oddOccupationProbability(probabilities, nStates);
    nbars.forEach((nbar, s) => expect(pOdd[s]).toBeCloseTo((1 - Math.exp(-2 * nbar)) / 2, 14));
  });

  it('draws bright sites with probability P_odd in a single shot (binomial, 5 sigma)', () => {
    const sites = 40_000;
    const p = 0.3;
    const shot = sampleParityShot(new Float64Array(sites).fill(p), 'parity/2');
    const fraction = plainSum(shot) / sites;
    expect(Math.abs(fraction - p)).toBeLessThan(5 * Math.sqrt((p * (1 - p)) / sites));
    expect(() => sampleParityShot(new Float64Array([0.5, 1.2]), 's')).toThrow(/site 1/);
  });
});

describe('in-situ camera picture', () => {
  it('conserves atoms, keeps the pixel grid and blurs a single site to variance sigma^2', () => {
    // Single atom at the centre site, pixels of p = a: the automatic grid (odd pixel
    // count, centred) puts one pixel exactly on the cell, so before the blur the atom
    // sits in one pixel, and the discrete Gaussian adds exactly sigma^2 (Lindeberg 1990)
    // to the variance along each axis, in um^2.
    const a = 0.5;
    const sites: PlanarField = { values: new Float64Array(9 * 9), nx: 9, ny: 9 };
    sites.values[4 * 9 + 4] = 1;
    const sigma = psfSigmaUm(780, 0.5);
    const image = inSituImage(sites, { cellUm: a, pixelUm: a, psfSigmaUm: sigma });
    expect(relative(totalOf(image), 1)).toBeLessThan(1e-9);
    let mean = 0;
    for (let k = 0; k < image.nx; k++) for (let l = 0; l < image.ny; l++) mean += image.values[k * image.ny + l] * image.xCentresUm[k];
    let variance = 0;
    for (let k = 0; k < image.nx; k++) for (let l = 0; l < image.ny; l++) variance += image.values[k * image.ny + l] * (image.xCentresUm[k] - mean) ** 2;
    expect(Math.abs(mean)).toBeLessThan(1e-12);
    // Tolerance: the margin of 4 sigma + 1 pixel leaves < 1e-6 of the weight to be folded back.
    expect(Math.abs(variance / (sigma * sigma) - 1)).toBeLessThan(1e-6);
    // With a random cloud on incommensurate pixels the total is still conserved.
    const cloud: PlanarField = { values: randomField(30 * 20, 'insitu/1'), nx: 30, ny: 20 };
    const picture = inSituImage(cloud, { cellUm: 0.532, pixelUm: 0.83, psfSigmaUm: 0.4 });
    expect(relative(totalOf(picture), totalOf(cloud))).toBeLessThan(1e-9);
  });
});

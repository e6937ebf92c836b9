// Physics out of images, checked against analytic results:
// - inverse Abel (onion peeling, Dasch, Appl. Opt. 31, 1146 (1992)) of the projection of a
//   Gaussian, sqrt(2 pi) s exp(-x^2 / 2 s^2), and of a flat disc, 2 sqrt(R^2 - x^2);
// - the local density approximation (Ho & Zhou, Nature Phys. 6, 131 (2010)) on a classical
//   ideal gas in an anisotropic harmonic trap, whose homogeneous equation of state is
//   n = n0 exp(mu_local / kT) and whose pressure obeys the ideal-gas law P = n kT;
// - Ho & Zhou's pressure from the doubly integrated density, P = (m w_y w_z / 2 pi) n_1D;
// - fluctuation thermometry (<dN^2> = kT d<N>/dmu; Zhou & Ho, PRL 106, 225301 (2011)) on
//   shots drawn with a known kT from two local equations of state for which the relation is
//   exact per pixel: the classical gas (Poisson, var = mean) and the atomic limit of the
//   Bose-Hubbard model (site occupation k with weight exp(-(U k(k-1)/2 - mu k) / kT)).

import { describe, expect, it } from 'vitest';
import { inverseAbelOnionPeeling, inverseAbelUniform } from '../../../src/imaging/camera/abelInversion.js';
import { azimuthalAverage } from '../../../src/imaging/camera/azimuthalAverage.js';
import { localDensityEquationOfState, pressureFromLineDensity, trapScaling } from '../../../src/imaging/camera/localDensityEquationOfState.js';
import { fluctuationThermometry } from '../../../src/imaging/camera/fluctuationThermometry.js';
import { findSpecies } from '../../../src/physics/species.js';
import { atomicMassUnitKg, boltzmannJPerK, planckJs } from '../../../src/physics/constants.js';
import { seededRandom } from '../../../src/numerics/seededRandom.js';
import { samplePoisson } from '../../../src/imaging/shotNoise.js';
import type { PixelImage } from '../../../src/imaging/camera/pixelImage.js';
import { gaussianAtomsPerPixel } from './syntheticFrames.js';

const massKg = findSpecies('87Rb')!.massU * atomicMassUnitKg;

describe('inverse Abel transform (onion peeling)', () => {
  it('Gaussian: error below 0.6 % of the peak at s = 10 samples and 4x smaller at s = 20 (second order)', () => {
    const worst = (s: number) => {
      const n = Math.ceil(6 * s);
      const F = Float64Array.from({ length: n }, (_, i) => Math.sqrt(2 * Math.PI) * s * Math.exp(-(i * i) / (2 * s * s)));
      const f = inverseAbelUniform(F, 1).density;
      let e = 0;
      for (let i = 0; i < 4 * s; i++) e = Math.max(e, Math.abs(f[i] - Math.exp(-(i * i) / (2 * s * s))));
      return e;
    };
    const e10 = worst(10);
    const e20 = worst(20);
    expect(e10).toBeLessThan(0.006);
    expect(e20).toBeLessThan(0.002); // measured 0.0044 and 0.0015: the error falls about 3x per halving of the step

  });

  it('flat disc f = 1 for r < R: its projection 2 sqrt(R^2 - x^2) inverts to 1 within 1 % up to R - 5 samples', () => {
    const R = 30;
    const F = Float64Array.from({ length: 50 }, (_, i) => (i < R ? 2 * Math.sqrt(R * R - i * i) : 0));
    const f = inverseAbelUniform(F, 1).density;
    for (let i = 0; i <= R - 5; i++) expect(Math.abs(f[i] - 1)).toBeLessThan(0.01);
    for (let i = R + 1; i < 50; i++) expect(f[i]).toBe(0);
  });

  it('error propagation: the propagated std matches the scatter of 400 noisy inversions', () => {
    const n = 25;
    const s = 8;
    const F = Float64Array.from({ length: n }, (_, i) => Math.sqrt(2 * Math.PI) * s * Math.exp(-(i * i) / (2 * s * s)));
    const sigma = new Float64Array(n).fill(0.05);
    const predicted = inverseAbelUniform(F, 1, sigma).densityStd;
    const rnd = seededRandom('abel/noise');
    const sum = new Float64Array(n);
    const sum2 = new Float64Array(n);
    const M = 400;
    for (let m = 0; m < M; m++) {
      const noisy = Float64Array.from(F, (v) => v + 0.05 * rnd.normal());
      const f = inverseAbelUniform(noisy, 1).density;
      for (let i = 0; i < n; i++) { sum[i] += f[i]; sum2[i] += f[i] * f[i]; }
    }
    for (const i of [0, 3, 10, 20]) {
      const sd = Math.sqrt(sum2[i] / M - (sum[i] / M) ** 2);
      expect(Math.abs(sd / predicted[i] - 1)).toBeLessThan(0.12); // 400 samples: std known to 3.5 %
    }
  });

  it('refuses shells that do not contain their samples', () => {
    expect(() => inverseAbelOnionPeeling({ projection: Float64Array.of(1, 1), sampleRadii: Float64Array.of(0.5, 0.7), shellEdges: Float64Array.of(0, 1, 2) })).toThrow(/sample 1 at radius 0.7 is not inside its shell/);
  });
});

describe('equation of state of a 3D classical gas in an anisotropic trap, from its column image (LDA)', () => {
  const kTHz = 5000;
  const f = { x: 50, y: 80, z: 120 };
  const sigmaUm = (fHz: number) => Math.sqrt((planckJs * kTHz) / (massKg * (2 * Math.PI * fHz) ** 2)) * 1e6;
  const sx = sigmaUm(f.x), sy = sigmaUm(f.y), sz = sigmaUm(f.z);
  const atoms = 1e5;
  const n0 = atoms / ((2 * Math.PI) ** 1.5 * sx * sy * sz); // peak density, atoms / um^3
  const pixelUm = 1;
  const cloud = { width: 128, height: 96, centreX: 63.7, centreY: 47.2, sigmaXPixels: sx / pixelUm, sigmaYPixels: sy / pixelUm, atoms };
  const column = gaussianAtomsPerPixel(cloud); // atoms per 1 um^2 pixel = column density per um^2
  const scaling = trapScaling({ pixelUm, frequencyXHz: f.x, frequencyYHz: f.y, frequencyLineOfSightHz: f.z, massKg });

  it('azimuthal average + Abel inversion reproduce n(mu_local) = n0 exp(mu_local / kT): density within 2 % of n0, slope of ln n within 1 %', () => {
    const profile = azimuthalAverage(column, { centreX: cloud.centreX, centreY: cloud.centreY, binWidth: 1, scaleU: scaling.scaleX, scaleV: scaling.scaleY, binCount: 45 });
    const edges = Float64Array.from({ length: 46 }, (_, j) => j);
    const abel = inverseAbelOnionPeeling({ projection: profile.mean, sampleRadii: profile.meanRadius, shellEdges: edges });
    const density = abel.density.map((v) => v * scaling.lineOfSightScale);
    const eos = localDensityEquationOfState({ radiusUm: abel.radius, density, harmonicHzPerUm2: scaling.harmonicHzPerUm2 });
    let worst = 0;
    for (let i = 0; i < 30; i++) worst = Math.max(worst, Math.abs(density[i] - n0 * Math.exp(eos.localChemicalPotentialHz[i] / kTHz)) / n0);
    expect(worst).toBeLessThan(0.02);
    // Least-squares slope of ln n against mu_local over the inner 2 sigma: 1/kT.
    let sxx = 0, sxy = 0, mx = 0, my = 0, m = 0;
    for (let i = 2; i < 25; i++) { mx += eos.localChemicalPotentialHz[i]; my += Math.log(density[i]); m++; }
    mx /= m; my /= m;
    for (let i = 2; i < 25; i++) { const dx = eos.localChemicalPotentialHz[i] - mx; sxx += dx * dx; sxy += dx * (Math.log(density[i]) - my); }
    expect(Math.abs((sxx / sxy) / kTHz - 1)).toBeLessThan(0.01);
    // Gibbs-Duhem pressure: ideal-gas law P = n kT where the profile is well inside the cut at 45 um.
    for (let i = 0; i < 20; i++) expect(Math.abs(eos.pressureHz[i] / (density[i] * kTHz) - 1)).toBeLessThan(0.02);
  });

  it("Ho & Zhou's pressure from the doubly integrated density obeys P = n kT (ideal gas) to 1e-3", () => {
    const n1 = new Float64Array(cloud.width);
    const pos = new Float64Array(cloud.width);
    for (let x = 0; x < cloud.width; x++) {
      pos[x] = (x - cloud.centreX) * pixelUm;
      for (let y = 0; y < cloud.height; y++) n1[x] += column.values[y * cloud.width + x] / pixelUm; // atoms per um along x
    }
    const p = pressureFromLineDensity({ positionUm: pos, lineDensityPerUm: n1, frequencyAlongHz: f.x, frequencyAcrossHz: [f.y, f.z], massKg });
    for (let x = 0; x < cloud.width; x++) {
      if (Math.abs(pos[x]) > 2 * sx) continue;
      const nLocal = n0 * Math.exp(p.localChemicalPotentialHz[x] / kTHz);
      expect(Math.abs(p.pressureHz[x] / (nLocal * kTHz) - 1)).toBeLessThan(1e-3);
    }
  });

  it('with noise, the Abel density lies within its propagated uncertainty (mean z^2 near 1)', () => {
    const rnd = seededRandom('eos/noise');
    const noisy = { ...column, values: Float64Array.from(column.values, (v) => v + 0.02 * rnd.normal()) };
    const profile = azimuthalAverage(noisy, { centreX: cloud.centreX, centreY: cloud.centreY, binWidth: 1.5, scaleU: scaling.scaleX, scaleV: scaling.scaleY, binCount: 30 });
    const noiseFree = azimuthalAverage(column, { centreX: cloud.centreX, centreY: cloud.centreY, binWidth: 1.5, scaleU: scaling.scaleX, scaleV: scaling.scaleY, binCount: 30 });
    const edges = Float64Array.from({ length: 31 }, (_, j) => 1.5 * j);
    const se = Float64Array.from(profile.pixelCount, (c) => 0.02 / Math.sqrt(c));
    const abel = inverseAbelOnionPeeling({ projection: profile.mean, sampleRadii: profile.meanRadius, shellEdges: edges, projectionStd: se });
    const reference = inverseAbelOnionPeeling({ projection: noiseFree.mean, sampleRadii: noiseFree.meanRadius, shellEdges: edges });
    let z2 = 0;
    for (let i = 0; i < 30; i++) z2 += ((abel.density[i] - reference.density[i]) / abel.densityStd[i]) ** 2 / 30;
    expect(z2).toBeGreaterThan(0.4);
    expect(z2).toBeLessThan(1.8);
  });
});

/** Shots of an image whose pixels are independent subsystems at mu0 - V(pixel), drawn by `draw`. */
function drawShots(M: number, seed: string, size: number, centre: number, kHzPerUm2: number, draw: (muHz: number, u: () => number) => number): PixelImage[] {
  const rnd = seededRandom(seed);
  const u = () => rnd.uniform();
  const shots: PixelImage[] = [];
  for (let s = 0; s < M; s++) {
    const values = new Float64Array(size * size);
    for (let y = 0; y < size; y++) for (let x = 0; x < size; x++) {
      const r2 = (x - centre) ** 2 + (y - centre) ** 2;
      values[y * size + x] = draw(-kHzPerUm2 * r2, u);
    }
    shots.push({ width: size, height: size, values });
  }
  return shots;
}

describe('fluctuation thermometry recovers the input temperature', () => {
  it('classical ideal gas (Poisson pixels, var = mean = kT dmean/dmu): kT within 3 sigma, sigma below 3 %', () => {
    const kTHz = 1000;
    const k = 5; // Hz per um^2, 1 um pixels
    const rnd = seededRandom('thermometry/poisson');
    const shots = drawShots(300, 'thermometry/unused', 70, 34.6, k, () => 0);
    for (const shot of shots) {
      for (let y = 0; y < 70; y++) for (let x = 0; x < 70; x++) {
        const V = k * ((x - 34.6) ** 2 + (y - 34.6) ** 2);
        shot.values[y * 70 + x] = samplePoisson(40 * Math.exp(-V / kTHz), rnd);
      }
    }
    const t = fluctuationThermometry({ shots, centreX: 34.6, centreY: 34.6, scaleX: 1, scaleY: 1, binWidth: 1, harmonicHzPerUm2: k });
    expect(t.usableBins).toBeGreaterThan(15);
    expect(t.kTHzUncertainty / kTHz).toBeLessThan(0.03);
    expect(Math.abs(t.kTHz - kTHz)).toBeLessThan(3 * t.kTHzUncertainty);
    expect(t.temperatureNK).toBeCloseTo((planckJs * t.kTHz) / boltzmannJPerK * 1e9, 9);
    expect(t.chiSquare / t.degreesOfFreedom).toBeLessThan(2);
  });

  it('atomic-limit Bose-Hubbard sites with imaging noise subtracted: kT within 3 sigma', () => {
    const U = 1000, kTHz = 150, mu0 = 1600, k = 2, noiseVar = 0.1;
    const weights = new Float64Array(8);
    const draw = (dmu: number, u: () => number) => {
      const mu = mu0 + dmu;
      // Boltzmann weights of n = 0..7, scaled by the largest one to avoid overflow.
      let best = -Infinity;
      for (let n = 0; n < 8; n++) best = Math.max(best, -(0.5 * U * n * (n - 1) - mu * n) / kTHz);
      let z = 0;
      for (let n = 0; n < 8; n++) { weights[n] = Math.exp(-(0.5 * U * n * (n - 1) - mu * n) / kTHz - best); z += weights[n]; }
      let target = u() * z;
      let n = 0;
      while (n < 7 && target > weights[n]) { target -= weights[n]; n++; }
      return n;
    };
    const shots = drawShots(400, 'thermometry/atomic-limit', 80, 39.5, k, draw);
    const noise = seededRandom('thermometry/imaging-noise');
    for (const s of shots) for (let i = 0; i < s.values.length; i++) s.values[i] += Math.sqrt(noiseVar) * noise.normal();
    const imagingVariance = new Float64Array(80 * 80).fill(noiseVar);
    const t = fluctuationThermometry({ shots, centreX: 39.5, centreY: 39.5, scaleX: 1, scaleY: 1, binWidth: 1, harmonicHzPerUm2: k, imagingVariance });
    expect(Math.abs(t.kTHz - kTHz)).toBeLessThan(3 * t.kTHzUncertainty);
    expect(t.kTHzUncertainty / kTHz).toBeLessThan(0.05);
    // Without the subtraction the imaging noise would bias kT high.
    const biased = fluctuationThermometry({ shots, centreX: 39.5, centreY: 39.5, scaleX: 1, scaleY: 1, binWidth: 1, harmonicHzPerUm2: k });
    expect(biased.kTHz - kTHz).toBeGreaterThan(3 * biased.kTHzUncertainty);
  });
});

describe('fluctuation thermometry at the edge of a cloud cut off by its lattice', () => {
  it('a bin where no shot has atoms is not used (its slope comes from the inner neighbour only), and the chi-square stays finite', () => {
    // Classical gas as above, but every pixel beyond radius 20 empty (a lattice edge): the
    // bin just outside has d<N>/dmu > 0 from the three-point derivative and zero variance.
    const kTHz = 1000;
    const k = 5;
    const rnd = seededRandom('thermometry/edge');
    const shots: PixelImage[] = Array.from({ length: 200 }, () => ({ width: 50, height: 50, values: new Float64Array(2500) }));
    for (const shot of shots) {
      for (let y = 0; y < 50; y++) for (let x = 0; x < 50; x++) {
        const r2 = (x - 24.5) ** 2 + (y - 24.5) ** 2;
        shot.values[y * 50 + x] = r2 < 400 ? samplePoisson(40 * Math.exp((-k * r2) / kTHz), rnd) : 0;
      }
    }
    const t = fluctuationThermometry({ shots, centreX: 24.5, centreY: 24.5, scaleX: 1, scaleY: 1, binWidth: 1, harmonicHzPerUm2: k });
    for (const bin of t.bins) if (bin.varianceAtoms === 0) expect(bin.usable).toBe(false);
    expect(Number.isFinite(t.chiSquare)).toBe(true);
    expect(Math.abs(t.kTHz - kTHz)).toBeLessThan(3 * t.kTHzUncertainty);
  });
});

describe('azimuthal average with an aspect ratio and a tilted ellipse', () => {
  it('a tilted anisotropic Gaussian averages to exp(-r^2 / 2) in the scaled radius; a flat image to its value', () => {
    const w = 81, h = 71, cx = 40.3, cy = 35.1, a = 9, b = 4, phi = (25 * Math.PI) / 180;
    const values = new Float64Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
      const u = Math.cos(phi) * (x - cx) + Math.sin(phi) * (y - cy);
      const v = -Math.sin(phi) * (x - cx) + Math.cos(phi) * (y - cy);
      values[y * w + x] = Math.exp(-(u * u) / (2 * a * a) - (v * v) / (2 * b * b));
    }
    const p = azimuthalAverage({ width: w, height: h, values }, { centreX: cx, centreY: cy, binWidth: 0.25, scaleU: 1 / a, scaleV: 1 / b, ellipseAngleDeg: 25, binCount: 10 });
    for (let i = 1; i < 10; i++) {
      // Within a bin the value varies by about r * binWidth * exp(-r^2/2); compare with the mean of exp(-r^2/2) over the bin's radii (~ at the mean radius).
      expect(Math.abs(p.mean[i] - Math.exp(-(p.meanRadius[i] ** 2) / 2))).toBeLessThan(0.004);
    }
    const flat = azimuthalAverage({ width: w, height: h, values: new Float64Array(w * h).fill(3) }, { centreX: cx, centreY: cy, binWidth: 2 });
    expect(flat.pixelCount.reduce((s, c) => s + c, 0)).toBe(w * h);
    for (let i = 0; i < flat.mean.length; i++) if (flat.pixelCount[i] > 0) expect(flat.mean[i]).toBe(3);
  });
});

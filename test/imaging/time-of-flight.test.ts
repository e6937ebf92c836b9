// Time of flight: momentum distribution of a Gutzwiller state, its picture after a free
// flight, and the interference visibility (Gerbier et al., PRL 95, 050404 (2005)).

import { describe, expect, it } from 'vitest';
import { momentumStructureFactor, type OrderParameterField } from '../../src/observables/momentumStructureFactor.js';
import { flightDistanceUm, timeOfFlightImage } from '../../src/imaging/timeOfFlight.js';
import { interferenceVisibility } from '../../src/imaging/interferenceVisibility.js';
import { gaussianWannierEnvelope, harmonicWannierWidthSites, type MomentumEnvelope } from '../../src/imaging/wannierEnvelope.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

// CODATA 2018 (exact h) and the 87Rb mass 86.909180527 u (recalled from memory; AME /
// Steck's "Rubidium 87 D Line Data" quote this value), u = 1.66053906660e-27 kg.
const planck = 6.62607015e-34;
const rb87Kg = 86.909180527 * 1.66053906660e-27;
const spacingUm = 0.532; // lattice from 1064 nm light, a = lambda / 2

/**
 * |sum_i exp(-i k.r_i) phi_i|^2 summed over layers, by direct summation (no FFT): the
 * coherent part of sum_ij e^{i k.(r_i - r_j)} <b_i^+ b_j> (Gerbier et al. 2005).
 */
function directCoherentPower(field: OrderParameterField, axis: 0 | 1 | 2, kx: number, ky: number): number {
  const n = [field.shape[0], field.shape[1] ?? 1, field.shape[2] ?? 1];
  const kept = [0, 1, 2].filter((d) => d !== axis);
  let total = 0;
  for (let layer = 0; layer < n[axis]; layer++) {
    let re = 0;
    let im = 0;
    for (let u = 0; u < n[kept[0]]; u++) {
      for (let v = 0; v < n[kept[1]]; v++) {
        const idx = [0, 0, 0];
        idx[axis] = layer;
        idx[kept[0]] = u;
        idx[kept[1]] = v;
        const s = (idx[0] * n[1] + idx[1]) * n[2] + idx[2];
        const pr = field.phiRe[s];
        const pi = field.phiIm?.[s] ?? 0;
        const phase = -(kx * u + ky * v); // k in units of 1/a, r in sites
        const c = Math.cos(phase);
        const sn = Math.sin(phase);
        re += pr * c - pi * sn;
        im += pr * sn + pi * c;
      }
    }
    total += re * re + im * im;
  }
  return total;
}

function randomComplexField(shape: number[], seed: string): OrderParameterField {
  const random = seededRandom(seed);
  const count = shape.reduce((a, b) => a * b, 1);
  const phiRe = Float64Array.from({ length: count }, () => random.uniform() - 0.3);
  const phiIm = Float64Array.from({ length: count }, () => random.uniform() - 0.6);
  const density = Float64Array.from({ length: count }, (_, i) => phiRe[i] ** 2 + phiIm[i] ** 2 + random.uniform());
  return { phiRe, phiIm, density, shape };
}

/** A 2D state: phi = sqrt(condensed), n = condensed + depleted, on an L x L box or disk. */
function uniformState(size: number, condensed: number, depleted: number, radius = Infinity): OrderParameterField {
  const phiRe = new Float64Array(size * size);
  const density = new Float64Array(size * size);
  const c = (size - 1) / 2;
  for (let x = 0; x < size; x++) {
    for (let y = 0; y < size; y++) {
      if ((x - c) ** 2 + (y - c) ** 2 > radius * radius) continue;
      phiRe[x * size + y] = Math.sqrt(condensed);
      density[x * size + y] = condensed + depleted;
    }
  }
  return { phiRe, density, shape: [size, size] };
}

describe('momentum structure factor', () => {
  it('agrees with direct summation of |sum_i e^{-i k.r_i} phi_i|^2 for complex phi, per layer in 3D', () => {
    // The FFT result must equal the defining sum (Gerbier et al. 2005) at every grid point.
    // Tolerance 1e-10 relative: FFT rounding only.
    for (const [shape, axis] of [[[5, 7], 2], [[4, 3, 5], 0], [[4, 3, 5], 1], [[4, 3, 5], 2]] as [number[], 0 | 1 | 2][]) {
      const field = randomComplexField(shape, `sf/${shape.join('x')}/${axis}`);
      const sf = momentumStructureFactor(field, { imagingAxis: axis, samplesPerZone: 8 });
      const m = sf.samplesPerZone;
      for (let p = 0; p < m; p++) {
        for (let q = 0; q < m; q++) {
          const direct = directCoherentPower(field, axis, (2 * Math.PI * p) / m, (2 * Math.PI * q) / m);
          expect(Math.abs(sf.coherentPower[p * m + q] - direct)).toBeLessThan(1e-10 * Math.max(1, direct));
        }
      }
    }
  });

  it('puts the peak of a moving condensate phi_x = e^{i q x} at +q, not -q', () => {
    // Sign convention: n(k) peaks at the condensate momentum (a plane wave e^{iqx} has
    // momentum +hbar q). q = 2 pi * 3 / (16 a).
    const size = 16;
    const phiRe = new Float64Array(size * size);
    const phiIm = new Float64Array(size * size);
    for (let x = 0; x < size; x++) {
      for (let y = 0; y < size; y++) {
        phiRe[x * size + y] = Math.cos((2 * Math.PI * 3 * x) / size);
        phiIm[x * size + y] = Math.sin((2 * Math.PI * 3 * x) / size);
      }
    }
    const sf = momentumStructureFactor({ phiRe, phiIm, density: new Float64Array(size * size).fill(1), shape: [size, size] }, { samplesPerZone: size });
    let best = 0;
    for (let i = 1; i < size * size; i++) if (sf.coherentPower[i] > sf.coherentPower[best]) best = i;
    expect(best).toBe(3 * size + 0);
    expect(sf.coherentPower[best]).toBeCloseTo(size ** 4, 6);
  });

  it('satisfies Parseval: the zone average of B(k) equals the atom number', () => {
    // Discrete Parseval theorem for the zero-padded DFT: sum_k |X_k|^2 = M^2 sum |x|^2,
    // so (1/M^2) sum_k [C(k) + sum_i (n_i - |phi_i|^2)] = sum_i n_i.
    const field = randomComplexField([6, 9, 4], 'parseval');
    const sf = momentumStructureFactor(field, { imagingAxis: 1 });
    const m = sf.samplesPerZone;
    let sum = 0;
    for (const v of sf.coherentPower) sum += v;
    const zoneAverage = sum / (m * m) + sf.incoherentAtoms;
    expect(Math.abs(zoneAverage / sf.atomNumber - 1)).toBeLessThan(1e-12);
  });
});

describe('time-of-flight image', () => {
  const envelope = gaussianWannierEnvelope(harmonicWannierWidthSites(10), spacingUm);
  const flightTimeMs = 15;

  it('places the interference peaks at multiples of h t / (m a) = 2 hbar k_L t / m', () => {
    // Free flight x = hbar k t / m; first reciprocal lattice vector 2 pi / a = 2 k_L.
    const expectedPeakUm = (planck * flightTimeMs * 1e-3) / (rb87Kg * spacingUm * 1e-6) * 1e6;
    expect(flightDistanceUm((2 * Math.PI) / spacingUm, flightTimeMs, rb87Kg)).toBeCloseTo(expectedPeakUm, 9);
    for (const samplesPerZone of [32, 64]) {
      const sf = momentumStructureFactor(uniformState(32, 1, 0), { samplesPerZone });
      const image = timeOfFlightImage(sf, { latticeSpacingUm: spacingUm, massKg: rb87Kg, flightTimeMs, envelope });
      expect(image.firstOrderPeakUm).toBeCloseTo(expectedPeakUm, 9);
      // Brightest pixel on the ky = 0 row among kx > 0.5 (2 hbar k_L): the first-order peak.
      const centre = image.ny / 2;
      let best = -1;
      for (let p = 0; p < image.nx; p++) {
        if (image.kxInTwoHbarKl[p] < 0.5) continue;
        if (best < 0 || image.values[p * image.ny + centre] > image.values[best * image.ny + centre]) best = p;
      }
      expect(image.kxInTwoHbarKl[best]).toBe(1);
      expect(Math.abs(image.xCentresUm[best] - expectedPeakUm)).toBeLessThan(1e-9 * expectedPeakUm);
      // And the central peak at k = 0.
      expect(image.kyInTwoHbarKl[centre]).toBe(0);
      expect(image.xCentresUm[image.nx / 2]).toBe(0);
    }
  });

  it('integrates to the atom number times the normalised envelope over the field of view', () => {
    // For phi = 0 (Mott insulator), n(k) = N |w~(k)|^2; the Gaussian |w~|^2 integrates over
    // the square view [-K, K]^2 to erf(K l)^2 (A&S 7.1.1 with the normalisation of
    // wannierEnvelope). The image is a midpoint sum on a grid 60x finer than the envelope
    // width: error below 1e-4 relative (edge terms of the Euler-Maclaurin formula).
    const erf = (x: number) => {
      // A&S 7.1.5 power series; |x| < 3 keeps the cancellation below 1e-12.
      let term = x;
      let sum = x;
      for (let n = 1; n < 120; n++) {
        term *= (-x * x) / n;
        sum += term / (2 * n + 1);
      }
      return (2 / Math.sqrt(Math.PI)) * sum;
    };
    const mott = uniformState(24, 0, 1, 10);
    const sf = momentumStructureFactor(mott);
    expect(sf.incoherentAtoms).toBe(sf.atomNumber);
    const image = timeOfFlightImage(sf, { latticeSpacingUm: spacingUm, massKg: rb87Kg, flightTimeMs, envelope });
    const l = harmonicWannierWidthSites(10) * spacingUm;
    const kHalfRange = (3 * Math.PI) / spacingUm; // three zones of width 2 pi / a
    const fraction = erf(kHalfRange * l) ** 2;
    expect(Math.abs(image.atomsInImage / (sf.atomNumber * fraction) - 1)).toBeLessThan(1e-4);
    expect(image.atomNumber).toBe(sf.atomNumber);
  });
});

describe('interference visibility (Gerbier et al., PRL 95, 050404 (2005))', () => {
  const envelope = gaussianWannierEnvelope(harmonicWannierWidthSites(10), spacingUm);

  it('is zero for a J = 0 Mott insulator (phi = 0, n = 1)', () => {
    // No coherence: n(k) = N |w~(k)|^2, equal at equal |k| for an isotropic envelope.
    const sf = momentumStructureFactor(uniformState(30, 0, 1, 12));
    const result = interferenceVisibility(sf, { latticeSpacingUm: spacingUm, envelope });
    expect(Math.abs(result.visibility)).toBeLessThan(1e-12);
    expect(result.peakAtoms).toBeGreaterThan(0);
    // Also with an isotropic envelope given only as a function.
    const isotropic: MomentumEnvelope = { at: (kx, ky) => Math.exp(-0.01 * (kx * kx + ky * ky)) };
    expect(Math.abs(interferenceVisibility(sf, { latticeSpacingUm: spacingUm, envelope: isotropic }).visibility)).toBeLessThan(1e-12);
  });

  it('is near 1 for a uniform superfluid (phi = const)', () => {
    // Coherent-state limit n = |phi|^2: all of B(k) sits in the Bragg peaks. Gerbier et
    // al. measure V close to 1 in the superfluid; for an ideal uniform condensate the
    // diagonal disks see only the sidelobes of the L x L box, under 1e-3 of the peaks.
    const sf = momentumStructureFactor(uniformState(32, 1, 0));
    const result = interferenceVisibility(sf, { latticeSpacingUm: spacingUm, envelope });
    expect(result.visibility).toBeGreaterThan(0.998);
    expect(result.visibility).toBeLessThanOrEqual(1);
    // A trapped (disk-shaped) superfluid keeps a high visibility too.
    const trapped = momentumStructureFactor(uniformState(40, 1, 0, 15));
    expect(interferenceVisibility(trapped, { latticeSpacingUm: spacingUm, envelope }).visibility).toBeGreaterThan(0.99);
  });

  it('falls as the depleted (incoherent) fraction grows', () => {
    // Gerbier et al. 2005: the incoherent part fills in the minima, lowering V.
    let previous = 1.1;
    for (const depleted of [0, 0.05, 0.2, 0.5]) {
      const sf = momentumStructureFactor(uniformState(32, 1 - depleted, depleted));
      const v = interferenceVisibility(sf, { latticeSpacingUm: spacingUm, envelope }).visibility;
      expect(v).toBeLessThan(previous);
      previous = v;
    }
  });
});

// Direct test of src/pipeline/compareThermometry.ts (stackThermometry) on a stack whose
// temperature is known from outside the project: a classical ideal gas in the grand canonical
// ensemble. Its atom number in any fixed region is Poisson distributed, <dN^2> = <N>, and
// <N> ~ exp(mu / kT), so d<N>/dmu = <N> / kT and <dN^2> = kT d<N>/dmu holds exactly (Landau &
// Lifshitz, Statistical Physics I, sections 113-114, fluctuations of an ideal gas). Every pixel
// of every shot is drawn as Poisson(nbar(x, y)) with nbar = A exp(-(k_x x^2 + k_y y^2) / kT) in
// the scenario's own anisotropic trap, centre off the pixel grid; Gaussian imaging noise of 1
// atom per pixel is added inside the cloud and given as the imaging variance. The module must
// give back kT within 3 of its standard uncertainties, with the trap-scaled ellipses (a swap of
// the axes' scales or of the row direction would not), and refuse what it cannot read.

import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { stackThermometry } from '../../src/pipeline/compareThermometry.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { samplePoisson } from '../../src/imaging/shotNoise.js';
import { compareFitStub, stubScenario } from './compareFitStub.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-thermometry-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const kT = 0.5;
const k = [0.03, 0.06];
const nx = 30;
const ny = 28;
const centreX = 14.3;
const centreY = 12.6;
const peak = 12;
const noiseSigma = 1;
const prepared = stubScenario(dir, 'ideal-gas', { lattice: { shape: [nx, ny] }, hubbard: { hopping: 1e-5 }, trap: { coefficient: k }, particles: { chemicalPotential: 1 }, temperature: { kT } });

function idealGasStack(shots: number, seed: string, noiseOnBorder = false): { shots: Float64Array[]; imagingVariance: Float64Array } {
  const mean = new Float64Array(nx * ny);
  const noisy = new Uint8Array(nx * ny);
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < ny; j++) {
      const x = i - centreX;
      const y = j - centreY;
      mean[i * ny + j] = peak * Math.exp(-(k[0] * x * x + k[1] * y * y) / kT);
      // Imaging noise inside the frame only: the border median every shot loses stays 0.
      noisy[i * ny + j] = noiseOnBorder || (i > 1 && j > 1 && i < nx - 2 && j < ny - 2) ? 1 : 0;
    }
  }
  const random = seededRandom(seed);
  const stack = Array.from({ length: shots }, () => Float64Array.from(mean, (m, p) => samplePoisson(m, random) + (noisy[p] ? noiseSigma * random.normal() : 0)));
  return { shots: stack, imagingVariance: Float64Array.from(noisy, (n) => n * noiseSigma * noiseSigma) };
}

describe('stackThermometry', () => {
  const fit = compareFitStub(prepared, { nx, ny, centreX, centreY, kT: 0.7 });
  it('gives back the temperature of an ideal gas from its Poisson fluctuations', () => {
    const stack = idealGasStack(200, 'thermometry/ideal-gas');
    const r = stackThermometry(fit, { ...stack, binSites: 1 });
    if (!r.available) throw new Error(r.reason);
    expect(r.shotCount).toBe(200);
    expect(r.usableBins).toBeGreaterThanOrEqual(4);
    expect(r.kTUncertainty).toBeLessThan(0.15 * kT);
    expect(Math.abs(r.kT - kT)).toBeLessThan(3 * r.kTUncertainty);
    // The fitted temperature is reported beside it, not mixed in.
    expect(r.fittedKT).toBe(0.7);
    expect(r.energyUnit).toBe('U');
    // Bin potentials are k_ref r^2 in the trap-scaled radius (k_ref = k_x).
    for (const b of r.bins) if (b.pixels > 0) expect(b.potential).toBeCloseTo(k[0] * b.radiusSites ** 2, 0);
  });
  it('with imaging noise on the border too: the scatter of each shot\'s border median is subtracted, so the outer bins do not read hot', () => {
    // Noise everywhere: every shot's border median (112 pixels) scatters by pi s^2 / (2 * 112)
    // (the large-sample variance of a median of Gaussian noise; common statistics), which a
    // bin of P pixels carries as P^2 times that. Without subtracting it the same stack reads
    // about 30 % hot (measured by removing the correction: kT = 0.65 against 0.5).
    const stack = idealGasStack(200, 'thermometry/noisy-border', true);
    const r = stackThermometry(fit, { ...stack, binSites: 1 });
    if (!r.available) throw new Error(r.reason);
    expect(r.usableBins).toBeGreaterThanOrEqual(4);
    expect(Math.abs(r.kT - kT)).toBeLessThan(3 * r.kTUncertainty);
    expect(r.method).toMatch(/border median/);
  });
  it('refuses a stack of fewer than 3 shots and a scenario without a trap in the picture', () => {
    const two = stackThermometry(fit, { ...idealGasStack(2, 'thermometry/two'), binSites: 1 });
    expect(two).toEqual({ available: false, reason: 'fluctuation thermometry needs a stack of at least 3 shots (tens for a useful error bar); 2 given' });
    const flat = stubScenario(dir, 'no-trap', { lattice: { shape: [nx, ny] }, hubbard: { hopping: 1e-5 }, particles: { chemicalPotential: 1 }, temperature: { kT } });
    const r = stackThermometry(compareFitStub(flat, { nx, ny, centreX, centreY, kT }), idealGasStack(3, 'thermometry/flat'));
    expect(r.available).toBe(false);
    if (!r.available) expect(r.reason).toMatch(/no harmonic trap in the image plane/);
  });
});

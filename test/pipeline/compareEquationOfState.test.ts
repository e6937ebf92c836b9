// Direct test of src/pipeline/compareEquationOfState.ts on a 2D layer whose density is
// written out in the test: the atomic limit (J -> 0) at T -> 0, where every site holds the
// integer n that minimises U n(n - 1)/2 - mu n, the staircase n(mu) = ceil(mu / U) for mu > 0
// (M. P. A. Fisher et al., Phys. Rev. B 40, 546 (1989), the J = 0 Mott plateaus), sampled in
// the local density approximation at mu0 - k (x^2 + y^2) about an off-grid centre. Checked:
// each bin's density is the mean over the pixels a hand count puts in [b, b + 1) sites, and a
// bin inside one plateau holds that plateau's integer; the local chemical potential is
// mu0 - k r^2 at the bin's mean radius; the homogeneous mean field beside it (J = 1e-5 U,
// kT = 0.02 U) is the same staircase away from the steps; the Gibbs-Duhem pressure at the
// centre is the area under the staircase, int_0^mu n dmu, up to the trapezoid rule's error
// at the steps; and what it refuses.

import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { equationOfState } from '../../src/pipeline/compareEquationOfState.js';
import { compareFitStub, stubScenario } from './compareFitStub.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-eos-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const k = 0.02;
const mu0 = 2.5;
const kT = 0.02;
const nx = 30;
const ny = 30;
const centreX = 14.4;
const centreY = 15.3;
const staircase = (mu: number) => (mu > 0 ? Math.ceil(mu) : 0);
/** int_0^mu ceil(m) dm for the staircase (U = 1). */
const staircaseArea = (mu: number) => {
  let area = 0;
  for (let n = 1; n - 1 < mu; n++) area += n * (Math.min(mu, n) - (n - 1));
  return area;
};

describe('equationOfState of a 2D layer', () => {
  const prepared = stubScenario(dir, 'staircase', { lattice: { shape: [nx, ny] }, hubbard: { hopping: 1e-5 }, trap: { coefficient: k }, particles: { chemicalPotential: mu0 }, temperature: { kT } });
  const radius = (p: number) => Math.hypot(Math.floor(p / ny) - centreX, (p % ny) - centreY);
  const data = Float64Array.from({ length: nx * ny }, (_, p) => staircase(mu0 - k * radius(p) ** 2));
  const fit = compareFitStub(prepared, { nx, ny, centreX, centreY, kT, mu: mu0, data, model: data, sigma: new Float64Array(nx * ny).fill(0.1) });
  const r = equationOfState(fit, { binSites: 1 });
  if (!r.available) throw new Error(r.reason);

  it('averages the picture over the rings a hand count gives', () => {
    expect(r.kind).toBe('layer');
    expect(r.dimensions).toBe(2);
    expect(r.centralChemicalPotential).toBe(mu0);
    let plateauBins = 0;
    for (let b = 0; b < r.radiusSites.length; b++) {
      const pixels = [...data.keys()].filter((p) => Math.floor(radius(p)) === b);
      const meanRadius = pixels.reduce((s, p) => s + radius(p), 0) / pixels.length;
      const meanDensity = pixels.reduce((s, p) => s + data[p], 0) / pixels.length;
      expect(r.radiusSites[b]).toBeCloseTo(meanRadius, 10);
      expect(r.measuredDensity[b]).toBeCloseTo(meanDensity, 10);
      expect(r.modelDensity[b]).toBeCloseTo(meanDensity, 10);
      // Error of the bin mean: sigma / sqrt(P) for P pixels of equal sigma.
      expect(r.measuredDensityError[b]).toBeCloseTo(0.1 / Math.sqrt(pixels.length), 10);
      expect(r.localChemicalPotential[b]).toBeCloseTo(mu0 - k * meanRadius ** 2, 10);
      const inner = staircase(mu0 - k * b * b);
      const outer = staircase(mu0 - k * (b + 1) ** 2);
      if (inner === outer && b * b < mu0 / k) {
        plateauBins++;
        expect(r.measuredDensity[b]).toBe(inner);
      }
    }
    expect(plateauBins).toBeGreaterThanOrEqual(5);
  });
  it('puts the homogeneous staircase beside it, and the area under it as the pressure', () => {
    for (let b = 0; b < r.radiusSites.length; b++) {
      const mu = r.localChemicalPotential[b];
      const fromStep = Math.abs(mu - Math.round(mu));
      if (mu > -0.2 && fromStep > 0.2) expect(Math.abs(r.homogeneousDensity[b] - staircase(mu))).toBeLessThan(1e-3);
    }
    for (let i = 0; i < r.curve.mu.length; i += 17) {
      const mu = r.curve.mu[i];
      if (Math.abs(mu - Math.round(mu)) > 0.2) expect(Math.abs(r.curve.density[i] - staircase(mu))).toBeLessThan(1e-3);
    }
    // The staircase's area at the first bin's mu; trapezoids smear each of the 3 steps over one bin (dV <= 0.5 U).
    expect(Math.abs(r.pressure[0] - staircaseArea(r.localChemicalPotential[0]))).toBeLessThan(0.4);
    expect(r.pressure[r.pressure.length - 1]).toBe(0);
    // A fit on the staircase itself: every point with an error lies on it far from the steps, so chi^2 is counted over them all.
    expect(r.points).toBe(r.radiusSites.length);
  });
  it('refuses a chain and a layer without a trap', () => {
    const chain = stubScenario(dir, 'chain', { lattice: { shape: [30] }, hubbard: { hopping: 1e-5 }, trap: { coefficient: k }, particles: { chemicalPotential: mu0 }, temperature: { kT }, camera: { cameraPixelSites: 1, psf: { sigmaSites: 0 } } });
    expect(equationOfState(compareFitStub(chain, { nx: 30, ny: 1, centreX: 14, centreY: 0, kT }))).toEqual({ available: false, reason: 'a chain has no azimuthal average; the equation of state is read from 2D layers and 3D clouds' });
    const flat = stubScenario(dir, 'flat', { lattice: { shape: [nx, ny] }, hubbard: { hopping: 1e-5 }, particles: { chemicalPotential: mu0 }, temperature: { kT } });
    const none = equationOfState(compareFitStub(flat, { nx, ny, centreX, centreY, kT }));
    expect(none).toEqual({ available: false, reason: 'the scenario has no harmonic trap in the image plane, so the radius does not give the local chemical potential' });
  });
});

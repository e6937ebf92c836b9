// Per-site fields from plain solution arrays. References: a Fock state |n> has <n^2> -
// <n>^2 = 0 exactly, a coherent (Poisson) state with mean nbar has variance nbar and
// P(n odd) = (1 - exp(-2 nbar)) / 2 (textbook quantum optics, e.g. Walls & Milburn,
// Quantum Optics, ch. 3); the condensate density of a product state is |<b>|^2 = phi^2.

import { describe, expect, it } from 'vitest';
import { siteFieldsFrom, type SiteSolution } from '../../src/observables/siteFields.js';
import { siteArraysOf } from '../../src/solver/siteArrays.js';
import type { SolverState } from '../../src/solver/solverState.js';

/** Moments of a Poisson distribution of mean nbar truncated at nmax (probabilities renormalised). */
function poissonMoments(nbar: number, nmax: number): { density: number; densitySq: number; odd: number } {
  let p = Math.exp(-nbar);
  let z = 0;
  let n1 = 0;
  let n2 = 0;
  let odd = 0;
  for (let n = 0; n <= nmax; n++) {
    if (n > 0) p *= nbar / n;
    z += p;
    n1 += n * p;
    n2 += n * n * p;
    if (n % 2 === 1) odd += p;
  }
  return { density: n1 / z, densitySq: n2 / z, odd: odd / z };
}

function solutionOf(sites: { phi: number; density: number; densitySq: number; odd: number }[]): SiteSolution {
  const col = (f: (s: (typeof sites)[number]) => number) => Float64Array.from(sites, f);
  return {
    orderParameter: col((s) => s.phi),
    density: col((s) => s.density),
    densitySquared: col((s) => s.densitySq),
    parityOdd: col((s) => s.odd),
    entropy: new Float64Array(sites.length),
    sitePotential: Float64Array.from(sites, (_, i) => 0.1 * i),
  };
}

describe('siteFieldsFrom', () => {
  it('gives zero number variance for Fock states and nbar for a coherent state, phi^2 as condensate', () => {
    const nbar = 1.7;
    const coherent = poissonMoments(nbar, 40);
    const solution = solutionOf([
      { phi: 0, density: 1, densitySq: 1, odd: 1 },
      { phi: 0, density: 2, densitySq: 4 - 4e-16, odd: 0 }, // rounding below zero is clipped
      { phi: Math.sqrt(nbar), density: coherent.density, densitySq: coherent.densitySq, odd: coherent.odd },
    ]);
    const fields = siteFieldsFrom(solution, null);
    expect(fields.numberVariance[0]).toBe(0);
    expect(fields.numberVariance[1]).toBe(0);
    expect(fields.numberVariance[2]).toBeCloseTo(nbar, 12);
    expect(fields.parityOdd[2]).toBeCloseTo((1 - Math.exp(-2 * nbar)) / 2, 12);
    expect(fields.condensateDensity[2]).toBeCloseTo(nbar, 14);
    expect(Array.from(fields.compressibility)).toEqual([0, 0, 0]);
    expect(Array.from(fields.sitePotential)).toEqual([0, 0.1, 0.2]);
  });

  it('copies its input and names a field of the wrong length', () => {
    const solution = solutionOf([{ phi: 0.5, density: 1, densitySq: 1.5, odd: 0.4 }]);
    const fields = siteFieldsFrom(solution, Float64Array.of(0.3));
    solution.density[0] = 9;
    expect(fields.density[0]).toBe(1);
    expect(fields.compressibility[0]).toBe(0.3);
    expect(() => siteFieldsFrom({ ...solution, entropy: new Float64Array(2) }, null)).toThrow(/entropy: expected 1 values/);
    expect(() => siteFieldsFrom(solution, new Float64Array(3))).toThrow(/compressibility: expected 1 values, got 3/);
  });

  it('takes a solver state through siteArraysOf (phi, eps and the measured arrays by name)', () => {
    const phi = Float64Array.of(0.2, 0.7);
    const eps = Float64Array.of(-1, 1);
    const measure = {
      density: Float64Array.of(1, 1.3),
      densitySq: Float64Array.of(1, 2.1),
      parityOdd: Float64Array.of(1, 0.6),
      topWeight: new Float64Array(2),
      entropy: Float64Array.of(0, 0.4),
      psi: new Float64Array(2),
      grandPotential: new Float64Array(2),
    };
    const state = { fields: { phi, eps }, measure } as unknown as SolverState;
    const viaArrays = siteFieldsFrom(siteArraysOf(state), null);
    expect(Array.from(viaArrays.orderParameter)).toEqual([0.2, 0.7]);
    expect(Array.from(viaArrays.sitePotential)).toEqual([-1, 1]);
    expect(Array.from(viaArrays.density)).toEqual([1, 1.3]);
    expect(Array.from(viaArrays.entropy)).toEqual([0, 0.4]);
    expect(Array.from(viaArrays.parityOdd)).toEqual([1, 0.6]);
    expect(viaArrays.numberVariance[1]).toBeCloseTo(2.1 - 1.69, 14);
  });
});

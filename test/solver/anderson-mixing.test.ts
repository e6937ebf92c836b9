// Anderson mixing (src/solver/andersonMixing.ts) on linear fixed-point maps x -> A x + b with
// a known solution x* = (1 - A)^-1 b, against facts from outside the module:
// - without truncation Anderson mixing is GMRES on (1 - A) x = b (Walker & Ni, SIAM J.
//   Numer. Anal. 49, 1715 (2011), section 4), and GMRES is exact after as many steps as
//   (1 - A) has distinct eigenvalues in the start residual (Saad, Iterative Methods for Sparse
//   Linear Systems, 2nd ed., prop. 6.2 on the Krylov-space dimension); plain iteration
//   contracts only by the largest eigenvalue of A per step;
// - one step of depth 1 written out by hand: gamma = (dF . f)/(dF . dF), x = G(x) - gamma dG;
// - the red-black colour-1 sites counted by hand.
import { describe, expect, it } from 'vitest';
import { createAndersonMixer, lastColourSites, MAX_ANDERSON_DEPTH } from '../../src/solver/andersonMixing.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

/** A symmetric matrix Q diag(lambda) Q^T with a seeded random orthogonal Q (Gram-Schmidt). */
function symmetricWithSpectrum(lambda: number[], seed: string): number[][] {
  const n = lambda.length;
  const rng = seededRandom(seed);
  const q: number[][] = [];
  for (let k = 0; k < n; k++) {
    const v = Array.from({ length: n }, () => rng.uniform() - 0.5);
    for (const u of q) {
      const dot = u.reduce((s, x, i) => s + x * v[i], 0);
      for (let i = 0; i < n; i++) v[i] -= dot * u[i];
    }
    const norm = Math.hypot(...v);
    q.push(v.map((x) => x / norm));
  }
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => q.reduce((s, u, k) => s + u[i] * lambda[k] * u[j], 0)));
}

/** x* of x = A x + b by Gaussian elimination on (1 - A) x = b. */
function fixedPoint(a: number[][], b: number[]): number[] {
  const n = b.length;
  const m = a.map((row, i) => [...row.map((x, j) => (i === j ? 1 : 0) - x), b[i]]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[p][c])) p = r;
    [m[c], m[p]] = [m[p], m[c]];
    for (let r = c + 1; r < n; r++) {
      const f = m[r][c] / m[c][c];
      for (let k = c; k <= n; k++) m[r][k] -= f * m[c][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = m[r][n];
    for (let k = r + 1; k < n; k++) s -= m[r][k] * x[k];
    x[r] = s / m[r][r];
  }
  return x;
}

/** Iterate x <- G(x) (optionally mixed) from x0; returns max|x - x*| after each map application. */
function iterate(a: number[][], b: number[], x0: number[], steps: number, depth: number | null): { errors: number[]; x: Float64Array } {
  const n = b.length;
  const exact = fixedPoint(a, b);
  const mixer = depth === null ? null : createAndersonMixer(null, n, depth);
  const x = Float64Array.from(x0);
  const out = new Float64Array(n);
  const residual = new Float64Array(n);
  const errors: number[] = [];
  for (let s = 0; s < steps; s++) {
    for (let i = 0; i < n; i++) {
      let g = b[i];
      for (let j = 0; j < n; j++) g += a[i][j] * x[j];
      out[i] = g;
      residual[i] = g - x[i];
    }
    errors.push(Math.max(...Array.from(out, (g, i) => Math.abs(g - exact[i]))));
    if (mixer !== null) {
      mixer.record(out, residual);
      mixer.mix(out, null); // no floor: a linear map has signed solutions
    }
    x.set(out);
  }
  return { errors, x };
}

describe('Anderson mixing on linear maps x -> A x + b', () => {
  // Three distinct eigenvalues of A (0.95 slow, like a mode near a lobe edge) in 8 dimensions.
  const lambda = [0.95, 0.95, 0.95, 0.6, 0.6, 0.2, 0.2, 0.2];
  const a = symmetricWithSpectrum(lambda, 'anderson-linear');
  const rng = seededRandom('anderson-b');
  const b = Array.from({ length: 8 }, () => rng.uniform());
  const x0 = new Array<number>(8).fill(0);

  it('depth 3 is exact (GMRES) after 3 distinct eigenvalues, where plain iteration has shrunk the error only by 0.95 per step', () => {
    const mixed = iterate(a, b, x0, 6, 3);
    const plain = iterate(a, b, x0, 6, null);
    const scale = Math.max(...fixedPoint(a, b).map(Math.abs));
    // Inputs x_1..x_4 span the Krylov space of dimension 3: the output after the 5th
    // application is the fixed point to rounding.
    expect(mixed.errors[3]).toBeGreaterThan(1e-6 * scale); // not earlier: 3 dimensions to fill
    expect(mixed.errors[4]).toBeLessThan(1e-10 * scale);
    expect(plain.errors[4]).toBeGreaterThan(0.1 * scale);
    expect(plain.errors[5] / plain.errors[4]).toBeGreaterThan(0.9);
  });

  it('depth 1: one step equals gamma = (dF . f)/(dF . dF), x = G(x) - gamma dG written out', () => {
    const n = 8;
    const g = (x: number[]) => a.map((row, i) => b[i] + row.reduce((s, v, j) => s + v * x[j], 0));
    const x1 = x0;
    const g1 = g(x1);
    const x2 = g1; // a plain step
    const g2 = g(x2);
    const f1 = g1.map((v, i) => v - x1[i]);
    const f2 = g2.map((v, i) => v - x2[i]);
    const dF = f2.map((v, i) => v - f1[i]);
    const dG = g2.map((v, i) => v - g1[i]);
    const gamma = dF.reduce((s, v, i) => s + v * f2[i], 0) / dF.reduce((s, v) => s + v * v, 0);
    const expected = g2.map((v, i) => v - gamma * dG[i]);

    const mixer = createAndersonMixer(null, n, 1);
    mixer.record(Float64Array.from(g1), Float64Array.from(f1));
    const out = Float64Array.from(g2);
    const contraction = mixer.record(out, Float64Array.from(f2));
    expect(mixer.mix(out, null)).toBe(true);
    for (let i = 0; i < n; i++) expect(out[i]).toBeCloseTo(expected[i], 13);
    // The contraction of G along the step: max|g2 - g1| / max|x2 - x1|.
    const maxAbs = (v: number[]) => Math.max(...v.map(Math.abs));
    expect(contraction).toBeCloseTo(maxAbs(dG) / maxAbs(x2.map((v, i) => v - x1[i])), 13);
  });

  it('mixes only the listed sites, floors at the given fraction, and refuses without history', () => {
    const mixer = createAndersonMixer(Int32Array.from([1, 3]), 4, 2);
    const out = Float64Array.from([5, 1, 5, 1]);
    expect(mixer.record(out, Float64Array.from([1, 1, 1, 1]))).toBeNaN();
    expect(mixer.mix(out, 0.01)).toBe(false);
    // Second sweep: residual at the listed sites shrank 1 -> 0.5, so the secant step extrapolates
    // to the fixed point of the scalar map with rate 0.5: x* = g + f (0.5 / (1 - 0.5)).
    const out2 = Float64Array.from([7, 1.5, 7, 1.5]);
    mixer.record(out2, Float64Array.from([9, 0.5, 9, 0.5]));
    expect(mixer.mix(out2, 0.01)).toBe(true);
    expect(Array.from(out2)).toEqual([7, 2, 7, 2]);
    // A step towards negative values is floored at 1 % of the sweep's output.
    const floored = createAndersonMixer(null, 1, 1);
    floored.record(Float64Array.from([1]), Float64Array.from([-1]));
    const o = Float64Array.from([0.5]);
    floored.record(o, Float64Array.from([-0.5]));
    floored.mix(o, 0.01);
    expect(o[0]).toBe(0.005);
    expect(() => createAndersonMixer(null, 4, MAX_ANDERSON_DEPTH + 1)).toThrow(/depth/);
  });

  it('lastColourSites lists the (x + y + z) odd sites of a 2 x 3 x 3 block (hand count: 9)', () => {
    const sites = Array.from(lastColourSites([2, 3, 3]));
    expect(sites).toEqual([1, 3, 5, 7, 9, 11, 13, 15, 17]);
    for (const i of sites) {
      const a = Math.floor(i / 9);
      const b = Math.floor((i % 9) / 3);
      const c = i % 3;
      expect((a + b + c) % 2).toBe(1);
    }
  });
});

// Homogeneous mean-field solution against the analytic Mott-lobe boundary
// zJ/U = (n - x)(x - n + 1)/(1 + x), x = mu/U, with tips at zJ/U = 2n + 1 - 2 sqrt(n(n+1)),
// mu/U = sqrt(n(n+1)) - 1 (van Oosten, van der Straten & Stoof, PRA 63, 053601 (2001);
// Sheshadri et al., EPL 22, 257 (1993)), and against the atomic limit.
import { describe, expect, it } from 'vitest';
import { solveHomogeneous, solveHomogeneousAtDensity } from '../../src/solver/homogeneous.js';

const analyticBoundary = (n: number, x: number): number => ((n - x) * (x - n + 1)) / (1 + x);

describe('Mott lobes at T = 0', () => {
  for (const n of [1, 2, 3]) {
    it(`lobe n = ${n}: phi switches on at the analytic boundary (1e-4 in zJ/U)`, () => {
      for (const frac of [0.1, 0.3, 0.5, 0.7, 0.9]) {
        const x = n - 1 + frac;
        const zJc = analyticBoundary(n, x);
        // Bisect the transition with the full nonlinear solver.
        let lo = 0;
        let hi = 0.5;
        for (let k = 0; k < 40; k++) {
          const mid = 0.5 * (lo + hi);
          const s = solveHomogeneous({ zJ: mid, interactionU: 1, mu: x, temperature: 0, nmax: 8 });
          if (s.phi > 0) hi = mid;
          else lo = mid;
        }
        expect(Math.abs(0.5 * (lo + hi) - zJc)).toBeLessThan(1e-4);
        // Inside the lobe: incompressible, integer density.
        const inside = solveHomogeneous({ zJ: 0.9 * zJc, interactionU: 1, mu: x, temperature: 0, nmax: 8 });
        expect(inside.phi).toBe(0);
        expect(inside.density).toBe(n);
        expect(inside.compressibility).toBe(0);
        // Just outside: a small but finite order parameter (continuous transition).
        const outside = solveHomogeneous({ zJ: 1.01 * zJc, interactionU: 1, mu: x, temperature: 0, nmax: 8 });
        expect(outside.phi).toBeGreaterThan(0);
        expect(outside.phi).toBeLessThan(0.2);
      }
    });
    it(`lobe n = ${n}: tip position`, () => {
      const xTip = Math.sqrt(n * (n + 1)) - 1;
      const zTip = 2 * n + 1 - 2 * Math.sqrt(n * (n + 1));
      // The linear response at the tip: zJc = 1/chi.
      const s = solveHomogeneous({ zJ: 1e-3, interactionU: 1, mu: xTip, temperature: 0, nmax: 8 });
      expect(Math.abs(1 / s.susceptibility - zTip)).toBeLessThan(1e-9);
      // The tip is the maximum of the numerically found boundary.
      const around = [xTip - 0.01, xTip + 0.01].map((x) => 1 / solveHomogeneous({ zJ: 1e-3, interactionU: 1, mu: x, temperature: 0, nmax: 8 }).susceptibility);
      for (const z of around) expect(z).toBeLessThan(zTip);
    });
  }
});

describe('atomic limit J = 0', () => {
  it('density is the integer staircase in mu/U with zero compressibility on the plateaus', () => {
    // At J = 0 the site ground state is |n> with n = number of integers k >= 1 with k - 1 < mu/U
    // (energy U n(n-1)/2 - mu n is minimised at n = ceil(mu/U) for mu > 0).
    for (let x = -0.45; x < 4.5; x += 0.1) {
      const s = solveHomogeneous({ zJ: 0, interactionU: 1, mu: x, temperature: 0, nmax: 8 });
      const expected = x < 0 ? 0 : Math.ceil(x);
      expect(s.density).toBe(expected);
      expect(s.compressibility).toBe(0);
      expect(s.phi).toBe(0);
    }
  });

  it('T > 0, J = 0: grand-canonical single-site sums', () => {
    const T = 0.2;
    const mu = 1.3;
    const s = solveHomogeneous({ zJ: 0, interactionU: 1, mu, temperature: T, nmax: 14 });
    let Z = 0, n1 = 0, n2 = 0, e = 0, dn = 0;
    for (let n = 0; n <= 14; n++) {
      const en = 0.5 * n * (n - 1) - mu * n;
      const w = Math.exp(-en / T);
      Z += w; n1 += n * w; n2 += n * n * w; e += en * w;
    }
    n1 /= Z; n2 /= Z; e /= Z;
    dn = (n2 - n1 * n1) / T; // fluctuation-dissipation: dn/dmu = <dn^2>/kT
    expect(s.density).toBeCloseTo(n1, 12);
    expect(s.entropy).toBeCloseTo(Math.log(Z) + e / T, 11);
    expect(s.numberVariance).toBeCloseTo(n2 - n1 * n1, 11);
    expect(Math.abs(s.compressibility - dn)).toBeLessThan(1e-6);
  });
});

describe('fixed density', () => {
  it('finds mu for a superfluid filling and reproduces the density', () => {
    const s = solveHomogeneousAtDensity({ zJ: 0.3, interactionU: 1, temperature: 0, nmax: 8, density: 1.37 });
    expect(Math.abs(s.density - 1.37)).toBeLessThan(1e-10);
    expect(s.phi).toBeGreaterThan(0);
  });
  it('integer filling inside a lobe lands in the Mott gap', () => {
    const s = solveHomogeneousAtDensity({ zJ: 0.05, interactionU: 1, temperature: 0, nmax: 8, density: 1 });
    expect(s.density).toBe(1);
    expect(s.phi).toBe(0);
    // the gap at zJ/U = 0.05 lies inside 0 < mu/U < 1
    expect(s.mu).toBeGreaterThan(0);
    expect(s.mu).toBeLessThan(1);
  });
  it('refuses a filling that the truncation cannot hold', () => {
    expect(() => solveHomogeneousAtDensity({ zJ: 0.3, interactionU: 1, temperature: 0, nmax: 2, density: 2.5 })).toThrow(/nmax/);
  });
});

// Mott-lobe tips of the homogeneous mean-field phase map, root-found, against the analytic
// tips of the Gutzwiller / decoupling mean field, zJ/U = 2n + 1 - 2 sqrt(n(n+1)) at
// mu/U = sqrt(n(n+1)) - 1 (van Oosten, van der Straten & Stoof, PRA 63, 053601 (2001)),
// for n = 1, 2, 3 to 1e-8. The closed-form susceptibility used for the root finding is
// checked against the numerical linear response of the site problem (a tiny probe field)
// and its mu-derivative against finite differences, at T = 0 and T > 0.

import { describe, expect, it } from 'vitest';
import { phaseMap } from '../../src/solver/phaseMap.js';
import { atomicSusceptibility, siteSusceptibility } from '../../src/solver/homogeneous.js';
import { createSiteObservables, createSiteWorkspace } from '../../src/solver/site/index.js';

describe('lobe tips', () => {
  const map = phaseMap({ zJMax: 0.2, muMin: 0, muMax: 3, columns: 3, rows: 3, temperature: 0, nmax: 8, boundaryPoints: 400 });
  for (const n of [1, 2, 3]) {
    it(`n = ${n}: tip at the analytic point to 1e-8 (van Oosten et al. 2001)`, () => {
      const lobe = map.boundaries.find((b) => b.filling === n)!;
      expect(lobe.tipRefined).toBe(true);
      const muTip = Math.sqrt(n * (n + 1)) - 1;
      const zTip = 2 * n + 1 - 2 * Math.sqrt(n * (n + 1));
      expect(Math.abs(lobe.tipMu - muTip)).toBeLessThan(1e-8);
      expect(Math.abs(lobe.tipZJ - zTip)).toBeLessThan(1e-8);
    });
  }

  it('at T > 0 the refined tip is the maximum of the traced edge 1/chi (no sample above it)', () => {
    const warm = phaseMap({ zJMax: 0.2, muMin: 0, muMax: 2, columns: 2, rows: 2, temperature: 0.05, nmax: 8, boundaryPoints: 200 });
    for (const lobe of warm.boundaries.filter((b) => b.filling > 0)) {
      expect(lobe.tipRefined).toBe(true);
      for (const z of lobe.zJ) expect(z).toBeLessThanOrEqual(lobe.tipZJ * (1 + 1e-10));
      // Thermal fluctuations oppose the condensate, so more hopping is needed: the
      // superfluid edge moves to larger zJ than the T = 0 tip.
      const n = lobe.filling;
      expect(lobe.tipZJ).toBeGreaterThan(2 * n + 1 - 2 * Math.sqrt(n * (n + 1)));
    }
  });
});

describe('closed-form susceptibility of the decoupled site', () => {
  const nmax = 8;
  const ws = createSiteWorkspace(nmax);
  const scratch = createSiteObservables();
  const cases = [
    { mu: 0.3, kT: 0 },
    { mu: 1.7, kT: 0 },
    { mu: 2.41, kT: 0 },
    { mu: 0.4, kT: 0.05 },
    { mu: 1.2, kT: 0.1 },
    { mu: 0.5, kT: 0.3 },
  ];
  for (const { mu, kT } of cases) {
    it(`mu/U = ${mu}, kT/U = ${kT}: agrees with the numerical response and its slope`, () => {
      const exact = atomicSusceptibility(1, mu, kT, nmax);
      const numeric = siteSusceptibility(ws, 1, mu, kT, scratch);
      expect(Math.abs(exact.chi - numeric) / numeric).toBeLessThan(1e-8);
      if (kT === 0) {
        // T = 0, ground filling g = ceil(mu/U): chi = (g + 1)/(g - mu) + g/(mu - g + 1).
        const g = Math.ceil(mu);
        expect(exact.chi).toBeCloseTo((g + 1) / (g - mu) + g / (mu - g + 1), 12);
      }
      const h = 1e-5;
      const slope = (atomicSusceptibility(1, mu + h, kT, nmax).chi - atomicSusceptibility(1, mu - h, kT, nmax).chi) / (2 * h);
      expect(Math.abs(exact.dChiDmu - slope)).toBeLessThan(1e-6 * (1 + Math.abs(slope)));
    });
  }
});

import { describe, expect, it } from 'vitest';
import { sumSiteTotals } from '../../src/solver/latticeSolve.js';

// Hand count on three made-up sites: the totals are plain sums, Omega + mu N is the free
// energy (at T = 0 the energy; Legendre transform, common practice), the top weight is the
// largest one and its site the first where it occurs.
describe('sumSiteTotals', () => {
  it('sums the per-site fields and finds the largest top weight', () => {
    const t = sumSiteTotals(
      {
        phi: [0.5, 0, 2],
        density: [1, 2, 0.25],
        grandPotential: [-1, -3, 0.5],
        entropy: [0.1, 0, 0.2],
        topWeight: [1e-9, 3e-6, 3e-6],
      },
      1.5,
    );
    expect(t.atoms).toBe(3.25);
    expect(t.condensedAtoms).toBe(4.25);
    expect(t.grandPotential).toBe(-3.5);
    expect(t.freeEnergy).toBe(-3.5 + 1.5 * 3.25);
    expect(t.entropy).toBeCloseTo(0.3, 15);
    expect(t.maxTopWeight).toBe(3e-6);
    expect(t.maxTopWeightSite).toBe(1);
  });
});

// Shell read-out of a trapped cloud in the atomic limit (J = 0, T = 0): with
// eps = V r^2 a site holds n = ceil((mu - V r^2) / U) atoms (the integer that minimises
// U n (n - 1) / 2 - (mu - eps) n), so filling n occupies the annulus between
// r_(n+1) and r_n, r_n = sqrt((mu - U (n - 1)) / V). In 2D every full shell then has the
// same area pi (r_n^2 - r_(n+1)^2) = pi U / V. The lattice points of an annulus differ from
// its area by at most the points within h = 1/sqrt 2 of either circle (their unit cells
// straddle it): pi ((r + h)^2 - (r - h)^2) = 2 sqrt 2 pi r per circle.

import { describe, expect, it } from 'vitest';
import { PhaseCode } from '../../src/observables/phaseCodes.js';
import { scaledRadii, shellSummary } from '../../src/observables/shellSummary.js';

describe('shellSummary in the atomic limit', () => {
  const size = 81;
  const centre = 40;
  const V = 0.004;
  const U = 1;
  const mu = 2.6; // fillings 3 (centre), 2, 1
  const radius = scaledRadii([size, size], [centre, centre], [1, 1]);
  const density = new Float64Array(size * size);
  const codes = new Uint8Array(size * size);
  const filling = new Int32Array(size * size);
  for (let i = 0; i < radius.length; i++) {
    const local = mu - V * radius[i] * radius[i];
    const n = local > 0 ? Math.ceil(local / U) : 0;
    density[i] = n;
    codes[i] = n > 0 ? PhaseCode.mott : PhaseCode.empty;
    filling[i] = n;
  }
  const summary = shellSummary(density, new Float64Array(size * size), codes, filling, radius);
  const edge = (n: number) => Math.sqrt((mu - U * (n - 1)) / V);

  it('finds the shells n = 1, 2, 3 with edges at the analytic radii (to 0.25 site), the central one from 0', () => {
    expect(summary.shells.map((s) => s.filling)).toEqual([1, 2, 3]);
    for (const shell of summary.shells) {
      const n = shell.filling;
      expect(shell.radiusFrom).toBe('annulus');
      expect(Math.abs(shell.outerRadius - edge(n))).toBeLessThan(0.25);
      // The sites themselves lie inside the edges.
      expect(shell.maxSiteRadius).toBeLessThanOrEqual(edge(n));
      if (n < 3) {
        expect(Math.abs(shell.innerRadius - edge(n + 1))).toBeLessThan(0.25);
        expect(shell.minSiteRadius).toBeGreaterThanOrEqual(edge(n + 1));
      } else {
        // The central shell starts at the trap centre, whatever the nearest site's distance.
        expect(shell.innerRadius).toBe(0);
      }
      expect(shell.atoms).toBe(n * shell.sites);
    }
  });

  it('a central shell on an even lattice (trap centre between sites) starts at 0, not at 1/sqrt 2', () => {
    const even = 40;
    const r = scaledRadii([even, even], [19.5, 19.5], [1, 1]);
    const codesEven = new Uint8Array(even * even);
    const fillingEven = new Int32Array(even * even);
    for (let i = 0; i < r.length; i++) {
      if (r[i] < 6.3) {
        codesEven[i] = PhaseCode.mott;
        fillingEven[i] = 1;
      }
    }
    const [shell] = shellSummary(new Float64Array(even * even).fill(1), new Float64Array(even * even), codesEven, fillingEven, r).shells;
    expect(shell.minSiteRadius).toBeCloseTo(Math.SQRT1_2, 12);
    expect(shell.innerRadius).toBe(0);
    expect(Math.abs(shell.outerRadius - 6.3)).toBeLessThan(0.25);
  });

  it('a shell scattered over many bins, none half full, falls back to the extreme site radii', () => {
    const scattered = new Uint8Array(size * size);
    const fill = new Int32Array(size * size);
    for (let i = 0; i < radius.length; i += 7) {
      scattered[i] = PhaseCode.mott;
      fill[i] = 1;
    }
    const [shell] = shellSummary(new Float64Array(size * size).fill(1), new Float64Array(size * size), scattered, fill, radius).shells;
    expect(shell.radiusFrom).toBe('sites');
    expect(shell.innerRadius).toBe(shell.minSiteRadius);
    expect(shell.outerRadius).toBe(shell.maxSiteRadius);
  });

  it('gives the full shells n = 1, 2 the same area pi U / V', () => {
    for (const n of [1, 2]) {
      const shell = summary.shells.find((s) => s.filling === n)!;
      const tolerance = 2 * Math.SQRT2 * Math.PI * (edge(n) + edge(n + 1));
      expect(Math.abs(shell.sites - (Math.PI * U) / V)).toBeLessThan(tolerance);
    }
  });

  it('puts every atom in the Mott phase and counts the empty margin', () => {
    const atoms = density.reduce((a, b) => a + b, 0);
    expect(summary.byPhase.mott.atoms).toBe(atoms);
    expect(summary.byPhase.mott.atomFraction).toBe(1);
    expect(summary.byPhase.empty.sites + summary.byPhase.mott.sites).toBe(size * size);
    expect(summary.condensateFraction).toBe(0);
  });
});

describe('scaledRadii', () => {
  it('is sqrt(sum_d s_d^2 (x_d - c_d)^2), with axes beyond the shape ignored', () => {
    const r = scaledRadii([3, 4], [1, 1.5], [2, 1]);
    // site (2, 3): dx = 2 * 1, dy = 1.5
    expect(r[2 * 4 + 3]).toBeCloseTo(Math.hypot(2, 1.5), 15);
    const line = scaledRadii([5], [2], [3]);
    expect(Array.from(line)).toEqual([6, 3, 0, 3, 6]);
  });
});

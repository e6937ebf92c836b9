// The chi-square-far-from-one warning of the compare fit (src/pipeline/compareFitGoodness.ts)
// against the chi-square distribution: with nu degrees of freedom chi^2 has mean nu and
// variance 2 nu (Bevington & Robinson, 3rd ed., section 11.1), so chi^2_nu = chi^2 / nu has
// standard deviation sqrt(2 / nu), written out here; the warning starts 5 of them from 1.
// A sampled check: chi^2 as a sum of nu squared standard normals (the definition of the
// distribution) has that spread, and right fits sampled so stay quiet.

import { describe, expect, it } from 'vitest';
import { CHI_SQUARE_WARNING_SIGMAS, chiSquareFarFromOne, chiSquareWarnings, reducedChiSquareSpread } from '../../src/pipeline/compareFitGoodness.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

/** chi^2_nu of a right fit: a sum of nu squared standard normals over nu. */
function sampledReducedChiSquare(random: ReturnType<typeof seededRandom>, nu: number): number {
  let s = 0;
  for (let k = 0; k < nu; k++) s += random.normal() ** 2;
  return s / nu;
}

describe('chi-square-far-from-one', () => {
  it('the spread is sqrt(2/nu), as sampled chi-square values have it', () => {
    const random = seededRandom('test/chi-square-spread');
    const nu = 40;
    const samples = Array.from({ length: 4000 }, () => sampledReducedChiSquare(random, nu));
    const mean = samples.reduce((a, b) => a + b, 0) / samples.length;
    const sd = Math.sqrt(samples.reduce((a, b) => a + (b - mean) ** 2, 0) / (samples.length - 1));
    expect(reducedChiSquareSpread(nu)).toBeCloseTo(Math.sqrt(2 / nu), 14);
    // Sampling error of a standard deviation from 4000 values: about 2 %; allow 6 %.
    expect(Math.abs(sd / Math.sqrt(2 / nu) - 1)).toBeLessThan(0.06);
    expect(Math.abs(mean - 1)).toBeLessThan(0.02);
  });

  it.each([20, 100, 1000, 6000])('nu = %i: the threshold lies 5 sqrt(2/nu) from 1 on both sides', (nu) => {
    expect(CHI_SQUARE_WARNING_SIGMAS).toBe(5);
    const sd = Math.sqrt(2 / nu);
    expect(chiSquareFarFromOne(1 + 4.95 * sd, nu)).toBe(false);
    expect(chiSquareFarFromOne(1 + 5.05 * sd, nu)).toBe(true);
    if (5.05 * sd < 1) {
      expect(chiSquareFarFromOne(1 - 4.95 * sd, nu)).toBe(false);
      expect(chiSquareFarFromOne(1 - 5.05 * sd, nu)).toBe(true);
    }
    expect(chiSquareWarnings(1, nu)).toEqual([]);
  });

  it('right fits sampled from the chi-square distribution do not warn', () => {
    // Chance per fit beyond 5 sigma at nu = 100: 1.4e-5 (scipy.stats.chi2.sf(100 + 5 * sqrt(200), 100)).
    const random = seededRandom('test/chi-square-quiet');
    let warned = 0;
    for (let k = 0; k < 1000; k++) if (chiSquareWarnings(sampledReducedChiSquare(random, 100), 100).length > 0) warned++;
    expect(warned).toBe(0);
  });

  it('a noise-free picture (chi2_nu far below 1): the value, the degrees of freedom and what it means for the errors', () => {
    const w = chiSquareWarnings(0.0016, 950);
    expect(w).toHaveLength(1);
    expect(w[0].code).toBe('chi-square-far-from-one');
    expect(w[0].message).toContain('0.0016 on 950 degrees of freedom');
    expect(w[0].message).toContain(`1 +- ${Number(Math.sqrt(2 / 950).toPrecision(3))}`);
    // 1 / sqrt(0.0016) = 25: the errors are about 25 times too large.
    expect(w[0].message).toContain('too large by about 1/sqrt(chi2_nu) = 25');
    expect(w[0].message).toContain('uncertaintyScaledByReducedChiSquare (x 0.04)');
  });

  it('chi2_nu far above 1: the errors are enlarged by sqrt(chi2_nu), right only if the model is', () => {
    const w = chiSquareWarnings(4, 500);
    expect(w.map((x) => x.code)).toEqual(['chi-square-far-from-one']);
    expect(w[0].message).toContain('enlarged by sqrt(chi2_nu) = 2,');
    expect(w[0].message).toContain('residual picture');
  });

  it('no degrees of freedom or no value: no verdict', () => {
    expect(chiSquareWarnings(0.001, 0)).toEqual([]);
    expect(chiSquareWarnings(NaN, 100)).toEqual([]);
  });
});

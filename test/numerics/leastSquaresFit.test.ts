// Levenberg-Marquardt least squares (moved from test/numerics/fit.test.ts, with new checks)
// against problems with known answers:
// - the weighted straight line in closed form (Bevington & Robinson, Data Reduction and
//   Error Analysis, 3rd ed., eqs. 6.12, 6.21);
// - a weighted quadratic, a linear least-squares problem whose solution and covariance are
//   those of the normal equations (A^T W A) c = A^T W y, solved here with ml-matrix;
// - exact data of non-linear models (exponential decay, Gaussian), where the minimum is the
//   truth with chi^2 = 0;
// - the pull and chi-square statistics of correctly weighted Gaussian noise (ch. 11).

import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { leastSquaresFit } from '../../src/numerics/leastSquaresFit.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

describe('Levenberg-Marquardt fit', () => {
  it('reproduces the closed-form weighted straight-line fit (Bevington & Robinson eqs. 6.12, 6.21)', () => {
    // For y = c0 + c1 x with weights 1/sigma^2: Delta = S Sxx - Sx^2,
    // c0 = (Sxx Sy - Sx Sxy) / Delta, c1 = (S Sxy - Sx Sy) / Delta,
    // sigma_c0^2 = Sxx / Delta, sigma_c1^2 = S / Delta. Tolerance 1e-7 relative:
    // the numerical Jacobian of a linear model is exact to ~1e-10.
    const random = seededRandom('line');
    const x = Float64Array.from({ length: 25 }, (_, i) => i * 0.4 - 3);
    const sigma = Float64Array.from({ length: 25 }, () => 0.1 + 0.3 * random.uniform());
    const y = Float64Array.from(x, (xi, i) => 1.7 - 0.8 * xi + sigma[i] * random.normal());
    let S = 0, Sx = 0, Sy = 0, Sxx = 0, Sxy = 0;
    for (let i = 0; i < x.length; i++) {
      const w = 1 / sigma[i] ** 2;
      S += w; Sx += w * x[i]; Sy += w * y[i]; Sxx += w * x[i] ** 2; Sxy += w * x[i] * y[i];
    }
    const delta = S * Sxx - Sx * Sx;
    const fit = leastSquaresFit({
      model: (p) => Float64Array.from(x, (xi) => p[0] + p[1] * xi),
      data: y,
      sigma,
      initial: [0, 0],
    });
    expect(fit.converged).toBe(true);
    expect(Math.abs(fit.best[0] / ((Sxx * Sy - Sx * Sxy) / delta) - 1)).toBeLessThan(1e-7);
    expect(Math.abs(fit.best[1] / ((S * Sxy - Sx * Sy) / delta) - 1)).toBeLessThan(1e-7);
    expect(Math.abs(fit.uncertaintyFromSigma[0] / Math.sqrt(Sxx / delta) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(fit.uncertaintyFromSigma[1] / Math.sqrt(S / delta) - 1)).toBeLessThan(1e-6);
    expect(fit.degreesOfFreedom).toBe(23);
    expect(fit.uncertainty[1]).toBeCloseTo(fit.uncertaintyFromSigma[1] * Math.sqrt(fit.reducedChiSquare), 12);
  });

  it('recovers Gaussian amplitude, centre and width within the reported uncertainties, with chi^2_nu ~ 1', () => {
    // Over R realisations of correctly weighted Gaussian noise: the pulls
    // (best - true) / uncertainty have unit spread, and chi^2 has mean nu and variance
    // 2 nu (Bevington & Robinson, ch. 11), so the mean reduced chi-square is 1 within
    // sqrt(2 / (nu R)). Tolerances: 5 standard errors; the standard error of an
    // estimated standard deviation from R values is 1 / sqrt(2 R).
    const truth = [12, 0.4, 1.3];
    const x = Float64Array.from({ length: 80 }, (_, i) => -5 + (10 * i) / 79);
    const model = (p: Float64Array) => Float64Array.from(x, (xi) => p[0] * Math.exp(-((xi - p[1]) ** 2) / (2 * p[2] * p[2])));
    const clean = model(Float64Array.from(truth));
    const noise = 0.5;
    const realisations = 300;
    const pullSq = [0, 0, 0];
    let chiSum = 0;
    const random = seededRandom('lm/gauss');
    for (let r = 0; r < realisations; r++) {
      const data = Float64Array.from(clean, (v) => v + noise * random.normal());
      const fit = leastSquaresFit({ model, data, sigma: noise, initial: [8, -0.5, 2], lower: [0, -5, 0.05] });
      expect(fit.converged).toBe(true);
      for (let j = 0; j < 3; j++) {
        pullSq[j] += ((fit.best[j] - truth[j]) / fit.uncertainty[j]) ** 2;
        // A single fit: within 5 reported standard uncertainties.
        expect(Math.abs(fit.best[j] - truth[j])).toBeLessThan(5 * fit.uncertainty[j]);
      }
      chiSum += fit.reducedChiSquare;
    }
    const nu = 77;
    expect(Math.abs(chiSum / realisations - 1)).toBeLessThan(5 * Math.sqrt(2 / (nu * realisations)));
    for (let j = 0; j < 3; j++) {
      expect(Math.abs(Math.sqrt(pullSq[j] / realisations) - 1)).toBeLessThan(5 / Math.sqrt(2 * realisations));
    }
  });

  it('keeps parameters inside their bounds and says which ended on one', () => {
    // The true amplitude 12 lies above the upper bound 10: the best bounded fit sits on it.
    const x = Float64Array.from({ length: 40 }, (_, i) => -4 + i * 0.2);
    const model = (p: Float64Array) => Float64Array.from(x, (xi) => p[0] * Math.exp(-(xi * xi) / (2 * p[1] * p[1])));
    const data = model(Float64Array.from([12, 1.3]));
    const fit = leastSquaresFit({ model, data, sigma: 0.1, initial: [5, 1], upper: [10, 5], lower: [0, 0.1] });
    expect(fit.best[0]).toBe(10);
    expect(fit.atBound).toEqual([true, false]);
    expect(() => leastSquaresFit({ model, data: data.subarray(0, 2), sigma: 1, initial: [1, 1] })).toThrow(/2 data points/);
  });
  it('solves a weighted quadratic like the normal equations (A^T W A) c = A^T W y, covariance (A^T W A)^-1', () => {
    // Linear model: the minimum and its covariance are closed-form; ml-matrix solves them.
    // Tolerance 1e-7: forward differences of a linear model are exact up to rounding
    // (eps |f| / h ~ 1e-9 relative with h = 1e-6 |p|).
    const random = seededRandom('lm/quadratic');
    const n = 30;
    const x = Float64Array.from({ length: n }, (_, i) => -2 + (4 * i) / (n - 1));
    const sigma = Float64Array.from({ length: n }, () => 0.05 + 0.2 * random.uniform());
    const y = Float64Array.from(x, (xi, i) => 0.3 + 1.1 * xi - 0.45 * xi * xi + sigma[i] * random.normal());
    const A = new Matrix(n, 3);
    const AtW = new Matrix(3, n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < 3; j++) {
        A.set(i, j, x[i] ** j);
        AtW.set(j, i, x[i] ** j / sigma[i] ** 2);
      }
    }
    const normal = AtW.mmul(A);
    const coefficients = solve(normal, AtW.mmul(Matrix.columnVector(Array.from(y))));
    const covariance = solve(normal, Matrix.eye(3, 3));
    const fit = leastSquaresFit({
      model: (p) => Float64Array.from(x, (xi) => p[0] + p[1] * xi + p[2] * xi * xi),
      data: y,
      sigma,
      initial: [1, 1, 1],
    });
    expect(fit.converged).toBe(true);
    for (let j = 0; j < 3; j++) {
      expect(Math.abs(fit.best[j] - coefficients.get(j, 0))).toBeLessThan(1e-7 * (1 + Math.abs(coefficients.get(j, 0))));
      for (let k = 0; k < 3; k++) {
        expect(Math.abs(fit.covariance[j * 3 + k] / covariance.get(j, k) - 1)).toBeLessThan(1e-6);
      }
    }
    // chi^2 at the minimum equals the weighted residual sum of the closed-form solution
    let chi = 0;
    for (let i = 0; i < n; i++) {
      const c = coefficients;
      chi += ((y[i] - (c.get(0, 0) + c.get(1, 0) * x[i] + c.get(2, 0) * x[i] ** 2)) / sigma[i]) ** 2;
    }
    expect(Math.abs(fit.chiSquare / chi - 1)).toBeLessThan(1e-10);
  });

  it('recovers the parameters of exact non-linear data (chi^2 -> 0), with forward or central differences', () => {
    const t = Float64Array.from({ length: 20 }, (_, i) => 0.25 * i);
    const model = (p: Float64Array) => Float64Array.from(t, (ti) => p[0] * Math.exp(-p[1] * ti));
    const data = model(Float64Array.of(3, 0.7));
    for (const centralDifferences of [false, true]) {
      const fit = leastSquaresFit({ model, data, sigma: 0.01, initial: [1, 0.1] }, { centralDifferences });
      expect(fit.converged).toBe(true);
      expect(Math.abs(fit.best[0] - 3)).toBeLessThan(1e-8);
      expect(Math.abs(fit.best[1] - 0.7)).toBeLessThan(1e-8);
      expect(fit.chiSquare).toBeLessThan(1e-12);
    }
  });

  it('says so when a parameter does not affect the model: no finite uncertainty for it', () => {
    const x = Float64Array.from({ length: 10 }, (_, i) => i);
    const fit = leastSquaresFit({
      model: (p) => Float64Array.from(x, (xi) => p[0] * xi), // p[1] unused
      data: Float64Array.from(x, (xi) => 2 * xi),
      sigma: 1,
      initial: [1, 5],
    });
    expect(Math.abs(fit.best[0] - 2)).toBeLessThan(1e-8);
    expect(Number.isFinite(fit.uncertainty[1])).toBe(false);
  });

  it('names bad input', () => {
    const model = (p: Float64Array) => Float64Array.of(p[0], p[0], p[0]);
    const data = Float64Array.of(1, 2, 3);
    expect(() => leastSquaresFit({ model, data, sigma: 0, initial: [1] })).toThrow(/sigma must be positive and finite, got 0 at data point 0/);
    expect(() => leastSquaresFit({ model, data, sigma: Float64Array.of(1, 1), initial: [1] })).toThrow(/sigma has 2 entries, data has 3/);
    expect(() => leastSquaresFit({ model, data, sigma: 1, initial: [] })).toThrow(/at least one initial parameter/);
    expect(() => leastSquaresFit({ model, data, sigma: 1, initial: [1], lower: [2], upper: [1] })).toThrow(/parameter 0 has lower bound 2 above upper bound 1/);
    expect(() => leastSquaresFit({ model: () => Float64Array.of(1), data, sigma: 1, initial: [1] })).toThrow(/model returned 1 values, data has 3/);
  });
});

// Shot-to-shot spread of the compare fit (src/pipeline/compareFitBootstrap.ts), checked on a
// model that is linear in its parameters, where the one Gauss-Newton step the module takes
// from the fit of the mean picture is exact: each shot's shift must then equal the weighted
// least-squares fit of that shot minus the fit of the mean, computed here independently by
// QR on the whitened design (ml-matrix; for a linear model weighted least squares has this
// unique minimum: Gauss-Markov / Aitken, any regression text). The bootstrap replicates are
// means of resampled shot shifts, so their standard deviation must approach the ideal
// bootstrap standard error of a mean, sqrt(sum_s (x_s - xbar)^2) / M (Efron & Tibshirani,
// An Introduction to the Bootstrap (1993), ch. 5, the plug-in standard error; equation
// number not given, recalled from memory), within the
// Monte Carlo error of B replicates, about 1/sqrt(2B) relative for the spread of a roughly
// normal sample (common practice). The draws are reproducible from the seed.
import { Matrix, QrDecomposition, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { componentStd, linearisedShots, type LinearisedShotsInput } from '../../src/pipeline/compareFitBootstrap.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

const PIXELS = 40;
const SHOTS = 7;

/** An invented stack: a straight line plus a Gaussian bump, noisy shots with drifting parameters. */
function linearStack(replicates: number, seed: string): LinearisedShotsInput & { truth: number[][] } {
  const x = Array.from({ length: PIXELS }, (_, i) => i / (PIXELS - 1));
  const columns = [
    Float64Array.from(x, () => 1),
    Float64Array.from(x, (v) => v),
    Float64Array.from(x, (v) => Math.exp(-((v - 0.4) ** 2) / 0.02)),
  ];
  const sigma = Float64Array.from(x, (v) => 0.05 + 0.1 * v);
  const noise = seededRandom('invented stack noise');
  const truth: number[][] = [];
  const shots = Array.from({ length: SHOTS }, (_, s) => {
    const p = [1 + 0.1 * s, -0.5 + 0.03 * s * s, 2 - 0.2 * Math.sin(s)];
    truth.push(p);
    return Float64Array.from(x, (_, i) => p[0] * columns[0][i] + p[1] * columns[1][i] + p[2] * columns[2][i] + sigma[i] * noise.normal());
  });
  const meanData = new Float64Array(PIXELS);
  for (const shot of shots) for (let i = 0; i < PIXELS; i++) meanData[i] += shot[i] / SHOTS;
  // C = (J^T W J)^-1
  const jtwj = new Matrix(3, 3);
  for (let a = 0; a < 3; a++) {
    for (let b = 0; b < 3; b++) {
      let s = 0;
      for (let i = 0; i < PIXELS; i++) s += (columns[a][i] * columns[b][i]) / sigma[i] ** 2;
      jtwj.set(a, b, s);
    }
  }
  const covariance = Float64Array.from(inverse(jtwj).to1DArray());
  return { shots, meanData, columns, sigma, covariance, replicates, seed, truth };
}

/** Weighted least-squares parameters of data d, by QR of the whitened design (independent of the normal equations). */
function weightedFit(input: LinearisedShotsInput, d: Float64Array): number[] {
  const A = new Matrix(PIXELS, 3);
  const y = new Matrix(PIXELS, 1);
  for (let i = 0; i < PIXELS; i++) {
    for (let a = 0; a < 3; a++) A.set(i, a, input.columns[a][i] / input.sigma[i]);
    y.set(i, 0, d[i] / input.sigma[i]);
  }
  return new QrDecomposition(A).solve(y).getColumn(0);
}

describe('linearisedShots', () => {
  it('gives each shot the exact least-squares shift of a linear model', () => {
    const input = linearStack(0, 'unused');
    const { perShot, replicates } = linearisedShots(input);
    expect(replicates).toHaveLength(0);
    expect(perShot).toHaveLength(SHOTS);
    const p0 = weightedFit(input, input.meanData);
    for (let s = 0; s < SHOTS; s++) {
      const ps = weightedFit(input, input.shots[s] as Float64Array);
      for (let a = 0; a < 3; a++) expect(Math.abs(perShot[s][a] - (ps[a] - p0[a])), `shot ${s} parameter ${a}`).toBeLessThan(1e-10 * (1 + Math.abs(ps[a])));
    }
    // the shifts of the shots average to zero: the mean picture is the mean of the shots
    for (let a = 0; a < 3; a++) {
      const mean = perShot.reduce((t, dp) => t + dp[a], 0) / SHOTS;
      expect(Math.abs(mean)).toBeLessThan(1e-12);
    }
    // and the per-shot fits follow the drifts put into the stack (noise of one shot is small
    // against the drift of the offset, 0.1 per shot)
    const offsetFits = input.shots.map((_, s) => p0[0] + perShot[s][0]);
    for (let s = 1; s < SHOTS; s++) expect(offsetFits[s]).toBeGreaterThan(offsetFits[s - 1]);
  });

  it('has bootstrap replicates whose spread is the bootstrap standard error of the mean', () => {
    const B = 4000;
    const input = linearStack(B, 'bootstrap check');
    const { perShot, replicates } = linearisedShots(input);
    expect(replicates).toHaveLength(B);
    const spread = componentStd(replicates, 3);
    for (let a = 0; a < 3; a++) {
      const xbar = perShot.reduce((t, dp) => t + dp[a], 0) / SHOTS;
      const ideal = Math.sqrt(perShot.reduce((t, dp) => t + (dp[a] - xbar) ** 2, 0)) / SHOTS;
      // 1/sqrt(2B) = 1.1 %; 5 % leaves room for the non-normal resampling distribution
      expect(Math.abs(spread[a] / ideal - 1), `parameter ${a}`).toBeLessThan(0.05);
      const mean = replicates.reduce((t, dp) => t + dp[a], 0) / B;
      expect(Math.abs(mean)).toBeLessThan((4 * ideal) / Math.sqrt(B));
    }
  });

  it('draws only whole shots: each replicate is a mean of M drawn shot shifts', () => {
    // one parameter, shifts 0, 1, 10, 100, ... per shot, so M x replicate spells the counts
    const M = 4;
    const shots = Array.from({ length: M }, (_, s) => Float64Array.of(s === 0 ? 0 : 10 ** (s - 1)));
    const input: LinearisedShotsInput = {
      shots,
      meanData: Float64Array.of(0),
      columns: [Float64Array.of(1)],
      sigma: Float64Array.of(1),
      covariance: Float64Array.of(1),
      replicates: 500,
      seed: 'whole shots',
    };
    const { perShot, replicates } = linearisedShots(input);
    expect(perShot.map((dp) => dp[0])).toEqual([0, 1, 10, 100]);
    const seen = new Set<string>();
    for (const r of replicates) {
      const total = Math.round(r[0] * M);
      expect(Math.abs(r[0] * M - total)).toBeLessThan(1e-9);
      const digits = [Math.floor(total / 100), Math.floor(total / 10) % 10, total % 10];
      // counts of shots 1..3 drawn; shot 0 makes up the rest
      expect(digits[0] + digits[1] + digits[2]).toBeLessThanOrEqual(M);
      seen.add(digits.join(','));
    }
    // with 500 draws of 4 from 4 shots, many of the 35 count patterns appear
    expect(seen.size).toBeGreaterThan(20);
  });

  it('is reproducible from the seed and changes with it', () => {
    const a = linearisedShots(linearStack(50, 'seed one'));
    const b = linearisedShots(linearStack(50, 'seed one'));
    const c = linearisedShots(linearStack(50, 'seed two'));
    expect(b.replicates.map((r) => Array.from(r))).toEqual(a.replicates.map((r) => Array.from(r)));
    expect(c.replicates.map((r) => Array.from(r))).not.toEqual(a.replicates.map((r) => Array.from(r)));
    // the per-shot shifts do not depend on the seed
    expect(c.perShot.map((r) => Array.from(r))).toEqual(a.perShot.map((r) => Array.from(r)));
  });
});

describe('componentStd', () => {
  it('is the sample standard deviation of each component', () => {
    // 2, 4, 4, 4, 5, 5, 7, 9: mean 5, squared deviations 9+1+1+1+0+0+4+16 = 32 (by hand),
    // sample standard deviation sqrt(32 / 7)
    const data = [2, 4, 4, 4, 5, 5, 7, 9];
    const vectors = data.map((v) => Float64Array.of(v, -3 * v + 1, 42));
    const sd = componentStd(vectors, 3);
    expect(sd[0]).toBeCloseTo(Math.sqrt(32 / 7), 14);
    expect(sd[1]).toBeCloseTo(3 * Math.sqrt(32 / 7), 13);
    expect(sd[2]).toBe(0);
  });

  it('is NaN with fewer than two vectors', () => {
    expect(Array.from(componentStd([], 2)).every(Number.isNaN)).toBe(true);
    expect(Array.from(componentStd([Float64Array.of(1, 2)], 2)).every(Number.isNaN)).toBe(true);
  });
});

// One-pass moments against the textbook definitions: mean = sum x / n and the sample
// variance s^2 = sum (x - mean)^2 / (n - 1) by the two-pass formula (e.g. Chan, Golub &
// LeVeque, Am. Stat. 37, 242 (1983), eq. 1.2a), on data whose moments can be worked out
// by hand, and on the shifted data 1e9 + {4, 7, 13, 16} (mean 1e9 + 10, s^2 = 30), where
// the one-pass "sum of squares" formula is known to lose every digit (the example is
// common practice in texts on variance algorithms; recalled from memory).

import { describe, expect, it } from 'vitest';
import {
  chanMerge,
  createRunningMoments,
  sampleSpread,
  scalarSummary,
  welfordAdd,
  welfordAddAt,
} from '../../src/numerics/runningMoments.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

function twoPass(values: number[]): { mean: number; m2: number } {
  const mean = values.reduce((s, v) => s + v, 0) / values.length;
  return { mean, m2: values.reduce((s, v) => s + (v - mean) ** 2, 0) };
}

/** Columns: slot i of realisation r is data[r][i]. */
function accumulate(data: number[][]): ReturnType<typeof createRunningMoments> {
  const m = createRunningMoments(data[0].length);
  data.forEach((row, r) => welfordAdd(m, Float64Array.from(row), r + 1));
  return m;
}

describe('Welford update', () => {
  it('gives mean 2.5 and M2 = 5 for 1, 2, 3, 4 (by hand), exactly', () => {
    const m = accumulate([[1], [2], [3], [4]]);
    expect(m.mean[0]).toBe(2.5);
    expect(m.m2[0]).toBe(5);
    expect(sampleSpread(m.m2, 4, 0)[0]).toBe(Math.sqrt(5 / 3));
  });

  it('keeps the variance of 1e9 + {4, 7, 13, 16} (s^2 = 30) where sum-of-squares fails', () => {
    const values = [4, 7, 13, 16].map((v) => 1e9 + v);
    const m = accumulate(values.map((v) => [v]));
    expect(m.mean[0]).toBe(1e9 + 10);
    expect(m.m2[0] / 3).toBeCloseTo(30, 9);
    // the naive formula, for contrast: (sum x^2 - (sum x)^2 / n) / (n - 1)
    const sum = values.reduce((s, v) => s + v, 0);
    const sumSq = values.reduce((s, v) => s + v * v, 0);
    expect(Math.abs((sumSq - (sum * sum) / 4) / 3 - 30)).toBeGreaterThan(1);
  });

  it('gives M2 = 0 and the value itself for a slot that never changes', () => {
    const m = accumulate(Array.from({ length: 7 }, () => [0.1, 1, 2.7]));
    expect(Array.from(m.mean)).toEqual([0.1, 1, 2.7]);
    expect(Array.from(m.m2)).toEqual([0, 0, 0]);
  });

  it('agrees with the two-pass formula on random data to 1e-13 relative', () => {
    const random = seededRandom('moments/random');
    const data = Array.from({ length: 50 }, () => [random.normal() * 3 + 100, random.uniform()]);
    const m = accumulate(data);
    for (let i = 0; i < 2; i++) {
      const ref = twoPass(data.map((row) => row[i]));
      expect(Math.abs(m.mean[i] - ref.mean) / Math.abs(ref.mean)).toBeLessThan(1e-13);
      expect(Math.abs(m.m2[i] - ref.m2) / ref.m2).toBeLessThan(1e-13);
    }
  });

  it('updates single slots at their own counts like the array form', () => {
    const mean = new Float64Array(2);
    const m2 = new Float64Array(2);
    const values = [5, 1, 8, 2, 9];
    values.forEach((v, k) => welfordAddAt(mean, m2, 1, v, k + 1));
    const ref = accumulate(values.map((v) => [v]));
    expect(mean[1]).toBe(ref.mean[0]);
    expect(m2[1]).toBe(ref.m2[0]);
    expect(mean[0]).toBe(0);
  });
});

describe('Chan-Golub-LeVeque merge', () => {
  it('merges {1, 2} and {3, 4, 5} into the moments of 1..5 (mean 3, M2 = 10, by hand)', () => {
    const a = accumulate([[1], [2]]);
    const b = accumulate([[3], [4], [5]]);
    chanMerge(a, 2, b, 3);
    expect(a.mean[0]).toBe(3);
    expect(a.m2[0]).toBe(10);
  });

  it('equals one pass over all values to rounding, for any grouping', () => {
    const random = seededRandom('moments/merge');
    const data = Array.from({ length: 23 }, () => [random.normal() + 5, 10 * random.uniform()]);
    const all = accumulate(data);
    for (const cut of [1, 4, 11, 22]) {
      const left = accumulate(data.slice(0, cut));
      chanMerge(left, cut, accumulate(data.slice(cut)), data.length - cut);
      for (let i = 0; i < 2; i++) {
        expect(Math.abs(left.mean[i] - all.mean[i])).toBeLessThan(1e-14 * Math.abs(all.mean[i]));
        expect(Math.abs(left.m2[i] - all.m2[i])).toBeLessThan(1e-13 * all.m2[i]);
      }
    }
  });

  it('copies into an empty accumulator and ignores an empty one', () => {
    const b = accumulate([[2], [6]]);
    const into = createRunningMoments(1);
    chanMerge(into, 0, b, 2);
    expect([into.mean[0], into.m2[0]]).toEqual([4, 8]);
    chanMerge(into, 2, createRunningMoments(1), 0);
    expect([into.mean[0], into.m2[0]]).toEqual([4, 8]);
  });

  it('names mismatched arguments', () => {
    expect(() => chanMerge(createRunningMoments(2), 1, createRunningMoments(3), 1)).toThrow(/from: expected 2 slots, got 3/);
    expect(() => welfordAdd(createRunningMoments(2), new Float64Array(1), 1)).toThrow(/values: expected 2 entries/);
    expect(() => createRunningMoments(-1)).toThrow(/size: expected a non-negative integer/);
  });
});

describe('spread and scalar summaries', () => {
  it('uses the caller value below two samples and per-slot counts', () => {
    expect(Array.from(sampleSpread(Float64Array.of(0, 8), Float64Array.of(1, 3), NaN))).toEqual([NaN, 2]);
    expect(Array.from(sampleSpread(Float64Array.of(8), 1, 0))).toEqual([0]);
    expect(Array.from(sampleSpread(Float64Array.of(-1e-18), 5, NaN))).toEqual([0]);
  });

  it('summarises 2, 4, 4, 4, 5, 5, 7, 9: mean 5, s = sqrt(32/7), range [2, 9] (by hand)', () => {
    const s = scalarSummary([2, 4, 4, 4, 5, 5, 7, 9]);
    expect(s).toEqual({ mean: 5, spread: Math.sqrt(32 / 7), min: 2, max: 9 });
    expect(scalarSummary([3])).toEqual({ mean: 3, spread: 0, min: 3, max: 3 });
    expect(Number.isNaN(scalarSummary([]).mean)).toBe(true);
  });
});

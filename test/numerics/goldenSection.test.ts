// goldenSectionMaximum against analytic maxima and a hand count of its evaluations:
// - -(x - 1.3)^2 on [0, 3] peaks at x = 1.3 with value 0;
// - cos x on [-1, 2] peaks at x = 0 with value 1;
// - each step shrinks the interval by g = (sqrt 5 - 1)/2 and costs one evaluation, so
//   k steps take 2 + k calls and leave a width of 3 g^k (hand count of the recurrence).
import { describe, expect, it } from 'vitest';
import { goldenSectionMaximum } from '../../src/numerics/goldenSection.js';

describe('goldenSectionMaximum', () => {
  it('finds the analytic maxima to the requested width', () => {
    const parabola = goldenSectionMaximum((x) => -((x - 1.3) ** 2), 0, 3, { width: 1e-9 });
    expect(Math.abs(parabola.x - 1.3)).toBeLessThan(1e-9);
    expect(parabola.value).toBeLessThanOrEqual(0);
    expect(parabola.value).toBeGreaterThan(-1e-17);
    const cosine = goldenSectionMaximum(Math.cos, -1, 2, { width: 1e-8 });
    expect(Math.abs(cosine.x)).toBeLessThan(1e-8);
    expect(cosine.value).toBeCloseTo(1, 15);
  });

  it('stops after the given steps with 2 + steps evaluations, and on width otherwise', () => {
    let calls = 0;
    const f = (x: number): number => {
      calls++;
      return -Math.abs(x - 2);
    };
    goldenSectionMaximum(f, 0, 3, { steps: 10 });
    expect(calls).toBe(12);
    // width 3 g^k <= 1e-3 first at k = ceil(ln(3e3) / ln(1/g)) = 17 (hand count: 3 g^16 = 1.36e-3, 3 g^17 = 8.4e-4)
    calls = 0;
    goldenSectionMaximum(f, 0, 3, { width: 1e-3 });
    expect(calls).toBe(2 + 17);
  });

  it('returns the larger interior value when the maximum sits at an end', () => {
    const r = goldenSectionMaximum((x) => x, 0, 1, { width: 1e-10 });
    expect(r.x).toBeGreaterThan(1 - 1e-9);
    expect(r.value).toBe(r.x);
  });
});

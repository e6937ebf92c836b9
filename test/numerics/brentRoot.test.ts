// Brent's root finder against roots known in closed form or to full precision:
// - 2^(1/3), root of x^3 - 2 (closed form; Math.cbrt is correctly rounded to < 1 ulp);
// - the Dottie number 0.7390851332151607, root of cos x = x, and the omega constant
//   W(1) = 0.5671432904097838, root of x e^x = 1 (both recalled from memory, and checked
//   here by the defining equation to 1e-15);
// - sqrt(2) from x^2 - 2, a root bracketed from the other side.
// Robustness claims of Brent (Algorithms for Minimization without Derivatives, 1973,
// ch. 4): the bracket is kept, so the method converges for any continuous f (and finds a
// sign change of a discontinuous one), and it never needs many more evaluations than
// bisection; measured here on a step function and on x^9, where interpolation is poor.

import { describe, expect, it } from 'vitest';
import { brentRoot, brentRootAsync } from '../../src/numerics/brentRoot.js';

function solve(f: (x: number) => number, a: number, b: number, xTolerance: number, fTolerance = 0, maxEvaluations = 200) {
  return brentRoot(f, a, b, f(a), f(b), xTolerance, fTolerance, maxEvaluations);
}

describe('brentRoot (synchronous)', () => {
  it('finds 2^(1/3), the Dottie number, W(1) and sqrt 2 to the requested tolerance', () => {
    const cases = [
      { f: (x: number) => x * x * x - 2, a: 0, b: 2, root: Math.cbrt(2) },
      { f: (x: number) => Math.cos(x) - x, a: 0, b: 1, root: 0.7390851332151607 },
      { f: (x: number) => x * Math.exp(x) - 1, a: 0, b: 1, root: 0.5671432904097838 },
      { f: (x: number) => 2 - x * x, a: 3, b: 0, root: Math.SQRT2 },
    ];
    for (const c of cases) {
      const result = solve(c.f, c.a, c.b, 1e-14);
      expect(result.converged).toBe(true);
      // Stopping rule: bracket half-width <= 2 eps |x| + xTolerance.
      expect(Math.abs(result.root - c.root)).toBeLessThan(2 * (1e-14 + 4 * Number.EPSILON * Math.abs(c.root)));
      expect(result.value).toBe(c.f(result.root));
      // the constants recalled from memory satisfy their equations
      expect(Math.abs(c.f(c.root))).toBeLessThan(1e-15);
    }
  });

  it('beats bisection on smooth functions (superlinear convergence)', () => {
    // bisection needs log2(2 / 1e-12) = 41 halvings for this bracket
    const result = solve((x) => Math.cos(x) - x, 0, 2, 1e-12);
    expect(result.evaluations).toBeLessThan(12);
  });

  it('finds the jump of a step function and the flat root of x^9 within a few bisection counts', () => {
    const bisections = Math.ceil(Math.log2(1 / 1e-10));
    const step = solve((x) => (x < 1 / 3 ? -1 : 1), 0, 1, 1e-10);
    expect(Math.abs(step.root - 1 / 3)).toBeLessThan(2e-10 + 1e-15);
    expect(step.evaluations).toBeLessThanOrEqual(2 * bisections);
    const flat = solve((x) => (x - 0.3) ** 9, 0, 1, 1e-10);
    expect(flat.converged).toBe(true);
    // f is extremely flat (1e-99 at 1e-11 from the root) but keeps its sign, so the bracket still closes
    expect(Math.abs(flat.root - 0.3)).toBeLessThan(2e-10 + 1e-15);
    expect(flat.evaluations).toBeLessThanOrEqual(3 * bisections); // measured 91 against 34 halvings
  });

  it('stops on |f| <= fTolerance, returns an end point that is a root, and reports an exhausted budget', () => {
    const byValue = solve((x) => x - 0.25, 0, 1, 0, 1e-3);
    expect(byValue.converged).toBe(true);
    expect(Math.abs(byValue.value)).toBeLessThanOrEqual(1e-3);
    expect(solve((x) => x, 0, 1, 1e-12)).toEqual({ root: 0, value: 0, evaluations: 0, converged: true });
    const starved = solve((x) => Math.cos(x) - x, 0, 1, 0, 0, 2);
    expect(starved.converged).toBe(false);
    expect(starved.evaluations).toBe(2);
  });

  it('refuses an interval that does not bracket a root', () => {
    expect(() => solve((x) => x * x + 1, -1, 1, 1e-12)).toThrow(/do not bracket a root/);
  });
});

describe('brentRootAsync', () => {
  it('takes the same steps as the synchronous driver', async () => {
    const f = (x: number) => x * Math.exp(x) - 1;
    const sync = brentRoot(f, 0, 1, f(0), f(1), 1e-13, 1e-15, 100);
    const async = await brentRootAsync(async (x) => f(x), 0, 1, f(0), f(1), 1e-13, 1e-15, 100);
    expect(async).toEqual(sync);
  });

  it('calls a bracket collapsed on a jump not converged (the function never came near 0)', async () => {
    const f = async (x: number) => (x < 0.5 ? -1 : 1);
    const result = await brentRootAsync(f, 0, 1, -1, 1, 1e-9, 1e-6, 200);
    expect(result.converged).toBe(false);
    expect(Math.abs(result.root - 0.5)).toBeLessThan(3e-9);
  });

  it('stops when abort() says so', async () => {
    let calls = 0;
    const result = await brentRootAsync(
      async (x) => {
        calls++;
        return Math.cos(x) - x;
      },
      0,
      1,
      1,
      Math.cos(1) - 1,
      0,
      0,
      100,
      () => calls >= 3,
    );
    expect(result.converged).toBe(false);
    expect(calls).toBe(3);
  });
});

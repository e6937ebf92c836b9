// Brent's method for a root of a continuous function on a bracketing interval
// (R. P. Brent, Algorithms for Minimization without Derivatives, 1973, chapter 4):
// inverse quadratic interpolation and secant steps, safeguarded by bisection, so it never
// converges more slowly than bisection. Used for mu at fixed atom number, T at fixed
// entropy and the homogeneous order parameter.

export interface RootResult {
  root: number;
  /** f at the returned root */
  value: number;
  evaluations: number;
  converged: boolean;
}

/**
 * Root of f in [a, b], where f(a) and f(b) (passed in, to save evaluations) differ in sign
 * or one is zero. Stops when the bracket is shorter than 2 (xTolerance + 4 eps |x|) or
 * |f| <= fTolerance.
 */
export function brentRoot(
  f: (x: number) => number,
  a: number,
  b: number,
  fa: number,
  fb: number,
  xTolerance: number,
  fTolerance = 0,
  maxEvaluations = 200,
): RootResult {
  if (fa === 0) return { root: a, value: 0, evaluations: 0, converged: true };
  if (fb === 0) return { root: b, value: 0, evaluations: 0, converged: true };
  if (fa > 0 === fb > 0) throw new Error(`brentRoot: f(${a}) = ${fa} and f(${b}) = ${fb} do not bracket a root`);
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  let evaluations = 0;
  for (;;) {
    if (fb > 0 === fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * 2.220446049250313e-16 * Math.abs(b) + xTolerance;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0 || Math.abs(fb) <= fTolerance) {
      return { root: b, value: fb, evaluations, converged: true };
    }
    if (evaluations >= maxEvaluations) return { root: b, value: fb, evaluations, converged: false };
    if (Math.abs(e) < tol || Math.abs(fa) <= Math.abs(fb)) {
      d = m;
      e = m;
    } else {
      let s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qa = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      s = e;
      e = d;
      if (2 * p < 3 * m * q - Math.abs(tol * q) && p < Math.abs(0.5 * s * q)) {
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
    evaluations++;
  }
}

// Brent's method for a root of a continuous function on a bracketing interval
// (R. P. Brent, Algorithms for Minimization without Derivatives, 1973, chapter 4):
// inverse quadratic interpolation and secant steps, safeguarded by bisection, so it never
// converges more slowly than bisection. Used for the homogeneous order parameter, mu at
// fixed atom number and T at fixed entropy. The step logic is shared by a synchronous
// driver (cheap functions) and an asynchronous one (each evaluation is a lattice solve).

export interface RootResult {
  root: number;
  /** f at the returned root */
  value: number;
  evaluations: number;
  converged: boolean;
}

interface BrentState {
  a: number;
  b: number;
  c: number;
  fa: number;
  fb: number;
  fc: number;
  d: number;
  e: number;
}

function startState(a: number, b: number, fa: number, fb: number): BrentState {
  if (fa > 0 === fb > 0 && fa !== 0 && fb !== 0) {
    throw new Error(`brentRoot: f(${a}) = ${fa} and f(${b}) = ${fb} do not bracket a root`);
  }
  return { a, b, c: a, fa, fb, fc: fa, d: b - a, e: b - a };
}

/**
 * Advance the bracket; returns the next abscissa to evaluate, or NaN when converged
 * (then s.b is the root).
 */
function nextAbscissa(s: BrentState, xTolerance: number, fTolerance: number): number {
  if (s.fb > 0 === s.fc > 0) {
    s.c = s.a;
    s.fc = s.fa;
    s.d = s.b - s.a;
    s.e = s.d;
  }
  if (Math.abs(s.fc) < Math.abs(s.fb)) {
    s.a = s.b;
    s.b = s.c;
    s.c = s.a;
    s.fa = s.fb;
    s.fb = s.fc;
    s.fc = s.fa;
  }
  const tol = 2 * 2.220446049250313e-16 * Math.abs(s.b) + xTolerance;
  const m = 0.5 * (s.c - s.b);
  if (Math.abs(m) <= tol || s.fb === 0 || Math.abs(s.fb) <= fTolerance) return NaN;
  if (Math.abs(s.e) < tol || Math.abs(s.fa) <= Math.abs(s.fb)) {
    s.d = m;
    s.e = m;
  } else {
    let r0 = s.fb / s.fa;
    let p: number;
    let q: number;
    if (s.a === s.c) {
      p = 2 * m * r0;
      q = 1 - r0;
    } else {
      const qa = s.fa / s.fc;
      const r = s.fb / s.fc;
      p = r0 * (2 * m * qa * (qa - r) - (s.b - s.a) * (r - 1));
      q = (qa - 1) * (r - 1) * (r0 - 1);
    }
    if (p > 0) q = -q;
    else p = -p;
    r0 = s.e;
    s.e = s.d;
    if (2 * p < 3 * m * q - Math.abs(tol * q) && p < Math.abs(0.5 * r0 * q)) {
      s.d = p / q;
    } else {
      s.d = m;
      s.e = m;
    }
  }
  s.a = s.b;
  s.fa = s.fb;
  return s.b + (Math.abs(s.d) > tol ? s.d : m > 0 ? tol : -tol);
}

/**
 * Root of f in [a, b], where f(a) and f(b) (passed in, to save evaluations) differ in sign
 * or one is zero. Stops when the bracket is shorter than 2 (xTolerance + 2 eps |x|) or
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
  const s = startState(a, b, fa, fb);
  for (let evaluations = 0; ; evaluations++) {
    const x = nextAbscissa(s, xTolerance, fTolerance);
    if (x !== x) return { root: s.b, value: s.fb, evaluations, converged: true };
    if (evaluations >= maxEvaluations) return { root: s.b, value: s.fb, evaluations, converged: false };
    s.b = x;
    s.fb = f(x);
  }
}

/**
 * The same with an asynchronous function; `abort()` ends the search early (not converged).
 * Unlike the synchronous driver, `converged` here means |f| <= fTolerance: a bracket that
 * closes to xTolerance around a jump of f (N(mu) across a Mott plateau, say) is reported
 * as not converged, because the target value was never reached. End points within
 * fTolerance are accepted without an evaluation.
 */
export async function brentRootAsync(
  f: (x: number) => Promise<number>,
  a: number,
  b: number,
  fa: number,
  fb: number,
  xTolerance: number,
  fTolerance: number,
  maxEvaluations: number,
  abort: () => boolean = () => false,
): Promise<RootResult> {
  if (Math.abs(fa) <= fTolerance) return { root: a, value: fa, evaluations: 0, converged: true };
  if (Math.abs(fb) <= fTolerance) return { root: b, value: fb, evaluations: 0, converged: true };
  const s = startState(a, b, fa, fb);
  for (let evaluations = 0; ; evaluations++) {
    const x = nextAbscissa(s, xTolerance, fTolerance);
    if (x !== x) return { root: s.b, value: s.fb, evaluations, converged: Math.abs(s.fb) <= fTolerance || s.fb === 0 };
    if (evaluations >= maxEvaluations || abort()) return { root: s.b, value: s.fb, evaluations, converged: false };
    s.b = x;
    s.fb = await f(x);
  }
}

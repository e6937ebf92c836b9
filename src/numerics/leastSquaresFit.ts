// Weighted non-linear least squares by the Levenberg-Marquardt method (Levenberg,
// Q. Appl. Math. 2, 164 (1944); Marquardt, J. SIAM 11, 431 (1963)), in the form given by
// Bevington & Robinson, Data Reduction and Error Analysis for the Physical Sciences,
// 3rd ed. (2003), chapter 8:
//
//   chi^2(p) = sum_i ((y_i - f_i(p)) / sigma_i)^2,
//   (J^T J + lambda diag(J^T J)) delta = J^T r,   J_ij = (df_i/dp_j) / sigma_i, r_i = (y_i - f_i) / sigma_i,
//
// lambda divided by 10 after a step that lowers chi^2, multiplied by 10 after one that
// does not. The Jacobian is taken numerically (forward differences by default; central
// on request), because the models here are whole solver runs with no derivatives.
// Bounds are enforced by clamping every trial point into [lower, upper].
//
// Uncertainties: covariance C = (J^T J)^-1 at the optimum. `uncertainty` is
// sqrt(C_jj * chi^2_nu), i.e. scaled by the reduced chi-square, so it is right even when
// the sigma_i are known only up to a common factor (Bevington & Robinson eq. 8.30 with
// the sigma_i replaced by their estimate from the scatter); `uncertaintyFromSigma` is
// sqrt(C_jj), right when the sigma_i are the true standard deviations. For correctly
// weighted Gaussian noise chi^2_nu ~ 1 and the two agree.

import { CholeskyDecomposition, Matrix } from 'ml-matrix';

export interface LeastSquaresProblem {
  /** Model values at the data points for parameters p (same length as data). */
  model: (params: Float64Array) => Float64Array;
  data: Float64Array;
  /** Standard deviation per data point, or one value for all (> 0). */
  sigma: Float64Array | number;
  initial: readonly number[] | Float64Array;
  lower?: readonly number[];
  upper?: readonly number[];
}

export interface LeastSquaresOptions {
  /** Maximum number of accepted-or-rejected Levenberg-Marquardt steps; default 100. */
  maxIterations?: number;
  /** Stop when an accepted step lowers chi^2 by less than this fraction; default 1e-10. */
  chiSquareTolerance?: number;
  /** Stop when no parameter moves by more than this fraction of its size; default 1e-10. */
  stepTolerance?: number;
  /** Finite-difference step relative to |p_j| (or absolute where p_j = 0); default 1e-6. Raise it for noisy models. */
  relativeStep?: number;
  /** Central instead of forward differences (twice the model calls, more accurate). */
  centralDifferences?: boolean;
  /** Starting damping; default 1e-3. */
  initialDamping?: number;
}

export interface LeastSquaresFit {
  best: Float64Array;
  /** Standard uncertainties scaled by the reduced chi-square (see header). */
  uncertainty: Float64Array;
  /** Standard uncertainties from the given sigmas alone. */
  uncertaintyFromSigma: Float64Array;
  /** (J^T J)^-1 at the optimum, row-major p x p (NaN if singular). */
  covariance: Float64Array;
  chiSquare: number;
  reducedChiSquare: number;
  degreesOfFreedom: number;
  iterations: number;
  modelEvaluations: number;
  converged: boolean;
  /** Which parameters ended on a bound (their uncertainty is not meaningful). */
  atBound: boolean[];
  /** Why the iteration stopped. */
  message: string;
}

export function leastSquaresFit(problem: LeastSquaresProblem, options: LeastSquaresOptions = {}): LeastSquaresFit {
  const { data } = problem;
  const nData = data.length;
  const nPar = problem.initial.length;
  if (nPar < 1) throw new Error('leastSquaresFit: give at least one initial parameter value');
  const degreesOfFreedom = nData - nPar;
  if (degreesOfFreedom < 1) {
    throw new Error(`leastSquaresFit: ${nData} data points cannot constrain ${nPar} parameters; give more data or fix parameters`);
  }
  if (typeof problem.sigma !== 'number' && problem.sigma.length !== nData) {
    throw new Error(`leastSquaresFit: sigma has ${problem.sigma.length} entries, data has ${nData}`);
  }
  const invSigma = new Float64Array(nData);
  for (let i = 0; i < nData; i++) {
    const s = typeof problem.sigma === 'number' ? problem.sigma : problem.sigma[i];
    if (!(s > 0) || !Number.isFinite(s)) {
      throw new Error(`leastSquaresFit: sigma must be positive and finite, got ${s} at data point ${i}`);
    }
    invSigma[i] = 1 / s;
  }
  const lower = Float64Array.from({ length: nPar }, (_, j) => problem.lower?.[j] ?? -Infinity);
  const upper = Float64Array.from({ length: nPar }, (_, j) => problem.upper?.[j] ?? Infinity);
  for (let j = 0; j < nPar; j++) {
    if (!(lower[j] <= upper[j])) throw new Error(`leastSquaresFit: parameter ${j} has lower bound ${lower[j]} above upper bound ${upper[j]}`);
  }
  const maxIterations = options.maxIterations ?? 100;
  const chiTol = options.chiSquareTolerance ?? 1e-10;
  const stepTol = options.stepTolerance ?? 1e-10;
  const relStep = options.relativeStep ?? 1e-6;
  const central = options.centralDifferences ?? false;

  let evaluations = 0;
  const clamp = (p: Float64Array): Float64Array => {
    for (let j = 0; j < nPar; j++) p[j] = Math.min(upper[j], Math.max(lower[j], p[j]));
    return p;
  };
  const evaluate = (p: Float64Array): Float64Array => {
    evaluations++;
    const f = problem.model(p);
    if (f.length !== nData) throw new Error(`leastSquaresFit: model returned ${f.length} values, data has ${nData}`);
    return f;
  };
  const chiSquareOf = (f: Float64Array): number => {
    let c = 0;
    for (let i = 0; i < nData; i++) {
      const r = (data[i] - f[i]) * invSigma[i];
      c += r * r;
    }
    return Number.isNaN(c) ? Infinity : c;
  };
  /** Weighted Jacobian, row-major nData x nPar. */
  const jacobian = (p: Float64Array, f0: Float64Array): Float64Array => {
    const jac = new Float64Array(nData * nPar);
    const trial = Float64Array.from(p);
    for (let j = 0; j < nPar; j++) {
      let h = relStep * (p[j] !== 0 ? Math.abs(p[j]) : 1);
      if (p[j] + h > upper[j]) h = -h; // step inward at an upper bound
      trial[j] = p[j] + h;
      const fPlus = evaluate(trial);
      if (central && p[j] - h >= lower[j] && p[j] - h <= upper[j]) {
        trial[j] = p[j] - h;
        const fMinus = evaluate(trial);
        for (let i = 0; i < nData; i++) jac[i * nPar + j] = ((fPlus[i] - fMinus[i]) / (2 * h)) * invSigma[i];
      } else {
        for (let i = 0; i < nData; i++) jac[i * nPar + j] = ((fPlus[i] - f0[i]) / h) * invSigma[i];
      }
      trial[j] = p[j];
    }
    return jac;
  };
  const normalEquations = (jac: Float64Array, f: Float64Array) => {
    const alpha = new Float64Array(nPar * nPar);
    const beta = new Float64Array(nPar);
    for (let i = 0; i < nData; i++) {
      const r = (data[i] - f[i]) * invSigma[i];
      const row = i * nPar;
      for (let j = 0; j < nPar; j++) {
        const jj = jac[row + j];
        beta[j] += jj * r;
        for (let k = 0; k <= j; k++) alpha[j * nPar + k] += jj * jac[row + k];
      }
    }
    for (let j = 0; j < nPar; j++) for (let k = 0; k < j; k++) alpha[k * nPar + j] = alpha[j * nPar + k];
    return { alpha, beta };
  };

  let params = clamp(Float64Array.from(problem.initial));
  let f = evaluate(params);
  let chiSquare = chiSquareOf(f);
  if (!Number.isFinite(chiSquare)) {
    throw new Error('leastSquaresFit: the model gives non-finite values at the initial parameters; choose another starting point');
  }
  let lambda = options.initialDamping ?? 1e-3;
  let iterations = 0;
  let converged = false;
  // Small progress must be seen on two accepted steps in a row: one small drop can
  // follow a run of rejected steps (large lambda, short step) far from the minimum.
  let smallSteps = 0;
  let message = 'maximum number of iterations reached';
  let jac = jacobian(params, f);
  let { alpha, beta } = normalEquations(jac, f);

  while (iterations < maxIterations) {
    iterations++;
    const damped = new Matrix(nPar, nPar);
    for (let j = 0; j < nPar; j++) {
      for (let k = 0; k < nPar; k++) damped.set(j, k, alpha[j * nPar + k]);
      // A parameter the model ignores has alpha_jj = 0; a tiny floor keeps the system solvable.
      damped.set(j, j, alpha[j * nPar + j] * (1 + lambda) + 1e-300);
    }
    const cholesky = new CholeskyDecomposition(damped);
    if (!cholesky.isPositiveDefinite()) {
      lambda *= 10;
      if (lambda > 1e16) {
        message = 'normal equations are singular: a parameter does not affect the model';
        break;
      }
      continue;
    }
    const delta = cholesky.solve(Matrix.columnVector(Array.from(beta)));
    const trial = new Float64Array(nPar);
    for (let j = 0; j < nPar; j++) trial[j] = params[j] + delta.get(j, 0);
    clamp(trial);
    const fTrial = evaluate(trial);
    const chiTrial = chiSquareOf(fTrial);
    if (chiTrial < chiSquare) {
      let maxStep = 0;
      for (let j = 0; j < nPar; j++) {
        const size = Math.max(Math.abs(params[j]), Math.abs(trial[j]));
        const move = Math.abs(trial[j] - params[j]);
        maxStep = Math.max(maxStep, size > 0 ? move / size : move);
      }
      const drop = (chiSquare - chiTrial) / Math.max(chiTrial, Number.MIN_VALUE);
      params = trial;
      f = fTrial;
      chiSquare = chiTrial;
      lambda = Math.max(lambda / 10, 1e-15);
      smallSteps = drop < chiTol || maxStep < stepTol ? smallSteps + 1 : 0;
      if (smallSteps >= 2 || chiSquare === 0) {
        converged = true;
        message = drop < chiTol ? 'chi-square change below tolerance' : 'parameter change below tolerance';
        break;
      }
      jac = jacobian(params, f);
      ({ alpha, beta } = normalEquations(jac, f));
    } else {
      lambda *= 10;
      if (lambda > 1e16) {
        // No downhill step even with a tiny, gradient-directed step: we are at the
        // minimum to the precision of the model (or of its numerical Jacobian).
        converged = true;
        message = 'no further decrease of chi-square possible';
        break;
      }
    }
  }

  // Covariance from a fresh Jacobian at the optimum, without damping.
  jac = jacobian(params, f);
  ({ alpha } = normalEquations(jac, f));
  const covariance = new Float64Array(nPar * nPar).fill(NaN);
  const curvature = new Matrix(nPar, nPar);
  for (let j = 0; j < nPar; j++) for (let k = 0; k < nPar; k++) curvature.set(j, k, alpha[j * nPar + k]);
  const cholesky = new CholeskyDecomposition(curvature);
  if (cholesky.isPositiveDefinite()) {
    const inv = cholesky.solve(Matrix.eye(nPar, nPar));
    for (let j = 0; j < nPar; j++) for (let k = 0; k < nPar; k++) covariance[j * nPar + k] = inv.get(j, k);
  }
  const reducedChiSquare = chiSquare / degreesOfFreedom;
  const uncertainty = new Float64Array(nPar);
  const uncertaintyFromSigma = new Float64Array(nPar);
  const atBound: boolean[] = [];
  for (let j = 0; j < nPar; j++) {
    const c = covariance[j * nPar + j];
    uncertaintyFromSigma[j] = Math.sqrt(c);
    uncertainty[j] = Math.sqrt(c * reducedChiSquare);
    atBound.push(params[j] === lower[j] || params[j] === upper[j]);
  }
  return {
    best: params,
    uncertainty,
    uncertaintyFromSigma,
    covariance,
    chiSquare,
    reducedChiSquare,
    degreesOfFreedom,
    iterations,
    modelEvaluations: evaluations,
    converged,
    atBound,
    message,
  };
}

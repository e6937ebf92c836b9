// Conjugate gradients for (H - shift) x = b with H sparse symmetric and H - shift positive
// definite on the Krylov space of b (Hestenes & Stiefel, J. Res. NBS 49, 409 (1952)).
// Used for the resolvent (H_{N+-1} - E_0)^{-1} of the linear response of a Mott cluster.
// A non-positive curvature p^T (H - shift) p <= 0 means the shifted matrix is not positive
// definite there (the Mott sector is not the cluster ground state); it is reported, not
// hidden.

import { multiplySparse, type SparseSymmetricMatrix } from './clusterHamiltonian.js';

export interface ConjugateGradientWorkspace {
  readonly dim: number;
  /** solution on return (initial guess on entry: zero) */
  readonly x: Float64Array;
  readonly r: Float64Array;
  readonly p: Float64Array;
  readonly q: Float64Array;
  converged: boolean;
  /** a direction of non-positive curvature was met */
  indefinite: boolean;
  iterations: number;
  /** final ||r|| / ||b|| */
  relativeResidual: number;
}

export function createConjugateGradientWorkspace(dim: number): ConjugateGradientWorkspace {
  return {
    dim,
    x: new Float64Array(dim),
    r: new Float64Array(dim),
    p: new Float64Array(dim),
    q: new Float64Array(dim),
    converged: false,
    indefinite: false,
    iterations: 0,
    relativeResidual: NaN,
  };
}

/** Solve (H - shift) x = b from x = 0 until ||r|| <= tolerance ||b||. */
export function conjugateGradient(
  ws: ConjugateGradientWorkspace,
  h: SparseSymmetricMatrix,
  shift: number,
  b: Float64Array,
  tolerance: number,
  maxIterations: number,
): void {
  const n = ws.dim;
  const { x, r, p, q } = ws;
  let rr = 0;
  for (let i = 0; i < n; i++) {
    x[i] = 0;
    r[i] = b[i];
    p[i] = b[i];
    rr += b[i] * b[i];
  }
  const bNorm = Math.sqrt(rr);
  ws.indefinite = false;
  ws.iterations = 0;
  if (bNorm === 0) {
    ws.converged = true;
    ws.relativeResidual = 0;
    return;
  }
  const target = tolerance * bNorm;
  let it = 0;
  while (Math.sqrt(rr) > target && it < maxIterations) {
    multiplySparse(h, p, 0, q, 0, shift);
    let pq = 0;
    for (let i = 0; i < n; i++) pq += p[i] * q[i];
    if (!(pq > 0)) {
      ws.indefinite = true;
      break;
    }
    const alpha = rr / pq;
    let rrNew = 0;
    for (let i = 0; i < n; i++) {
      x[i] += alpha * p[i];
      r[i] -= alpha * q[i];
      rrNew += r[i] * r[i];
    }
    const beta = rrNew / rr;
    rr = rrNew;
    for (let i = 0; i < n; i++) p[i] = r[i] + beta * p[i];
    it++;
  }
  ws.iterations = it;
  ws.relativeResidual = Math.sqrt(rr) / bNorm;
  ws.converged = !ws.indefinite && Math.sqrt(rr) <= target;
}

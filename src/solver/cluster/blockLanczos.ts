// Lowest eigenpairs of a large sparse symmetric matrix by the block Lanczos method with
// full reorthogonalisation and thick restarts.
//
// - Block Krylov space span{X0, H X0, H^2 X0, ...} with a block of p vectors (Cullum &
//   Donath, 1974; Golub & Underwood, 1977): a block of p >= the largest degeneracy finds
//   every copy of a degenerate level, which single-vector Lanczos cannot (a symmetric
//   cluster has exactly degenerate excited states; the thermal state needs all of them).
//   p = 1 is the ordinary Lanczos method (Lanczos, J. Res. NBS 45, 255 (1950)).
// - Every new vector is orthogonalised against the whole basis twice (classical
//   "twice is enough" Gram-Schmidt, Giraud, Langou & Rozloznik, Comput. Math. Appl. 50,
//   1069 (2005)), so no spurious copies appear, and the projected matrix T = V^T H V is
//   taken from those projections; its eigenpairs (Rayleigh-Ritz) are the approximations.
// - When the basis is full, the lowest Ritz vectors are kept and the residual block is
//   appended (thick restart, Wu & Simon, SIAM J. Matrix Anal. Appl. 22, 602 (2000));
//   T is then diag(theta) bordered by the couplings to the new block, which the same
//   projections produce.
// - Residual of Ritz pair (theta, y = V s): ||H y - theta y|| = ||R s_last||, with R from
//   the QR factorisation of the residual block and s_last the components of s on the
//   last block, so convergence is checked without forming y.
//
// Deterministic: the random fill of the start block comes from a fixed-seed generator reset
// at every call, so a result depends only on the matrix and the start vectors.

import { multiplySparse, type SparseSymmetricMatrix } from './clusterHamiltonian.js';
import { createSymmetricEigenWorkspace, symmetricEigen, type SymmetricEigenWorkspace } from './symmetricEigen.js';

export interface LanczosWorkspace {
  readonly dim: number;
  readonly blockSize: number;
  /** basis capacity m (vectors) */
  readonly maxBasis: number;
  /** largest number of wanted eigenpairs */
  readonly maxWanted: number;
  readonly basis: Float64Array;
  /** H times the current block, then the residual block */
  readonly product: Float64Array;
  /** projected matrix T, maxBasis x maxBasis, row-major */
  readonly projected: Float64Array;
  readonly eigen: SymmetricEigenWorkspace;
  readonly ritzValues: Float64Array;
  /** residual norms of the Ritz pairs after the last call */
  readonly residuals: Float64Array;
  /** upper-triangular R of the residual block (p x p) */
  readonly upper: Float64Array;
  /** output: eigenvector i in vectors[i * dim .. (i + 1) * dim) */
  readonly vectors: Float64Array;
  /** output: eigenvalues ascending */
  readonly values: Float64Array;
  readonly chunk: Float64Array;
  /** norms of H v for the current block, before projection */
  readonly productNorm: Float64Array;
  /** status of the last call */
  converged: boolean;
  matvecs: number;
  restarts: number;
  /** largest residual norm over the wanted pairs */
  residual: number;
}

const CHUNK = 32;

export function createLanczosWorkspace(dim: number, options: { blockSize?: number; maxBasis?: number; maxWanted?: number } = {}): LanczosWorkspace {
  const blockSize = options.blockSize ?? 1;
  const maxWanted = options.maxWanted ?? 1;
  const maxBasis = options.maxBasis ?? Math.max(30, 2 * maxWanted + 4 * blockSize);
  if (!(maxBasis >= maxWanted + 2 * blockSize)) {
    throw new Error(`Lanczos: basis ${maxBasis} too small for ${maxWanted} wanted pairs with block size ${blockSize}; need >= ${maxWanted + 2 * blockSize}`);
  }
  if (!(dim > maxBasis + blockSize)) {
    throw new Error(`Lanczos: dimension ${dim} must exceed the basis size ${maxBasis} + block ${blockSize}; use the dense solver`);
  }
  return {
    dim,
    blockSize,
    maxBasis,
    maxWanted,
    basis: new Float64Array(maxBasis * dim),
    product: new Float64Array(blockSize * dim),
    projected: new Float64Array(maxBasis * maxBasis),
    eigen: createSymmetricEigenWorkspace(maxBasis),
    ritzValues: new Float64Array(maxBasis),
    residuals: new Float64Array(maxBasis),
    upper: new Float64Array(blockSize * blockSize),
    vectors: new Float64Array(maxWanted * dim),
    values: new Float64Array(maxWanted),
    chunk: new Float64Array(maxBasis * CHUNK),
    productNorm: new Float64Array(blockSize),
    converged: false,
    matvecs: 0,
    restarts: 0,
    residual: NaN,
  };
}

function dot(x: Float64Array, xo: number, y: Float64Array, yo: number, n: number): number {
  let s0 = 0;
  let s1 = 0;
  let i = 0;
  for (; i + 1 < n; i += 2) {
    s0 += x[xo + i] * y[yo + i];
    s1 += x[xo + i + 1] * y[yo + i + 1];
  }
  if (i < n) s0 += x[xo + i] * y[yo + i];
  return s0 + s1;
}

function copy(x: Float64Array, xo: number, y: Float64Array, yo: number, n: number): void {
  for (let i = 0; i < n; i++) y[yo + i] = x[xo + i];
}

function axpy(alpha: number, x: Float64Array, xo: number, y: Float64Array, yo: number, n: number): void {
  for (let i = 0; i < n; i++) y[yo + i] += alpha * x[xo + i];
}

/** Orthogonalise y (at yo) against basis vectors 0..count-1, twice; returns nothing. */
function orthogonalise(ws: LanczosWorkspace, y: Float64Array, yo: number, count: number): void {
  const v = ws.basis;
  const n = ws.dim;
  for (let pass = 0; pass < 2; pass++) {
    for (let a = 0; a < count; a++) {
      const h = dot(v, a * n, y, yo, n);
      axpy(-h, v, a * n, y, yo, n);
    }
  }
}

/** Fill y (at yo) with deterministic pseudo-random numbers in [-1, 1) (xorshift32). */
function randomFill(y: Float64Array, yo: number, n: number, seed: number): number {
  let s = seed | 0 || 0x9e3779b9;
  for (let i = 0; i < n; i++) {
    s ^= s << 13;
    s ^= s >>> 17;
    s ^= s << 5;
    y[yo + i] = (s >>> 0) / 2147483648 - 1;
  }
  return s;
}

/**
 * Lowest `wanted` eigenpairs of (H - shift). `start` holds `startCount` start vectors
 * (dim each; need not be orthonormal); the rest of the first block is random. Stops when
 * every wanted residual is <= tolerance (absolute, energy units) or after maxMatvecs
 * products. Results in ws.values / ws.vectors, status in ws.converged / matvecs / residual.
 */
export function lanczosLowest(
  ws: LanczosWorkspace,
  h: SparseSymmetricMatrix,
  wanted: number,
  start: Float64Array | null,
  startCount: number,
  tolerance: number,
  maxMatvecs: number,
  shift = 0,
): void {
  const n = ws.dim;
  const p = ws.blockSize;
  const m = ws.maxBasis;
  if (h.dim !== n) throw new Error(`Lanczos: matrix dimension ${h.dim} differs from the workspace (${n})`);
  if (wanted > ws.maxWanted || wanted < 1) throw new Error(`Lanczos: wanted ${wanted} pairs, workspace holds 1..${ws.maxWanted}`);
  const V = ws.basis;
  const W = ws.product;
  const T = ws.projected;
  const R = ws.upper;
  const eig = ws.eigen;
  const keepTarget = Math.min(m - p, Math.max(wanted + p, Math.floor(m / 2)));
  let seed = 0x2545f491;

  // First block: start vectors, then random vectors; orthonormalised.
  for (let j = 0; j < p; j++) {
    const o = j * n;
    if (start !== null && j < startCount) copy(start, j * n, V, o, n);
    else seed = randomFill(V, o, n, seed);
    for (let attempt = 0; ; attempt++) {
      orthogonalise(ws, V, o, j);
      const norm = Math.sqrt(dot(V, o, V, o, n));
      if (norm > 1e-8 || attempt > 3) {
        const inv = 1 / norm;
        for (let i = 0; i < n; i++) V[o + i] *= inv;
        break;
      }
      seed = randomFill(V, o, n, seed);
    }
  }
  T.fill(0);
  let basisCount = p;
  let blockStart = 0;
  let matvecs = 0;
  let restarts = 0;
  let converged = false;
  let worst = Infinity;
  let sinceCheck = 0;
  const nnz = h.rowStart[n];

  for (;;) {
    // Expand: products of the newest block, projected on the whole basis.
    for (let j = 0; j < p; j++) {
      const col = blockStart + j;
      multiplySparse(h, V, col * n, W, j * n, shift);
      matvecs++;
      const wo = j * n;
      ws.productNorm[j] = Math.sqrt(dot(W, wo, W, wo, n));
      for (let a = 0; a < basisCount; a++) T[a * m + col] = 0;
      for (let pass = 0; pass < 2; pass++) {
        for (let a = 0; a < basisCount; a++) {
          const c = dot(V, a * n, W, wo, n);
          T[a * m + col] += c;
          axpy(-c, V, a * n, W, wo, n);
        }
      }
    }
    // Symmetrise: the new columns define the new rows (average inside the block).
    for (let j = 0; j < p; j++) {
      const col = blockStart + j;
      for (let a = 0; a < blockStart; a++) T[col * m + a] = T[a * m + col];
    }
    for (let j = 0; j < p; j++) {
      for (let l = j + 1; l < p; l++) {
        const x = blockStart + j;
        const y = blockStart + l;
        const avg = 0.5 * (T[x * m + y] + T[y * m + x]);
        T[x * m + y] = avg;
        T[y * m + x] = avg;
      }
    }
    // QR of the residual block W = Q R (Gram-Schmidt, twice), Q replaces W.
    R.fill(0);
    for (let j = 0; j < p; j++) {
      const wo = j * n;
      const original = ws.productNorm[j];
      for (let pass = 0; pass < 2; pass++) {
        for (let l = 0; l < j; l++) {
          const c = dot(W, l * n, W, wo, n);
          R[l * p + j] += c;
          axpy(-c, W, l * n, W, wo, n);
        }
      }
      const norm = Math.sqrt(dot(W, wo, W, wo, n));
      R[j * p + j] = norm;
      if (norm > 1e-12 * original && norm > 0) {
        const inv = 1 / norm;
        for (let i = 0; i < n; i++) W[wo + i] *= inv;
      } else {
        // Invariant subspace found in this direction: continue with a fresh random one.
        seed = randomFill(W, wo, n, seed);
        orthogonalise(ws, W, wo, basisCount);
        for (let pass = 0; pass < 2; pass++) {
          for (let l = 0; l < j; l++) axpy(-dot(W, l * n, W, wo, n), W, l * n, W, wo, n);
        }
        const fresh = Math.sqrt(dot(W, wo, W, wo, n));
        for (let i = 0; i < n; i++) W[wo + i] /= fresh;
      }
    }
    // Rayleigh-Ritz costs ~10 k^3 flops; do it when the basis is full, when the work of
    // the expansions since the last one matches that cost, or at the end of the budget.
    const k = basisCount;
    const full = basisCount + p > m;
    sinceCheck += p * (2 * nnz + 8 * basisCount * n);
    if (!full && sinceCheck < 10 * k * k * k && matvecs < maxMatvecs) {
      copy(W, 0, V, basisCount * n, p * n);
      blockStart = basisCount;
      basisCount += p;
      continue;
    }
    sinceCheck = 0;
    for (let r = 0; r < k; r++) for (let c = 0; c < k; c++) eig.a[r * k + c] = T[r * m + c];
    symmetricEigen(eig, k);
    for (let i = 0; i < k; i++) ws.ritzValues[i] = eig.values[i];
    // Residual norms ||R s_last|| of the Ritz pairs.
    worst = 0;
    for (let i = 0; i < k; i++) {
      let sum = 0;
      for (let l = 0; l < p; l++) {
        let acc = 0;
        for (let j = l; j < p; j++) acc += R[l * p + j] * eig.a[i * k + blockStart + j];
        sum += acc * acc;
      }
      const res = Math.sqrt(sum);
      ws.residuals[i] = res;
      if (i < wanted && res > worst) worst = res;
    }
    converged = worst <= tolerance;
    if (converged || matvecs >= maxMatvecs) break;

    if (!full) {
      copy(W, 0, V, basisCount * n, p * n);
      blockStart = basisCount;
      basisCount += p;
    } else {
      // Thick restart: keep the lowest Ritz vectors, then append the residual block.
      ritzInPlace(ws, k, keepTarget);
      T.fill(0);
      for (let i = 0; i < keepTarget; i++) T[i * m + i] = ws.ritzValues[i];
      copy(W, 0, V, keepTarget * n, p * n);
      blockStart = keepTarget;
      basisCount = keepTarget + p;
      restarts++;
    }
  }

  // Ritz vectors of the wanted pairs.
  const k = basisCount;
  const out = ws.vectors;
  out.fill(0, 0, wanted * n);
  for (let i = 0; i < wanted; i++) {
    ws.values[i] = ws.ritzValues[i];
    for (let a = 0; a < k; a++) axpy(eig.a[i * k + a], V, a * n, out, i * n, n);
  }
  ws.converged = converged;
  ws.matvecs = matvecs;
  ws.restarts = restarts;
  ws.residual = worst;
}

/** Overwrite basis vectors 0..keep-1 with the Ritz vectors y_i = sum_a S[i][a] v_a (chunked). */
function ritzInPlace(ws: LanczosWorkspace, k: number, keep: number): void {
  const n = ws.dim;
  const V = ws.basis;
  const S = ws.eigen.a;
  const tmp = ws.chunk;
  for (let x0 = 0; x0 < n; x0 += CHUNK) {
    const len = Math.min(CHUNK, n - x0);
    for (let a = 0; a < k; a++) for (let x = 0; x < len; x++) tmp[a * CHUNK + x] = V[a * n + x0 + x];
    for (let i = 0; i < keep; i++) {
      const o = i * n + x0;
      for (let x = 0; x < len; x++) V[o + x] = 0;
      for (let a = 0; a < k; a++) {
        const c = S[i * k + a];
        const t = a * CHUNK;
        for (let x = 0; x < len; x++) V[o + x] += c * tmp[t + x];
      }
    }
  }
}

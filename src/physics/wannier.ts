// Wannier function and hopping of the lowest band of the 1D lattice s E_r sin^2(kx).
//
// Wannier function on a ring of M sites (M quasi-momenta q_j, see bandStructure.ts), in units
// of the lattice spacing a (xi = x / a, w normalised as int |w|^2 dxi = 1):
//     w(xi) = (1/M) sum_j exp(i theta(q_j)) sum_l c_l(q_j) exp(i pi (q_j + 2l) xi).
// With real Bloch coefficients whose sign makes psi_q(0) > 0 (theta = 0) the Berry connection
// i<u_q|d_q u_q> = (1/2) d_q sum_l c_l^2 vanishes and the gauge is smooth and periodic, so by
// Marzari & Vanderbilt, PRB 56, 12847 (1997) (single band in 1D: the gauge-dependent part of the
// spread is (a/2pi) int (A - <A>)^2 dk) this w is the maximally localised Wannier function; it is
// real and even (Kohn, Phys. Rev. 115, 809 (1959)). A non-zero theta(q) is accepted only to
// show, in the tests, that any other smooth gauge spreads w out.
//
// Hopping from the band's Fourier coefficients (Jaksch et al., PRL 81, 3108 (1998)):
//     J_n = -(1/M) sum_j E_0(q_j) cos(n q_j a),   q a = pi q/k,
// i.e. E_0(q) = const - 2 sum_n J_n cos(n q a). The sum over the uniform grid is the trapezoid
// rule for a periodic analytic function, exact up to aliasing of J_{M +- n}.

import { planeWaveHamiltonian, type LatticeBand1d } from './bandStructure.js';
import { tridiagonalEigenvalue, tridiagonalEigenvector } from '../numerics/tridiagonalBisection.js';

/** Hopping J_n to the n-th neighbour (n = 1 nearest, 2 next-nearest) in E_r. */
export function tunnellingEr(band: LatticeBand1d, distanceSites: number): number {
  const M = band.quasiMomentumCount;
  let sum = 0;
  for (let j = 0; j < M; j++) {
    sum += band.energiesEr[j]! * Math.cos(Math.PI * distanceSites * band.quasiMomentaK[j]!);
  }
  return -sum / M;
}

export interface WannierFunction1d {
  depthEr: number;
  /** Grid points per lattice site. */
  pointsPerSite: number;
  /** Grid positions xi = x / a, from -M/2 to M/2 - 1/P. */
  positionsSites: Float64Array;
  /** Real part of w(xi), units a^(-1/2). */
  real: Float64Array;
  /** Imaginary part (zero up to round-off in the maximally localised gauge). */
  imag: Float64Array;
  /** int |w|^2 dxi (1 up to the truncation error). */
  normalisation: number;
  /** <xi>, sites. */
  centreSites: number;
  /** sqrt(<xi^2> - <xi>^2), the rms width, sites. */
  spreadSites: number;
  /** int |w|^4 dxi in units of 1/a (multiply by 1/a to get 1/m). */
  integralW4PerSite: number;
}

export interface WannierOptions {
  /** Points per site; default 4L + 4 (resolves the harmonics of |w|^4 up to the cutoff). */
  pointsPerSite?: number;
  /** Extra gauge phase theta(q) (q in units of k); for tests only. Must be 2-periodic. */
  gaugePhase?: (qOverK: number) => number;
}

/**
 * Wannier function of the lowest band centred on site 0, on the full ring of M sites, and its
 * moments. Evaluated as a product of two small tables, so it costs O(M^2 P) operations.
 */
export function wannierFunction1d(band: LatticeBand1d, options: WannierOptions = {}): WannierFunction1d {
  const M = band.quasiMomentumCount;
  const L = band.planeWaveCutoff;
  const n = 2 * L + 1;
  const P = options.pointsPerSite ?? 4 * L + 4;
  const gaugePhase = options.gaugePhase;
  const coefficients = band.coefficients;
  const quasiMomentaK = band.quasiMomentaK;

  // u_j(p) = sum_l c_l(q_j) exp(2 pi i l p / P) is 1-periodic in xi, so only P sub-site points
  // are needed; C_jp = exp(i theta_j) exp(i pi q_j p/P) u_j(p).
  const cRe = new Float64Array(M * P);
  const cIm = new Float64Array(M * P);
  // exp(2 pi i l p / P) depends only on l p mod P: one table of P roots of unity.
  const rootRe = new Float64Array(P);
  const rootIm = new Float64Array(P);
  for (let k = 0; k < P; k++) {
    rootRe[k] = Math.cos((2 * Math.PI * k) / P);
    rootIm[k] = Math.sin((2 * Math.PI * k) / P);
  }
  for (let j = 0; j < M; j++) {
    const q = quasiMomentaK[j]!;
    const theta = gaugePhase ? gaugePhase(q) : 0;
    for (let p = 0; p < P; p++) {
      let uRe = 0;
      let uIm = 0;
      // k = (i - L) p mod P, advanced by p per step instead of a modulo per term.
      let k = (((-L * p) % P) + P) % P;
      for (let i = 0; i < n; i++) {
        const c = coefficients[j * n + i]!;
        uRe += c * rootRe[k]!;
        uIm += c * rootIm[k]!;
        k += p;
        if (k >= P) k -= P;
      }
      const phi = theta + (Math.PI * q * p) / P;
      const cp = Math.cos(phi);
      const sp = Math.sin(phi);
      cRe[j * P + p] = cp * uRe - sp * uIm;
      cIm[j * P + p] = sp * uRe + cp * uIm;
    }
  }

  const total = M * P;
  const positionsSites = new Float64Array(total);
  const real = new Float64Array(total);
  const imag = new Float64Array(total);
  const aRe = new Float64Array(M);
  const aIm = new Float64Array(M);
  for (let s = 0; s < M; s++) {
    const site = s - M / 2;
    for (let j = 0; j < M; j++) {
      const phi = Math.PI * quasiMomentaK[j]! * site;
      aRe[j] = Math.cos(phi);
      aIm[j] = Math.sin(phi);
    }
    for (let p = 0; p < P; p++) {
      let re = 0;
      let im = 0;
      for (let j = 0; j < M; j++) {
        const br = cRe[j * P + p]!;
        const bi = cIm[j * P + p]!;
        re += aRe[j]! * br - aIm[j]! * bi;
        im += aRe[j]! * bi + aIm[j]! * br;
      }
      const index = s * P + p;
      positionsSites[index] = site + p / P;
      real[index] = re / M;
      imag[index] = im / M;
    }
  }

  // Moments. The ring is periodic, so the plain sum is the trapezoid rule and converges
  // spectrally; positions are measured from site 0, where w is centred.
  const h = 1 / P;
  let norm = 0;
  let first = 0;
  let second = 0;
  let fourth = 0;
  for (let i = 0; i < total; i++) {
    const density = real[i]! * real[i]! + imag[i]! * imag[i]!;
    const xi = positionsSites[i]!;
    norm += density;
    first += xi * density;
    second += xi * xi * density;
    fourth += density * density;
  }
  norm *= h;
  first *= h;
  second *= h;
  fourth *= h;
  const centreSites = first / norm;
  return {
    depthEr: band.depthEr,
    pointsPerSite: P,
    positionsSites,
    real,
    imag,
    normalisation: norm,
    centreSites,
    spreadSites: Math.sqrt(Math.max(0, second / norm - centreSites * centreSites)),
    integralW4PerSite: fourth,
  };
}

// ---------------------------------------------------------------------------------------------
// Momentum-space Wannier function.
//
// With w(xi) = (1/M) sum_j sum_l c_l(q_j) exp(i pi (q_j + 2l) xi) (above), the limit M -> infinity
// turns (1/M) sum_j into (1/2) int_{-1}^{1} dq, so with K = pi (q + 2l) (wavenumber times a):
//     w(xi) = int dK / (2 pi) W(K) exp(i K xi),    W(pi (q + 2l)) = c_l(q),
// i.e. the Fourier transform of the Wannier function at wavenumber k = K / a is the plane-wave
// coefficient of the Bloch state at the quasi-momentum q that K folds back to, in the same smooth
// gauge (sum_l c_l(q) > 0). Normalisation: int |W|^2 dK / (2 pi) = (1/2) int dq sum_l c_l^2 = 1
// (Parseval). W is real and even because w is. In physical units w~(k) = sqrt(a) W(k a), so
// int |w~|^2 dk / (2 pi) = 1 and |w~(k)|^2 is the momentum envelope of a time-of-flight picture.
// Beyond the plane-wave cutoff (|K| > pi (2L + 1)) W is zero, which is below 1e-13 of its peak
// (planeWaveCutoffFor).

/** The Fourier transform W(K) of the lowest-band Wannier function, K = k a. */
export interface MomentumSpaceWannier1d {
  depthEr: number;
  planeWaveCutoff: number;
  /** Largest |K| = |k a| where W can be non-zero: pi (2L + 1). */
  maxWavenumberTimesSpacing: number;
  /** W(K) in units of sqrt(a) (real, even); K = k a. */
  amplitude(wavenumberTimesSpacing: number): number;
  /**
   * All 2L + 1 values W(pi (q + 2l)), l = -L .. L, at one quasi-momentum q in [-1, 1] (units
   * of k), written to out[l + L]: one diagonalisation gives a whole comb of wavenumbers.
   */
  comb(qOverK: number, out: Float64Array): void;
}

/**
 * W(K) from a fresh diagonalisation at the quasi-momentum q that K folds back to (one
 * tridiagonal eigenvector of size 2L + 1 per call; scratch arrays are allocated once).
 */
export function momentumSpaceWannier1d(band: Pick<LatticeBand1d, 'depthEr' | 'planeWaveCutoff'>): MomentumSpaceWannier1d {
  const depthEr = band.depthEr;
  const L = band.planeWaveCutoff;
  const n = 2 * L + 1;
  const diag = new Float64Array(n);
  const off = new Float64Array(n - 1);
  const vector = new Float64Array(n);
  const maxK = Math.PI * n;
  const comb = (q: number, out: Float64Array): void => {
    if (!(q >= -1 && q <= 1)) throw new RangeError(`momentumSpaceWannier1d: quasi-momentum must lie in [-1, 1], got ${q}`);
    if (out.length < n) throw new RangeError(`momentumSpaceWannier1d: output needs ${n} entries, got ${out.length}`);
    planeWaveHamiltonian(depthEr, q, L, diag, off);
    tridiagonalEigenvector(diag, off, tridiagonalEigenvalue(diag, off, 0), vector);
    out.set(vector);
  };
  const amplitude = (K: number): number => {
    if (!Number.isFinite(K)) throw new RangeError(`momentumSpaceWannier1d: wavenumber must be finite, got ${K}`);
    const u = K / Math.PI; // = q + 2 l
    // q in [-1, 1): the zone edge belongs to q = -1 (as in latticeBand1d).
    let q = u - 2 * Math.floor((u + 1) / 2);
    if (q >= 1) q -= 2;
    const l = Math.round((u - q) / 2);
    if (l < -L || l > L) return 0;
    planeWaveHamiltonian(depthEr, q, L, diag, off);
    const e0 = tridiagonalEigenvalue(diag, off, 0);
    tridiagonalEigenvector(diag, off, e0, vector); // sign: sum_l c_l >= 0, the gauge of latticeBand1d
    return vector[l + L]!;
  };
  return { depthEr, planeWaveCutoff: L, maxWavenumberTimesSpacing: maxK, amplitude, comb };
}

// Band structure of the 1D optical lattice V(x) = s E_r sin^2(k x) by plane-wave
// diagonalisation (Bloch's theorem; e.g. Ashcroft & Mermin ch. 9, the central equation).
//
// Dimensionless units: positions kx, quasi-momenta q in units of k (Brillouin zone -1 <= q < 1,
// lattice spacing a = pi / k), energies in E_r = hbar^2 k^2 / (2m). With
// sin^2(kx) = (1 - cos 2kx) / 2 the Hamiltonian in the basis exp(i (q + 2 l) k x), |l| <= L, is
// the real symmetric tridiagonal matrix
//     H_ll = (q + 2 l)^2 + s/2,     H_l,l+1 = H_l+1,l = -s/4,
// whose two lowest eigenpairs are found by Sturm bisection and inverse iteration
// (numerics/tridiagonalBisection.ts; cross-checked against ml-matrix's dense EigenvalueDecomposition in the
// tests).
// Mapping to Mathieu's equation y'' + (a - 2 Q cos 2v) y = 0 (DLMF 28.2.1): E = s/2 + a with
// Q = -s/4, so the lowest band runs from s/2 + a_0(s/4) at q = 0 to s/2 + b_1(s/4) at the zone
// edge (a_0(-Q) = a_0(Q) and a_1(-Q) = b_1(Q), DLMF sec. 28.2(vi)). The tests check exactly this.

import { requireFiniteInRange } from './parameterError.js';
import { tridiagonalEigenvalue, tridiagonalEigenvector } from '../numerics/tridiagonalBisection.js';

/**
 * Largest depth accepted by the band-structure routines (the plane-wave cutoff is verified up
 * to here). Hubbard parameters stop at 200 E_r, where the hopping nears round-off (latticeAxis.ts).
 */
export const maxDepthEr = 400;

/**
 * Plane-wave cutoff L for depth s. The coefficients of the low bands fall off like
 * prod_l (s / 16 l^2) once 4 l^2 exceeds the band energy, so L must grow like sqrt(s);
 * L = 10 + sqrt(s)/2 keeps the truncation error of the two lowest bands below 1e-13 E_r up to
 * maxDepthEr (checked in test/physics/bands.test.ts against L + 8).
 */
export function planeWaveCutoffFor(depthEr: number): number {
  return 10 + Math.ceil(Math.sqrt(depthEr) / 2);
}

/**
 * Number of quasi-momenta for the Wannier construction. The Wannier function is built on a
 * ring of M sites, so M must exceed the decay length of w (which grows as the gap closes in
 * shallow lattices) many times over; M also sets the aliasing error of the hopping sums,
 * about |J_(M-1)|, which falls off like the Wannier tails.
 */
export function quasiMomentumCountFor(depthEr: number): number {
  // Measured (test/physics/bands.test.ts): with these counts J, int |w|^4 and the Wannier
  // spread agree with M = 512 to better than 1e-10 relative for depths >= 0.5 E_r.
  if (depthEr >= 5) return 16;
  if (depthEr >= 3) return 32;
  if (depthEr >= 1.2) return 64;
  if (depthEr >= 0.6) return 128;
  return 256;
}

/** Fills the diagonal and off-diagonal of H(q); the basis index i stands for l = i - L. */
export function planeWaveHamiltonian(
  depthEr: number,
  qOverK: number,
  planeWaveCutoff: number,
  diag: Float64Array = new Float64Array(2 * planeWaveCutoff + 1),
  off: Float64Array = new Float64Array(2 * planeWaveCutoff),
): { diag: Float64Array; off: Float64Array } {
  const n = 2 * planeWaveCutoff + 1;
  for (let i = 0; i < n; i++) {
    const K = qOverK + 2 * (i - planeWaveCutoff);
    diag[i] = K * K + depthEr / 2;
    if (i + 1 < n) off[i] = -depthEr / 4;
  }
  return { diag, off };
}

function checkDepth(depthEr: number, parameter: string): void {
  requireFiniteInRange(parameter, depthEr, 0, maxDepthEr, 'recoil energies (E_r)');
}

/**
 * The lowest bandCount Bloch energies (in E_r, ascending) at quasi-momentum qOverK.
 * E(q) is even and periodic with period 2 in q.
 */
export function blochEnergiesEr(
  depthEr: number,
  qOverK: number,
  bandCount = 2,
  planeWaveCutoff = planeWaveCutoffFor(depthEr),
): Float64Array {
  checkDepth(depthEr, 'depthEr');
  const n = 2 * planeWaveCutoff + 1;
  if (bandCount < 1 || bandCount > n) {
    throw new RangeError(`bandCount must be between 1 and ${n}, got ${bandCount}`);
  }
  const { diag, off } = planeWaveHamiltonian(depthEr, qOverK, planeWaveCutoff);
  const out = new Float64Array(bandCount);
  for (let b = 0; b < bandCount; b++) out[b] = tridiagonalEigenvalue(diag, off, b);
  return out;
}

/** The lowest band on a uniform quasi-momentum grid, with gauge-fixed Bloch coefficients. */
export interface LatticeBand1d {
  depthEr: number;
  /** Plane-wave cutoff L: basis exp(i (q + 2 l) k x), |l| <= L. */
  planeWaveCutoff: number;
  /** M, even. */
  quasiMomentumCount: number;
  /** q_j = -1 + 2 j / M in units of k (contains 0 and the zone edge -1). */
  quasiMomentaK: Float64Array;
  /** Lowest band E_0(q_j) in E_r. */
  energiesEr: Float64Array;
  /** First excited band E_1(q_j) in E_r. */
  excitedEnergiesEr: Float64Array;
  /**
   * Real Bloch coefficients c_l(q_j) of the lowest band at index j * (2L + 1) + (l + L),
   * normalised (sum_l c_l^2 = 1), sign chosen so that the Bloch function at the potential
   * minimum, psi_q(0) ~ sum_l c_l, is positive. This gauge is smooth and periodic in q and
   * gives the real, even, maximally localised Wannier function (see wannier.ts).
   */
  coefficients: Float64Array;
}

export interface LatticeBandOptions {
  quasiMomentumCount?: number;
  planeWaveCutoff?: number;
}

/**
 * Diagonalises the lattice Hamiltonian on the quasi-momentum grid q_j = -1 + 2j/M. Only
 * 0 <= q <= 1 is diagonalised; the other half follows from inversion symmetry,
 * E(-q) = E(q) and c_l(-q) = c_{-l}(q).
 */
export function latticeBand1d(depthEr: number, options: LatticeBandOptions = {}): LatticeBand1d {
  checkDepth(depthEr, 'depthEr');
  const M = options.quasiMomentumCount ?? quasiMomentumCountFor(depthEr);
  if (!Number.isInteger(M) || M < 4 || M % 2 !== 0) {
    throw new RangeError(`quasiMomentumCount must be an even integer >= 4, got ${M}`);
  }
  const L = options.planeWaveCutoff ?? planeWaveCutoffFor(depthEr);
  const n = 2 * L + 1;
  const quasiMomentaK = new Float64Array(M);
  const energiesEr = new Float64Array(M);
  const excitedEnergiesEr = new Float64Array(M);
  const coefficients = new Float64Array(M * n);
  const diag = new Float64Array(n);
  const off = new Float64Array(n - 1);
  const vector = new Float64Array(n);
  const half = M / 2;
  for (let j = 0; j < M; j++) quasiMomentaK[j] = -1 + (2 * j) / M;
  // j = half .. M-1 covers 0 <= q < 1; j = M is q = +1, stored as the zone edge q = -1 (j = 0).
  for (let j = half; j <= M; j++) {
    const q = -1 + (2 * j) / M;
    planeWaveHamiltonian(depthEr, q, L, diag, off);
    const e0 = tridiagonalEigenvalue(diag, off, 0);
    const e1 = tridiagonalEigenvalue(diag, off, 1);
    // Sign convention of tridiagonalEigenvector: sum_l c_l >= 0, i.e. psi_q(0) >= 0.
    tridiagonalEigenvector(diag, off, e0, vector);
    const mirror = M - j; // index of -q
    if (j < M) {
      energiesEr[j] = e0;
      excitedEnergiesEr[j] = e1;
      for (let i = 0; i < n; i++) coefficients[j * n + i] = vector[i]!;
    }
    if (mirror !== j && mirror >= 0 && mirror < M) {
      energiesEr[mirror] = e0;
      excitedEnergiesEr[mirror] = e1;
      // c_l(-q) = c_{-l}(q): reverse the order of l.
      for (let i = 0; i < n; i++) coefficients[mirror * n + i] = vector[n - 1 - i]!;
    }
  }
  return {
    depthEr,
    planeWaveCutoff: L,
    quasiMomentumCount: M,
    quasiMomentaK,
    energiesEr,
    excitedEnergiesEr,
    coefficients,
  };
}

/** Edges of the two lowest bands, in E_r. */
export interface BandEdges {
  /** E_0(q = 0): bottom of the lowest band. */
  lowestBottomEr: number;
  /** E_0(zone edge): top of the lowest band. */
  lowestTopEr: number;
  /** E_1(zone edge): bottom of the first excited band. */
  excitedBottomEr: number;
  /** E_1(q = 0): top of the first excited band. */
  excitedTopEr: number;
  /** Width of the lowest band (= 4J in the tight-binding limit). */
  lowestWidthEr: number;
  /** Gap between the lowest and first excited band, E_1(edge) - E_0(edge). */
  bandGapEr: number;
  /** Mean energy of the first excited band minus that of the lowest (-> hbar omega deep down). */
  meanBandSpacingEr?: number;
}

/** Band edges from two diagonalisations (q = 0 and q = 1). */
export function bandEdgesEr(depthEr: number, planeWaveCutoff = planeWaveCutoffFor(depthEr)): BandEdges {
  const centre = blochEnergiesEr(depthEr, 0, 2, planeWaveCutoff);
  const edge = blochEnergiesEr(depthEr, 1, 2, planeWaveCutoff);
  return {
    lowestBottomEr: centre[0]!,
    lowestTopEr: edge[0]!,
    excitedBottomEr: edge[1]!,
    excitedTopEr: centre[1]!,
    lowestWidthEr: edge[0]! - centre[0]!,
    bandGapEr: edge[1]! - edge[0]!,
  };
}

/** Band edges and mean band spacing read off an already computed band grid. */
export function bandEdgesFromBand(band: LatticeBand1d): BandEdges {
  const M = band.quasiMomentumCount;
  const centre = M / 2;
  let mean0 = 0;
  let mean1 = 0;
  for (let j = 0; j < M; j++) {
    mean0 += band.energiesEr[j]!;
    mean1 += band.excitedEnergiesEr[j]!;
  }
  return {
    lowestBottomEr: band.energiesEr[centre]!,
    lowestTopEr: band.energiesEr[0]!,
    excitedBottomEr: band.excitedEnergiesEr[0]!,
    excitedTopEr: band.excitedEnergiesEr[centre]!,
    lowestWidthEr: band.energiesEr[0]! - band.energiesEr[centre]!,
    bandGapEr: band.excitedEnergiesEr[0]! - band.energiesEr[0]!,
    meanBandSpacingEr: (mean1 - mean0) / M,
  };
}

/**
 * d<E_0>/ds: derivative of the band-averaged lowest-band energy with respect to the depth, by
 * the Hellmann-Feynman theorem with dH/ds = diag(1/2) + offdiag(-1/4):
 * dE_j/ds = 1/2 - (1/2) sum_l c_l(q_j) c_(l+1)(q_j). It is the mean of sin^2(kx) over the
 * band; deep down it tends to the harmonic-oscillator value 1/(2 sqrt s). Used for the
 * zero-point correction of the envelope confinement (beamEnvelope.ts).
 */
export function meanBandDepthDerivative(band: LatticeBand1d): number {
  const M = band.quasiMomentumCount;
  const n = 2 * band.planeWaveCutoff + 1;
  let sum = 0;
  for (let j = 0; j < M; j++) {
    let overlap = 0;
    for (let i = 0; i + 1 < n; i++) overlap += band.coefficients[j * n + i]! * band.coefficients[j * n + i + 1]!;
    sum += 0.5 - 0.5 * overlap;
  }
  return sum / M;
}

/** Band-averaged lowest-band energy (1/M) sum_j E_0(q_j), E_r. */
export function meanBandEnergyEr(band: LatticeBand1d): number {
  let sum = 0;
  for (let j = 0; j < band.quasiMomentumCount; j++) sum += band.energiesEr[j]!;
  return sum / band.quasiMomentumCount;
}

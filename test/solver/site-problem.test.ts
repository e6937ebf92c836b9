// Checks of the single-site Gutzwiller problem against a general-purpose reference library
// (ml-matrix's symmetric eigendecomposition) and against closed-form atomic-limit sums.
import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import {
  createSiteObservables,
  createSiteWorkspace,
  diagonalizeSite,
  GroundParameters,
  solveGround,
  solveSite,
  solveSiteGround,
  solveSiteThermal,
  weylLowerBound,
} from '../../src/solver/site/index.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

function referenceMatrix(nmax: number, U: number, mu: number, psi: number): Matrix {
  const n = nmax + 1;
  const m = Matrix.zeros(n, n);
  for (let k = 0; k < n; k++) {
    m.set(k, k, 0.5 * U * k * (k - 1) - mu * k);
    if (k < n - 1) {
      m.set(k, k + 1, -psi * Math.sqrt(k + 1));
      m.set(k + 1, k, -psi * Math.sqrt(k + 1));
    }
  }
  return m;
}

describe('site problem: lowest eigenpair against ml-matrix', () => {
  // Reference: ml-matrix EigenvalueDecomposition (JAMA port, Householder + QL) on the
  // same dense symmetric matrix. Tolerance 1e-12 relative in energy, 1e-10 in vector.
  const rng = seededRandom('site-problem-test');
  for (let trial = 0; trial < 40; trial++) {
    const nmax = 2 + Math.floor(rng.uniform() * 9);
    const U = 0.2 + rng.uniform() * 3;
    const mu = -1 + rng.uniform() * U * (nmax - 0.5);
    const psi = trial % 7 === 0 ? 1e-9 * rng.uniform() : rng.uniform() * 2 * U;
    it(`random tridiagonal ${trial} (nmax=${nmax})`, () => {
      const ws = createSiteWorkspace(nmax);
      const phi = solveSiteGround(ws, U, mu, psi, NaN);
      const eig = new EigenvalueDecomposition(referenceMatrix(nmax, U, mu, psi), { assumeSymmetric: true });
      const values = eig.realEigenvalues;
      const order = values.map((v, i) => [v, i] as const).sort((a, b) => a[0] - b[0]);
      const lambdaRef = order[0][0];
      const scale = Math.abs(lambdaRef) + U + psi;
      expect(Math.abs(ws.eigenvalues[0] - lambdaRef)).toBeLessThan(1e-12 * scale);
      const vec = eig.eigenvectorMatrix.getColumn(order[0][1]);
      const sign = Math.sign(vec.reduce((a, b) => a + b, 0));
      let phiRef = 0;
      for (let k = 0; k < nmax; k++) phiRef += Math.sqrt(k + 1) * vec[k] * vec[k + 1];
      for (let k = 0; k <= nmax; k++) expect(Math.abs(ws.amplitudes[k] - sign * vec[k])).toBeLessThan(1e-10);
      expect(Math.abs(phi - phiRef)).toBeLessThan(1e-10);
    });
  }

  it('a Weyl warm start gives the same eigenpair as the Gershgorin start', () => {
    const ws = createSiteWorkspace(6);
    solveSiteGround(ws, 1, 1.4, 0.3, NaN);
    const previous = ws.eigenvalues[0];
    const phiCold = solveSiteGround(ws, 1, 1.41, 0.31, NaN);
    const cold = ws.eigenvalues[0];
    const bound = weylLowerBound(previous, 0.31, 0.3, 1.41, 1.4, 6);
    expect(bound).toBeLessThan(cold);
    const phiWarm = solveSiteGround(ws, 1, 1.41, 0.31, bound);
    expect(Math.abs(ws.eigenvalues[0] - cold)).toBeLessThan(1e-14);
    expect(Math.abs(phiWarm - phiCold)).toBeLessThan(1e-13);
  });
});

describe('site problem: full spectrum against ml-matrix', () => {
  it('all eigenvalues agree to 1e-12 (tql2 vs ml-matrix)', () => {
    const ws = createSiteWorkspace(7);
    diagonalizeSite(ws, 1.3, 2.2, 0.45);
    const ref = new EigenvalueDecomposition(referenceMatrix(7, 1.3, 2.2, 0.45), { assumeSymmetric: true });
    const values = [...ref.realEigenvalues].sort((a, b) => a - b);
    for (let k = 0; k < 8; k++) expect(Math.abs(ws.eigenvalues[k] - values[k])).toBeLessThan(1e-12);
    // orthonormal eigenvectors
    for (let a = 0; a < 8; a++) {
      for (let b = 0; b < 8; b++) {
        let dot = 0;
        for (let i = 0; i < 8; i++) dot += ws.eigenvectors[a * 8 + i] * ws.eigenvectors[b * 8 + i];
        expect(Math.abs(dot - (a === b ? 1 : 0))).toBeLessThan(1e-12);
      }
    }
  });

  it('thermal average at low T equals the ground state', () => {
    const ws = createSiteWorkspace(6);
    const cold = createSiteObservables();
    const warm = createSiteObservables();
    solveSite(ws, 1, 1.3, 0.2, 0, cold);
    solveSite(ws, 1, 1.3, 0.2, 1e-4, warm);
    expect(Math.abs(cold.phi - warm.phi)).toBeLessThan(1e-10);
    expect(Math.abs(cold.density - warm.density)).toBeLessThan(1e-10);
    expect(warm.entropy).toBeLessThan(1e-100 + 1e-200);
  });
});

describe('site problem: atomic limit (psi = 0) in closed form', () => {
  // Grand-canonical single-site sums: Z = sum_n exp(-beta (U n(n-1)/2 - mu n)),
  // <n> = sum n w_n / Z, S = ln Z + beta <E - mu n> (standard statistical mechanics).
  it('density, variance and entropy equal the closed-form sums', () => {
    const ws = createSiteWorkspace(12);
    const out = createSiteObservables();
    for (const [mu, T] of [[0.5, 0.1], [1.7, 0.3], [-0.2, 0.05], [2.5, 1.0]]) {
      solveSite(ws, 1, mu, 0, T, out);
      let Z = 0, n1 = 0, n2 = 0, e = 0;
      for (let n = 0; n <= 12; n++) {
        const en = 0.5 * n * (n - 1) - mu * n;
        const w = Math.exp(-en / T);
        Z += w; n1 += n * w; n2 += n * n * w; e += en * w;
      }
      n1 /= Z; n2 /= Z; e /= Z;
      expect(out.density).toBeCloseTo(n1, 12);
      expect(out.densitySq - out.density ** 2).toBeCloseTo(n2 - n1 * n1, 11);
      expect(out.entropy).toBeCloseTo(Math.log(Z) + e / T, 11);
      expect(out.energy).toBeCloseTo(-T * Math.log(Z), 11);
      expect(out.phi).toBe(0);
    }
  });
});

describe('site problem: thermal order parameter by Hellmann-Feynman', () => {
  // The fast path (eigenvalues only, <j|b|j> = -(1/2) d lambda_j/d psi) against the full
  // eigendecomposition Tr(rho b) (tql2 with eigenvectors).
  it('agrees with the eigenvector sum to 1e-11 over random parameters', () => {
    const rng = seededRandom('thermal-hf');
    const ws = createSiteWorkspace(7);
    const full = createSiteObservables();
    for (let k = 0; k < 300; k++) {
      const mu = -0.5 + 4 * rng.uniform();
      const psi = k % 10 === 0 ? 1e-6 * rng.uniform() : rng.uniform();
      const T = 0.02 + 2 * rng.uniform();
      const fast = solveSiteThermal(ws, 1, mu, psi, T, null);
      solveSite(ws, 1, mu, psi, T, full);
      expect(Math.abs(fast - full.phi)).toBeLessThan(1e-11 * (1 + Math.abs(full.phi)));
    }
  });
});

describe('site problem: start from an estimate instead of a bound', () => {
  // Any estimate must give the ground state of the reference diagonalisation: close ones
  // through one Laguerre step, bad ones (near an excited state) through the sign check of
  // the eigenvector (Perron-Frobenius) and the fall-back to the lower bound.
  it('returns the ground state for estimates near every eigenvalue', () => {
    const ws = createSiteWorkspace(6);
    for (const [mu, psi] of [[1.4, 0.3], [0.5, 0.05], [2.7, 0.6], [0.2, 1e-7]]) {
      const ref = new EigenvalueDecomposition(referenceMatrix(6, 1, mu, psi), { assumeSymmetric: true });
      const values = [...ref.realEigenvalues].sort((a, b) => a - b);
      const phiRef = solveSiteGround(ws, 1, mu, psi, NaN);
      for (const v of values) {
        for (const offset of [0, 1e-9, -1e-3, 2e-2]) {
          const phi = solveSiteGround(ws, 1, mu, psi, NaN, v + offset);
          expect(Math.abs(ws.eigenvalues[0] - values[0])).toBeLessThan(1e-12 * (1 + Math.abs(values[0])));
          expect(Math.abs(phi - phiRef)).toBeLessThan(1e-12);
        }
      }
    }
  });
});

describe('site problem: the argument record of the sweep entry point', () => {
  // Reference: ml-matrix's symmetric eigendecomposition of the matrix with -psi; the unitary
  // (-1)^n maps H(psi) onto H(-psi), so <b> changes sign and the energy does not.
  it('negative psi gives -phi and leaves the record as it was', () => {
    const ws = createSiteWorkspace(6);
    const p = new GroundParameters();
    p.interactionU = 1;
    p.muLocal = 1.3;
    p.psi = -0.25;
    p.lowerBound = NaN;
    p.estimate = NaN;
    solveGround(ws, p);
    expect(p.psi).toBe(-0.25);
    const eig = new EigenvalueDecomposition(referenceMatrix(6, 1, 1.3, -0.25), { assumeSymmetric: true });
    const values = eig.realEigenvalues;
    const k = values.indexOf(Math.min(...values));
    const vec = eig.eigenvectorMatrix.getColumn(k);
    let phiRef = 0;
    for (let n = 0; n < 6; n++) phiRef += Math.sqrt(n + 1) * vec[n] * vec[n + 1];
    expect(ws.phi).toBeLessThan(0);
    expect(Math.abs(ws.phi - phiRef)).toBeLessThan(1e-12);
    expect(Math.abs(ws.eigenvalues[0] - values[k])).toBeLessThan(1e-12);
  });
});

// The WebAssembly kernel's four-site path (assembly/groundQuad.ts: two f64x2 pairs of one
// colour interleaved) on rigged warm starts, against the JavaScript reference kernel (the
// oracle: the same doubles) and against exact diagonalisation of each site problem with
// ml-matrix (the ground state must be found whatever the warm start):
// - every subset of the four lanes of a quad gets an estimate that lands on the first
//   excited state (so those lanes, and only those, are redone from their Weyl bound);
// - quads with one cold lane (no stored energy) go to the pair code;
// - disorder in the site potential gives lanes with different twist indices.
import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import type { LatticeModel } from '../../src/lattice/latticeModel.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { createJsKernel, createWasmKernel } from '../../src/solver/kernel/sweepKernels.js';
import { createSolverState, type SolverState } from '../../src/solver/solverState.js';
import { countingWasmKernel } from '../helpers/countingKernel.js';

const bytes = (a: Float64Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

interface SiteSpectrum {
  /** lowest two eigenvalues */
  e0: number;
  e1: number;
  /** phi = <b> of the ground state */
  phi: number;
  /** candidates for the twist index the adjugate picks at e0 and at e1 (adj(H - lambda)_kk
   * is proportional to x_k^2): every k with x_k^2 at least half the largest, so that a near
   * tie, which rounding decides, counts as either */
  twist0: number[];
  twist1: number[];
}

/** Site Hamiltonian U n(n-1)/2 - muLocal n - psi (b + b^+), diagonalised by ml-matrix. */
function siteSpectrum(nmax: number, u: number, muLocal: number, psi: number): SiteSpectrum {
  const n = nmax + 1;
  const h = Matrix.zeros(n, n);
  for (let k = 0; k < n; k++) {
    h.set(k, k, 0.5 * u * k * (k - 1) - muLocal * k);
    if (k + 1 < n) {
      h.set(k, k + 1, -psi * Math.sqrt(k + 1));
      h.set(k + 1, k, -psi * Math.sqrt(k + 1));
    }
  }
  const eig = new EigenvalueDecomposition(h, { assumeSymmetric: true });
  const order = eig.realEigenvalues.map((v, i) => [v, i] as const).sort((a, b) => a[0] - b[0]);
  const v0 = eig.eigenvectorMatrix.getColumn(order[0][1]);
  const v1 = eig.eigenvectorMatrix.getColumn(order[1][1]);
  let phi = 0; // sum_k sqrt(k + 1) x_k x_{k+1}, the same for -x
  for (let k = 0; k < nmax; k++) phi += Math.sqrt(k + 1) * v0[k] * v0[k + 1];
  const candidates = (v: number[]): number[] => {
    const top = Math.max(...v.map((x) => x * x));
    return v.flatMap((x, k) => (x * x >= 0.5 * top ? [k] : []));
  };
  return { e0: order[0][0], e1: order[1][0], phi, twist0: candidates(v0), twist1: candidates(v1) };
}

describe('WebAssembly four-site kernel on rigged warm starts', () => {
  // 3D open lattice [4, 6, 16]: 24 rows, 8 sites of colour 0 per row = 2 quads per row.
  const geometry = createLatticeGeometry([4, 6, 16], [false, false, false]);
  const [n0, n1, n2] = geometry.inner;
  const J = 0.03;
  const U = 1;
  const nmax = 6;
  const mu = 1.3;
  const rng = seededRandom('kernel-quad');
  // Disorder of +-0.4 U moves the dominant occupation (and the twist) between 1 and 2.
  const model: LatticeModel = {
    geometry,
    nmax,
    eps: Float64Array.from({ length: geometry.siteCount }, () => 0.8 * (rng.uniform() - 0.5)),
    interactionU: U,
    hopping: [J, J, J],
  };
  const phi0 = Float64Array.from({ length: geometry.siteCount }, () => 0.2 + 0.4 * rng.uniform());
  // psi_i = J sum_nn phi_j (open edges), written out here independently of the kernels.
  const at = (a: number, b: number, c: number): number => (a * n1 + b) * n2 + c;
  const meanField = (phi: Float64Array, a: number, b: number, c: number): number => {
    let s = 0;
    if (a > 0) s += phi[at(a - 1, b, c)];
    if (a + 1 < n0) s += phi[at(a + 1, b, c)];
    if (b > 0) s += phi[at(a, b - 1, c)];
    if (b + 1 < n1) s += phi[at(a, b + 1, c)];
    if (c > 0) s += phi[at(a, b, c - 1)];
    if (c + 1 < n2) s += phi[at(a, b, c + 1)];
    return J * s;
  };

  // Rig colour 0: quad number q of the lattice gets lane mask q % 16 (lanes with their
  // estimate on the excited state); every seventh quad instead has a cold first lane.
  const psiChange = 0.02;
  const rig = (state: SolverState): { expectedFallbacks: number; quads: number; surelySplit: number; surelyShared: number } => {
    const f = state.fields;
    let quad = 0;
    let expectedFallbacks = 0;
    let quads = 0;
    let surelySplit = 0;
    let surelyShared = 0;
    for (let a = 0; a < n0; a++) {
      for (let b = 0; b < n1; b++) {
        for (let c0 = (a + b) & 1; c0 + 6 < n2; c0 += 8, quad++) {
          const mask = quad % 16;
          const coldLane = quad % 7 === 3;
          const twists: number[][] = [];
          for (let lane = 0; lane < 4; lane++) {
            const i = at(a, b, c0 + 2 * lane);
            const psi = meanField(f.phi, a, b, c0 + 2 * lane);
            const previousPsi = psi * (1 - psiChange);
            const now = siteSpectrum(nmax, U, mu - model.eps[i], psi);
            const before = siteSpectrum(nmax, U, mu - model.eps[i], previousPsi);
            f.psiPrev[i] = previousPsi;
            f.lowerEnergy[i] = coldLane && lane === 0 ? NaN : before.e0;
            // estimate = lower - 2 phi (psi - psiPrev): on e1 (excited) or e0 (ground)
            const target = mask & (1 << lane) ? now.e1 : now.e0;
            f.phi[i] = (before.e0 - target) / (2 * (psi - previousPsi));
            twists.push(mask & (1 << lane) ? now.twist1 : now.twist0);
          }
          if (!coldLane) {
            quads++;
            for (let lane = 0; lane < 4; lane++) if (mask & (1 << lane)) expectedFallbacks++;
            if (twists.every((t) => t.length === 1)) {
              if (twists.some((t) => t[0] !== twists[0][0])) surelySplit++;
              else surelyShared++;
            }
          }
        }
      }
    }
    return { expectedFallbacks, quads, surelySplit, surelyShared };
  };

  it('writes the reference doubles, finds every ground state, and redoes exactly the rigged lanes', () => {
    const js = createSolverState(model, phi0);
    const quad = createSolverState(model, phi0);
    const pairs = createSolverState(model, phi0);
    const expected = rig(js);
    rig(quad);
    rig(pairs);
    const counting = countingWasmKernel(quad, 0);
    const rows = n0 * n1;
    const changes = [createJsKernel(js).sweep(0, 0, rows, mu, 0), counting.sweep(0, 0, rows, mu, 0), createWasmKernel(pairs, 1, { quads: false }).sweep(0, 0, rows, mu, 0)];
    expect(Object.is(changes[1], changes[0]) && Object.is(changes[2], changes[0])).toBe(true);
    for (const key of ['phi', 'delta', 'lowerEnergy', 'psiPrev'] as const) {
      expect(bytes(quad.fields[key]).equals(bytes(js.fields[key]))).toBe(true);
      expect(bytes(pairs.fields[key]).equals(bytes(js.fields[key]))).toBe(true);
    }
    // Hand count from the rigging: 48 quads, 7 of them with a cold lane (pair code).
    expect(expected.quads).toBe(41);
    const counts = counting.counts();
    expect(counts.solved).toBe(expected.quads);
    expect(counts.laneFallbacks).toBe(expected.expectedFallbacks);
    expect(counts.splitAdjugate).toBeGreaterThanOrEqual(expected.surelySplit);
    expect(counts.splitAdjugate).toBeLessThanOrEqual(expected.quads - expected.surelyShared);
    expect(expected.surelySplit).toBeGreaterThan(3);
    expect(expected.surelyShared).toBeGreaterThan(0);
    // Every updated site holds its exact ground state (ml-matrix), rigged or not.
    for (let a = 0; a < n0; a++) {
      for (let b = 0; b < n1; b++) {
        for (let c = (a + b) & 1; c < n2; c += 2) {
          const i = at(a, b, c);
          const exact = siteSpectrum(nmax, U, mu - model.eps[i], quad.fields.psiPrev[i]);
          expect(Math.abs(quad.fields.lowerEnergy[i] - exact.e0)).toBeLessThan(1e-12 * (Math.abs(exact.e0) + U));
          expect(Math.abs(quad.fields.phi[i] - exact.phi)).toBeLessThan(1e-10);
        }
      }
    }
  });

  it('cold quads (no stored energies: the first sweep) give the exact ground states and the reference doubles', () => {
    const js = createSolverState(model, phi0);
    const quad = createSolverState(model, phi0);
    const counting = countingWasmKernel(quad, 0);
    const rows = n0 * n1;
    expect(Object.is(counting.sweep(1, 0, rows, mu, 0), createJsKernel(js).sweep(1, 0, rows, mu, 0))).toBe(true);
    for (const key of ['phi', 'delta', 'lowerEnergy', 'psiPrev'] as const) expect(bytes(quad.fields[key]).equals(bytes(js.fields[key]))).toBe(true);
    expect(counting.counts().solved).toBe(48);
    for (let a = 0; a < n0; a++) {
      for (let b = 0; b < n1; b++) {
        for (let c = (a + b + 1) & 1; c < n2; c += 2) {
          const i = at(a, b, c);
          const exact = siteSpectrum(nmax, U, mu - model.eps[i], meanField(phi0, a, b, c));
          expect(Math.abs(quad.fields.phi[i] - exact.phi)).toBeLessThan(1e-10);
        }
      }
    }
  });
});

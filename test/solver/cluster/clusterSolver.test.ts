// The cluster problem against exact results from outside src/solver/cluster:
// - an independent dense exact diagonalisation with ml-matrix (helpers.ts) of the
//   Bose-Hubbard cluster, with and without mean fields, T = 0 and T > 0 (1e-9);
// - two sites with two bosons: E = (U - sqrt(U^2 + 16 J^2))/2 (derivation below);
// - the Lanczos path agrees with the dense path to 1e-10, and a warm start saves products.
import { describe, expect, it } from 'vitest';
import { createClusterSolver, solveClusterGround, solveClusterThermal, type ClusterSolver } from '../../../src/solver/cluster/clusterSolver.js';
import { seededRandom } from '../../../src/numerics/seededRandom.js';
import { referenceDiagonalisation, type ReferenceProblem } from './helpers.js';

function randomInputs(solver: ClusterSolver, seed: string, withFields: boolean): ReferenceProblem {
  const rng = seededRandom(seed);
  const g = solver.geometry;
  const h = solver.hamiltonian;
  const U: number[] = [];
  const mu: number[] = [];
  const psi: number[] = [];
  for (let i = 0; i < g.siteCount; i++) {
    U.push(0.8 + 0.4 * rng.uniform());
    mu.push(0.3 + 0.9 * rng.uniform());
    psi.push(withFields ? 0.02 + 0.15 * rng.uniform() : 0);
    h.interactionU[i] = U[i];
    h.muLocal[i] = mu[i];
    h.fieldPsi[i] = psi[i];
  }
  const bonds: ReferenceProblem['bonds'] = [];
  for (let b = 0; b < g.bondCount; b++) {
    const J = 0.03 + 0.07 * rng.uniform();
    h.bondHopping[b] = J;
    bonds.push({ i: g.bondSiteA[b], j: g.bondSiteB[b], J });
  }
  return { sites: g.siteCount, nmax: solver.basis.nmax, U, mu, bonds, psi };
}

describe('isolated cluster = exact diagonalisation (ml-matrix), open boundary', () => {
  for (const [shape, nmax] of [[[3], 3], [[2, 2], 3], [[2, 1, 2], 2]] as const) {
    it(`${shape.join('x')} nmax ${nmax}: ground energy, densities, <b_i^+ b_j> to 1e-9 (dense and Lanczos)`, () => {
      for (const denseMaxStates of [10_000, 8]) {
        const solver = createClusterSolver(shape, nmax, { denseMaxStates, lanczosBasis: 20 });
        const problem = randomInputs(solver, `iso-${shape.join('x')}`, false);
        const ref = referenceDiagonalisation(problem);
        const out = solveClusterGround(solver, null);
        expect(out.converged).toBe(true);
        expect(Math.abs(out.energy - ref.energies[0])).toBeLessThan(1e-9);
        for (let i = 0; i < problem.sites; i++) {
          expect(Math.abs(out.density[i] - ref.density[i])).toBeLessThan(1e-9);
          expect(Math.abs(out.phi[i])).toBeLessThan(1e-9); // number conserved: <b_i> = 0
        }
        for (let b = 0; b < problem.bonds.length; b++) expect(Math.abs(out.bondCorrelation[b] - ref.bondCorrelation[b])).toBeLessThan(1e-9);
      }
    });
  }

  it('with mean fields (2x2, nmax 3): energy, n_i, phi_i, bonds to 1e-9; thermal state at kT = 0.15 U', () => {
    const solver = createClusterSolver([2, 2], 3);
    const problem = randomInputs(solver, 'fields', true);
    const ref = referenceDiagonalisation(problem, 0.15);
    const out = solveClusterGround(solver, null);
    expect(Math.abs(out.energy - ref.energies[0])).toBeLessThan(1e-9);
    for (let i = 0; i < 4; i++) {
      expect(Math.abs(out.density[i] - ref.density[i])).toBeLessThan(1e-9);
      expect(Math.abs(out.phi[i] - ref.phi[i])).toBeLessThan(1e-9);
      expect(out.phi[i]).toBeGreaterThan(0);
    }
    const th = solveClusterThermal(solver, 0.15, null);
    const t = ref.thermal!;
    expect(Math.abs(th.energy - t.grandPotential)).toBeLessThan(1e-9);
    expect(Math.abs(th.entropy - t.entropy)).toBeLessThan(1e-9);
    for (let i = 0; i < 4; i++) {
      expect(Math.abs(th.density[i] - t.density[i])).toBeLessThan(1e-9);
      expect(Math.abs(th.phi[i] - t.phi[i])).toBeLessThan(1e-9);
    }
    for (let b = 0; b < 4; b++) expect(Math.abs(th.bondCorrelation[b] - t.bondCorrelation[b])).toBeLessThan(1e-9);
  });
});

describe('two sites, two bosons', () => {
  // In the N = 2 sector {|2,0>, |1,1>, |0,2>} the hopping -J(b_0^+ b_1 + h.c.) has
  // <1,1|b_0^+ b_1|0,2> = sqrt(1) sqrt(2), so H + 2 mu = [[U, -sqrt2 J, 0], [-sqrt2 J, 0,
  // -sqrt2 J], [0, -sqrt2 J, U]]. The antisymmetric (|2,0> - |0,2>)/sqrt2 decouples at U;
  // the symmetric one couples to |1,1> with -2J: [[U, -2J], [-2J, 0]], eigenvalues
  // (U +- sqrt(U^2 + 16 J^2))/2. At mu = 0.4 U, J = 0.1 U the N = 2 ground state lies below
  // N = 1 (-J - mu) and N = 3, so it is the ground state of the whole Fock space.
  it('ground energy (U - sqrt(U^2 + 16 J^2))/2 - 2 mu, density 1 per site', () => {
    for (const [U, J] of [[1, 0.1], [1, 0.03], [2.5, 0.2]]) {
      const mu = 0.4 * U;
      const solver = createClusterSolver([2], 4);
      const h = solver.hamiltonian;
      h.interactionU.fill(U);
      h.muLocal.fill(mu);
      h.bondHopping[0] = J;
      const out = solveClusterGround(solver, null);
      const exact = (U - Math.sqrt(U * U + 16 * J * J)) / 2 - 2 * mu;
      expect(Math.abs(out.energy - exact)).toBeLessThan(1e-12 * U);
      expect(Math.abs(out.density[0] + out.density[1] - 2)).toBeLessThan(1e-12);
      // <b_0^+ b_1> = -dE/dJ / 2 (Hellmann-Feynman) = 4J / sqrt(U^2 + 16 J^2)
      expect(Math.abs(out.bondCorrelation[0] - (4 * J) / Math.sqrt(U * U + 16 * J * J))).toBeLessThan(1e-12);
    }
  });
});

describe('Lanczos against the dense solver', () => {
  it('2x2 nmax 4 with fields, T = 0: energy and observables agree to 1e-10', () => {
    const dense = createClusterSolver([2, 2], 4, { denseMaxStates: 10_000 });
    const lanczos = createClusterSolver([2, 2], 4, { denseMaxStates: 10, residualTolerance: 1e-14 });
    expect(dense.method).toBe('dense');
    expect(lanczos.method).toBe('lanczos');
    randomInputs(dense, 'lz', true);
    randomInputs(lanczos, 'lz', true);
    const a = solveClusterGround(dense, null);
    const eA = a.energy;
    const phiA = Float64Array.from(a.phi);
    const nA = Float64Array.from(a.density);
    const cA = Float64Array.from(a.bondCorrelation);
    const b = solveClusterGround(lanczos, null);
    expect(b.converged).toBe(true);
    expect(Math.abs(b.energy - eA)).toBeLessThan(1e-10);
    for (let i = 0; i < 4; i++) {
      expect(Math.abs(b.phi[i] - phiA[i])).toBeLessThan(1e-10);
      expect(Math.abs(b.density[i] - nA[i])).toBeLessThan(1e-10);
      expect(Math.abs(b.bondCorrelation[i] - cA[i])).toBeLessThan(1e-10);
    }
  });

  it('2x2 nmax 3 with fields, T > 0: block Lanczos lowest states agree with the full spectrum', () => {
    const dense = createClusterSolver([2, 2], 3);
    const lanczos = createClusterSolver([2, 2], 3, { thermalDenseMaxStates: 10, residualTolerance: 1e-14, thermalWeightMax: 1e-12 });
    expect(dense.thermalMethod).toBe('dense');
    expect(lanczos.thermalMethod).toBe('lanczos');
    randomInputs(dense, 'lzT', true);
    randomInputs(lanczos, 'lzT', true);
    for (const T of [0.03, 0.08]) {
      const ta = solveClusterThermal(dense, T, null);
      expect(ta.exhaustive).toBe(true);
      const fa = ta.energy;
      const sa = ta.entropy;
      const pa = Float64Array.from(ta.phi);
      const ca = Float64Array.from(ta.bondCorrelation);
      const tb = solveClusterThermal(lanczos, T, null);
      expect(tb.converged).toBe(true);
      expect(tb.exhaustive).toBe(false);
      expect(tb.keptStates).toBeLessThan(256);
      expect(tb.truncationWeight).toBeLessThan(1e-12);
      // Discarded states weigh < 1e-12 each, so averages agree to ~1e-10.
      expect(Math.abs(tb.energy - fa)).toBeLessThan(1e-10);
      expect(Math.abs(tb.entropy - sa)).toBeLessThan(1e-9);
      for (let i = 0; i < 4; i++) {
        expect(Math.abs(tb.phi[i] - pa[i])).toBeLessThan(1e-10);
        expect(Math.abs(tb.bondCorrelation[i] - ca[i])).toBeLessThan(1e-10);
      }
    }
  });

  it('truncation is reported: a cap on kept states leaves the top weight above the target', () => {
    const lanczos = createClusterSolver([2, 2], 3, { thermalDenseMaxStates: 10, thermalStates: 8, maxThermalStates: 8 });
    randomInputs(lanczos, 'cap', true);
    const t = solveClusterThermal(lanczos, 0.3, null);
    expect(t.keptStates).toBe(8);
    expect(t.truncationWeight).toBeGreaterThan(1e-3);
  });

  it('a warm start from the previous state needs fewer products than a cold one', () => {
    const solver = createClusterSolver([2, 2], 3, { denseMaxStates: 10 });
    randomInputs(solver, 'warm', true);
    const cold = solveClusterGround(solver, null).matvecs;
    const previous = Float64Array.from(solver.groundVector);
    for (let i = 0; i < 4; i++) solver.hamiltonian.fieldPsi[i] *= 1.001; // the next sweep's fields
    const coldAgain = solveClusterGround(solver, null).matvecs;
    const warm = solveClusterGround(solver, previous).matvecs;
    expect(solver.observables.converged).toBe(true);
    expect(warm).toBeLessThan(coldAgain);
    expect(warm).toBeLessThan(cold);
  });
});

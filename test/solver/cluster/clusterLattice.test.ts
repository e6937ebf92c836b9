// The lattice-level cluster mean-field driver against references outside it:
// - cluster [1, 1] = the existing single-site Gutzwiller solver (src/solver/latticeSolve.ts)
//   in a trap with disorder, per-site U and per-bond J, T = 0 and T > 0 (1e-10);
// - a lattice that is one open cluster = exact diagonalisation of the Bose-Hubbard
//   Hamiltonian with ml-matrix (helpers.ts), energy and densities to 1e-9;
// - a periodic lattice of 2x2 clusters = the uniform cluster solution (homogeneousCluster.ts),
//   with two colours (4x4) and three colours (6x6, odd number of clusters per axis);
// - J = 0 with partial clusters at the open edges: the exact wedding cake
//   n_i = #{k >= 1 : (k - 1) U < mu - eps_i};
// - in a trap the superfluid ring is not wider with 2x2 clusters than with single sites
//   (clusters stabilise the Mott phase, issue 17).
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry } from '../../../src/lattice/latticeGeometry.js';
import { uniformModel, type LatticeModel } from '../../../src/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../../../src/lattice/harmonicTrap.js';
import { boxDisorder } from '../../../src/lattice/boxDisorder.js';
import { seededRandom } from '../../../src/numerics/seededRandom.js';
import { createSolverState } from '../../../src/solver/solverState.js';
import { createSweepExecutor } from '../../../src/solver/sweepExecutor.js';
import { initialOrderParameter, solveLattice } from '../../../src/solver/latticeSolve.js';
import { solveClusterLattice } from '../../../src/solver/cluster/clusterLattice.js';
import { solveHomogeneousCluster } from '../../../src/solver/cluster/homogeneousCluster.js';
import { referenceDiagonalisation } from './helpers.js';

function disorderedTrap(shape: number[], periodic: boolean[], J: number, nmax: number, seed: string): LatticeModel {
  const g = createLatticeGeometry(shape, periodic);
  const model = uniformModel(g, 1, J, nmax);
  addHarmonicTrap(g, { coefficient: shape.map(() => 0.02), centre: latticeCentre(g) }, model.eps);
  const w = boxDisorder(g.siteCount, 0.3, `${seed}/eps`);
  for (let i = 0; i < g.siteCount; i++) model.eps[i] += w[i];
  const rng = seededRandom(`${seed}/uj`);
  model.interactionU = Float64Array.from({ length: g.siteCount }, () => 0.9 + 0.2 * rng.uniform());
  model.hopping[0] = Float64Array.from({ length: g.siteCount }, () => J * (0.8 + 0.4 * rng.uniform()));
  return model;
}

async function singleSite(model: LatticeModel, mu: number, temperature: number) {
  const state = createSolverState(model, initialOrderParameter(model, mu), { thermal: temperature > 0 });
  const result = await solveLattice(model, state, createSweepExecutor(state, null, 1), {
    mode: { kind: 'mu', mu },
    temperature,
    tolerance: 1e-13,
    maxSweeps: 100_000,
    accelerate: false,
  });
  return { state, result };
}

describe('cluster [1, ..., 1] = the single-site solver', () => {
  for (const [shape, periodic, T] of [
    [[9, 12], [false, false], 0],
    [[9, 12], [false, false], 0.08],
    [[4, 4, 4], [true, true, true], 0],
  ] as const) {
    it(`${shape.join('x')} ${periodic[0] ? 'periodic' : 'open'}, kT = ${T}: every field to 1e-10`, async () => {
      const model = disorderedTrap([...shape], [...periodic], 0.035, 5, `single-${shape.join('x')}-${T}`);
      const mu = 1.3;
      const ref = await singleSite(model, mu, T);
      expect(ref.result.converged).toBe(true);
      const mine = solveClusterLattice({
        model,
        cluster: shape.map(() => 1),
        mu,
        temperature: T,
        tolerance: 1e-13,
        maxSweeps: 100_000,
        initialPhi: initialOrderParameter(model, mu),
      });
      expect(mine.converged).toBe(true);
      const m = ref.state.measure;
      let superfluid = 0;
      for (let i = 0; i < model.geometry.siteCount; i++) {
        expect(Math.abs(mine.phi[i] - ref.state.fields.phi[i])).toBeLessThan(1e-10);
        expect(Math.abs(mine.density[i] - m.density[i])).toBeLessThan(1e-10);
        expect(Math.abs(mine.numberVariance[i] - (m.densitySq[i] - m.density[i] * m.density[i]))).toBeLessThan(1e-10);
        expect(Math.abs(mine.parityOdd[i] - m.parityOdd[i])).toBeLessThan(1e-10);
        expect(Math.abs(mine.topWeight[i] - m.topWeight[i])).toBeLessThan(1e-10);
        expect(Math.abs(mine.entropy[i] - m.entropy[i])).toBeLessThan(1e-10);
        expect(Math.abs(mine.grandPotential[i] - m.grandPotential[i])).toBeLessThan(1e-10);
        if (mine.phi[i] > 0.05) superfluid++;
      }
      expect(superfluid).toBeGreaterThan(0); // the comparison covers superfluid sites
      expect(Math.abs(mine.totals.grandPotential - ref.result.totals.grandPotential)).toBeLessThan(1e-9);
    });
  }
});

describe('a lattice that is one open cluster', () => {
  it('2x3 in a trap with random J per bond: energy, densities and bond correlations = exact diagonalisation (1e-9)', () => {
    const model = disorderedTrap([2, 3], [false, false], 0.08, 2, 'iso');
    model.hopping[1] = 0.06;
    const mu = 0.9;
    const r = solveClusterLattice({ model, cluster: [2, 3], mu, temperature: 0, tolerance: 1e-12, maxSweeps: 10 });
    const U = model.interactionU as Float64Array;
    const bonds: Array<{ i: number; j: number; J: number }> = [];
    for (let x = 0; x < 2; x++) {
      for (let y = 0; y < 3; y++) {
        const i = x * 3 + y;
        if (x + 1 < 2) bonds.push({ i, j: i + 3, J: (model.hopping[0] as Float64Array)[i] });
        if (y + 1 < 3) bonds.push({ i, j: i + 1, J: 0.06 });
      }
    }
    const ref = referenceDiagonalisation({ sites: 6, nmax: 2, U: Array.from(U), mu: Array.from(model.eps, (e) => mu - e), bonds });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.totals.grandPotential - ref.energies[0])).toBeLessThan(1e-9);
    for (let i = 0; i < 6; i++) {
      expect(Math.abs(r.density[i] - ref.density[i])).toBeLessThan(1e-9);
      expect(Math.abs(r.phi[i])).toBeLessThan(1e-9); // no field: number conserved
    }
    bonds.forEach(({ i, j }, b) => {
      const axis = j - i === 3 ? 0 : 1;
      expect(r.bondExact[axis][i]).toBe(1);
      expect(Math.abs(r.bondCorrelation[axis][i] - ref.bondCorrelation[b])).toBeLessThan(1e-9);
    });
  });
});

describe('periodic lattice of clusters = uniform cluster solution', () => {
  for (const side of [4, 6, 2]) {
    it(`${side}x${side} periodic with 2x2 clusters (${side === 6 ? 'three colours' : side === 2 ? 'one self-neighbouring cluster' : 'two colours'})`, () => {
      const J = 0.06;
      const mu = 0.55;
      const g = createLatticeGeometry([side, side], [true, true]);
      const model = uniformModel(g, 1, J, 4);
      const r = solveClusterLattice({ model, cluster: [2, 2], mu, temperature: 0, tolerance: 1e-12, maxSweeps: 5000, initialPhi: new Float64Array(g.siteCount).fill(0.8) });
      const ref = solveHomogeneousCluster({ shape: [2, 2], hopping: J, interactionU: 1, mu, temperature: 0, nmax: 4, tolerance: 1e-12 });
      expect(r.converged).toBe(true);
      expect(r.colourCount).toBe(side === 6 ? 3 : 2);
      expect(ref.meanPhi).toBeGreaterThan(0.1);
      for (let i = 0; i < g.siteCount; i++) {
        expect(Math.abs(r.phi[i] - ref.meanPhi)).toBeLessThan(1e-9);
        expect(Math.abs(r.density[i] - ref.meanDensity)).toBeLessThan(1e-9);
      }
      expect(Math.abs(r.totals.grandPotential / g.siteCount - ref.grandPotentialPerSite)).toBeLessThan(1e-9);
    });
  }
});

describe('trapped clouds', () => {
  it('J = 0 with partial clusters at the open edges (7x5, cluster 2x2): the exact wedding cake', () => {
    const g = createLatticeGeometry([7, 5], [false, false]);
    const model = uniformModel(g, 1, 0, 4);
    addHarmonicTrap(g, { coefficient: [0.15, 0.15], centre: [3.2, 1.9] }, model.eps);
    const mu = 2.3;
    const r = solveClusterLattice({ model, cluster: [2, 2], mu, temperature: 0, tolerance: 1e-12, maxSweeps: 100 });
    expect(r.clusterCount).toBe(12); // ceil(7/2) * ceil(5/2)
    for (let i = 0; i < g.siteCount; i++) {
      let expected = 0;
      for (let k = 1; k <= 4; k++) if (k - 1 < mu - model.eps[i]) expected = k;
      expect(r.density[i]).toBeCloseTo(expected, 12);
    }
  });

  it('the superfluid ring is not wider with 2x2 clusters than with single sites', () => {
    const g = createLatticeGeometry([16, 16], [false, false]);
    const model = uniformModel(g, 1, 0.04, 3);
    addHarmonicTrap(g, { coefficient: [0.012, 0.012], centre: latticeCentre(g) }, model.eps);
    const mu = 0.6;
    const count = (cluster: number[]) => {
      const r = solveClusterLattice({ model, cluster, mu, temperature: 0, tolerance: 1e-9, maxSweeps: 20_000 });
      expect(r.converged).toBe(true);
      let sf = 0;
      for (let i = 0; i < g.siteCount; i++) if (r.phi[i] > 1e-3) sf++;
      return sf;
    };
    const single = count([1, 1]);
    const cluster = count([2, 2]);
    expect(single).toBeGreaterThan(0);
    expect(cluster).toBeLessThanOrEqual(single);
  });

  it('bad cluster shapes are reported with the parameter name', () => {
    const g = createLatticeGeometry([6, 6], [true, false]);
    const model = uniformModel(g, 1, 0.04, 3);
    expect(() => solveClusterLattice({ model, cluster: [4, 2], mu: 0.5, temperature: 0, tolerance: 1e-8, maxSweeps: 10 })).toThrow(/cluster\[0\].*divide/);
    expect(() => solveClusterLattice({ model, cluster: [2], mu: 0.5, temperature: 0, tolerance: 1e-8, maxSweeps: 10 })).toThrow(/cluster: expected 2 extents/);
  });
});

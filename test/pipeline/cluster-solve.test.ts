// `solver.cluster` through the whole solve pipeline (prepareScenario -> solveScenario: the
// cluster sweep executor under the solver's relaxation, fixed-N search and truncation
// guard), against references outside the pipeline:
// (truncation.topWeightMax is relaxed where the reference shares the same nmax exactly.)
// - a lattice that is one open cluster has no mean field left: its grand potential,
//   densities and bond correlations equal an exact diagonalisation of the Bose-Hubbard
//   Hamiltonian with ml-matrix (test/solver/cluster/helpers.ts, no code shared with src/);
// - two sites, two bosons: the closed-form ground energy (U - sqrt(U^2 + 16 J^2)) / 2
//   (diagonalise the 3x3 block {|2,0>, |1,1>, |0,2>}; standard two-site result);
// - cluster [1, 1] is the single-site solver, bit for bit;
// - a trapped, disordered layer with 2x2 clusters: the fixed-N search lands on the atom
//   number, the fields equal the plain cluster driver's at that mu (tested itself against
//   exact diagonalisation in test/solver/cluster/clusterLattice.test.ts), and the grand
//   potential lies below the single-site one (variational principle: a product of cluster
//   states contains every product of site states).

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { solveClusterLattice } from '../../src/solver/cluster/clusterLattice.js';
import { referenceDiagonalisation } from '../solver/cluster/helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-cluster-solve-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function file(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', ...body }));
  return path;
}

const clusterWorkerModule = {
  filename: new URL('../../src/solver/cluster/clusterSweepWorker.ts', import.meta.url).href,
  execArgv: ['--import', new URL('../register-ts.mjs', import.meta.url).href],
};
const solve = (path: string, threads = 1) => solveScenario(prepareScenario(path), { threads, clusterWorkerModule });

describe('solver.cluster in solve', () => {
  it('a 2x2 lattice that is one cluster equals exact diagonalisation (grand potential, densities, bonds) to 1e-9', async () => {
    const J = 0.12;
    const mu = 0.7;
    const a = await solve(
      file('one-cluster', {
        lattice: { shape: [2, 2], boundary: 'open' },
        hubbard: { hopping: J },
        particles: { chemicalPotential: mu },
        truncation: { nmax: 3, automatic: false, topWeightMax: 0.1 },
        solver: { cluster: [2, 2], tolerance: 1e-10, compressibility: false },
      }),
    );
    // sites in C order: site = 2 x + y; bonds along x: (0,2), (1,3); along y: (0,1), (2,3)
    const bonds = [
      { i: 0, j: 2, J },
      { i: 1, j: 3, J },
      { i: 0, j: 1, J },
      { i: 2, j: 3, J },
    ];
    const ed = referenceDiagonalisation({ sites: 4, nmax: 3, U: [1, 1, 1, 1], mu: [mu, mu, mu, mu], bonds });
    expect(a.outcome.converged).toBe(true);
    expect(a.cluster).not.toBeNull();
    expect(Math.abs(a.outcome.solve.totals.grandPotential - ed.energies[0])).toBeLessThan(1e-9);
    for (let i = 0; i < 4; i++) expect(Math.abs(a.fields.density[i] - ed.density[i])).toBeLessThan(1e-9);
    const c = a.cluster!;
    expect(Math.abs(c.bondCorrelation[0][0] - ed.bondCorrelation[0])).toBeLessThan(1e-9);
    expect(Math.abs(c.bondCorrelation[0][1] - ed.bondCorrelation[1])).toBeLessThan(1e-9);
    expect(Math.abs(c.bondCorrelation[1][0] - ed.bondCorrelation[2])).toBeLessThan(1e-9);
    expect(Math.abs(c.bondCorrelation[1][2] - ed.bondCorrelation[3])).toBeLessThan(1e-9);
    expect(ed.bondCorrelation[0]).toBeGreaterThan(0.05); // a real correlation, not a trivial zero
    expect(c.bondExact[0][0]).toBe(1);
    expect(c.bondExact[1][0]).toBe(1);
  });

  it('two sites, two bosons: energy (U - sqrt(U^2 + 16 J^2)) / 2', async () => {
    const J = 0.1;
    // mu = 0.5 U lies inside the N = 2 plateau (E2 - E1 = 0.062 U, E3 - E2 close to U)
    const a = await solve(
      file('two-sites', {
        lattice: { shape: [2], boundary: 'open' },
        hubbard: { hopping: J },
        particles: { chemicalPotential: 0.5 },
        truncation: { nmax: 4, automatic: false, topWeightMax: 0.1 },
        solver: { cluster: [2], tolerance: 1e-11, compressibility: false },
      }),
    );
    const t = a.outcome.solve.totals;
    expect(Math.abs(t.atoms - 2)).toBeLessThan(1e-9);
    expect(Math.abs(t.freeEnergy - (1 - Math.sqrt(1 + 16 * J * J)) / 2)).toBeLessThan(1e-9);
  });

  it('cluster [1, 1] gives the single-site fields bit for bit', async () => {
    const body = {
      lattice: { shape: [10, 10], boundary: 'open' },
      hubbard: { hopping: 0.03 },
      trap: { coefficient: 0.02 },
      disorder: { kind: 'box', width: 0.2, seed: 'unit-cluster' },
      particles: { atoms: 40 },
      truncation: { nmax: 4 },
    };
    const plain = await solve(file('plain', body));
    const unit = await solve(file('unit', { ...body, solver: { cluster: [1, 1] } }));
    expect(unit.cluster).toBeNull();
    expect(Buffer.from(unit.fields.density.buffer, unit.fields.density.byteOffset, unit.fields.density.byteLength)).toEqual(
      Buffer.from(plain.fields.density.buffer, plain.fields.density.byteOffset, plain.fields.density.byteLength),
    );
    expect(Array.from(unit.fields.orderParameter)).toEqual(Array.from(plain.fields.orderParameter));
  });

  it('a trapped, disordered layer at fixed N with 2x2 clusters: N hit, fields = the cluster driver at that mu, grand potential below single-site', async () => {
    const body = {
      lattice: { shape: [8, 8], boundary: 'open' },
      hubbard: { hopping: 0.04 },
      trap: { coefficient: 0.05 },
      disorder: { kind: 'box', width: 0.3, seed: 'cluster-trap' },
      particles: { atoms: 30 },
      truncation: { nmax: 2, automatic: false, topWeightMax: 0.1 },
    };
    const clustered = await solve(file('trap-cluster', { ...body, solver: { cluster: [2, 2], tolerance: 1e-10, compressibility: false } }));
    expect(clustered.outcome.converged).toBe(true);
    expect(Math.abs(clustered.outcome.solve.totals.atoms - 30) / 30).toBeLessThan(1e-6);
    const mu = clustered.outcome.solve.mu;
    const direct = solveClusterLattice({ model: clustered.outcome.model, cluster: [2, 2], mu, temperature: 0, tolerance: 1e-12, maxSweeps: 10_000 });
    expect(direct.converged).toBe(true);
    for (let i = 0; i < 64; i++) {
      expect(Math.abs(clustered.fields.density[i] - direct.density[i])).toBeLessThan(1e-7);
      expect(Math.abs(clustered.fields.orderParameter[i] - direct.phi[i])).toBeLessThan(1e-7);
    }
    // the single-site solution at the same mu has a higher grand potential
    const single = await solve(file('trap-single', { ...body, particles: { chemicalPotential: mu }, solver: { tolerance: 1e-10, compressibility: false } }));
    expect(clustered.outcome.solve.totals.grandPotential).toBeLessThan(single.outcome.solve.totals.grandPotential - 1e-4);
    // the reading: the method, and coherence beyond mean field on the bonds inside clusters
    expect(clustered.cluster!.shape).toEqual([2, 2]);
    expect(clustered.cluster!.insideBonds[0]!.bonds).toBe(32);
    expect(clustered.threadsUsed).toBe(1);
  });

  it('two threads give the same fields bit for bit as one, at T = 0 and T > 0', async () => {
    for (const kT of [0, 0.08]) {
      const body = {
        lattice: { shape: [6, 4], boundary: 'open' },
        hubbard: { hopping: 0.05 },
        trap: { coefficient: 0.05 },
        disorder: { kind: 'box', width: 0.2, seed: 'threads' },
        particles: { atoms: 10 },
        temperature: { kT },
        truncation: { nmax: 2, automatic: false, topWeightMax: 0.1 },
        solver: { cluster: [2, 2], tolerance: 1e-9 },
      };
      const one = await solve(file(`threads-1-${kT}`, body), 1);
      const two = await solve(file(`threads-2-${kT}`, body), 2);
      expect(two.threadsUsed).toBe(2);
      expect(one.threadsUsed).toBe(1);
      expect(two.outcome.totalSweeps).toBe(one.outcome.totalSweeps);
      expect(Array.from(two.fields.density)).toEqual(Array.from(one.fields.density));
      expect(Array.from(two.fields.orderParameter)).toEqual(Array.from(one.fields.orderParameter));
      expect(Array.from(two.fields.compressibility)).toEqual(Array.from(one.fields.compressibility));
      expect(Array.from(two.cluster!.bondCorrelation[1])).toEqual(Array.from(one.cluster!.bondCorrelation[1]));
      expect(two.cluster!.matvecs).toBe(one.cluster!.matvecs);
    }
  });
});

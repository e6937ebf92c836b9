// Warnings about readings that cannot be trusted, from real solves. External checks:
// - a clipped cloud: the face atoms are summed here from the density, and the lattice size
//   the warning names is tested by solving again at that size (same mu): the warning goes
//   away and the cloud gains the atoms the edge had cut off;
// - the estimate of that size is the local-density edge of a harmonic trap: the density
//   vanishes where mu - k (x - c)^2 = -zJ at T = 0 (below it the vacuum is stable in mean
//   field: a particle costs -mu_loc and gains at most zJ);
// - mu = -5 U holds no atom (every site is below the vacuum edge): fractions are null;
// - every bundled scenario keeps its cloud inside its lattice (full solves for the 2D ones,
//   the local-density estimate of the same mean field for the 3D cube, whose solve takes
//   about 10 s).

import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { solveScenario, type SolveArtifacts } from '../../src/pipeline/solveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { fractionOfAtoms, readingWarnings, readingWarningsOfSolve, threeDigits } from '../../src/observables/readingWarnings.js';
import { resolveScenario } from '../../src/scenario/resolveScenario.js';
import { loadScenario } from '../../src/scenario/loadScenario.js';
import { homogeneousPhi } from '../../src/solver/homogeneous.js';
import { createSiteObservables, createSiteWorkspace, solveSite } from '../../src/solver/site/index.js';
import { brentRoot } from '../../src/numerics/brentRoot.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-warnings-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function scenario(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 4 }, ...body }));
  return path;
}

function warningsOf(a: SolveArtifacts) {
  return readingWarningsOfSolve(
    a.outcome,
    a.fields.density,
    { tolerance: a.scenario.solver.tolerance, topWeightMax: a.scenario.truncation.topWeightMax, fixedAtoms: a.resolved.chemical.kind === 'atoms' },
    { coefficient: a.resolved.trapCoefficient, centre: a.resolved.trapCentre },
  );
}

const solve = (path: string, overrides: string[] = []) => solveScenario(prepareScenario(path, overrides), { threads: 1 });

describe('cloud-at-edge', () => {
  // 3D, small J: mu = 1.3 U, trap 0.02 U per site^2: the cloud edge (mu_loc = -zJ) lies at
  // r = sqrt((1.3 + 0.06)/0.02) = 8.25 sites, beyond the faces of a 12^3 lattice (5.5 sites).
  const clipped = scenario('clipped', {
    lattice: { shape: [12, 12, 12] },
    hubbard: { hopping: 0.01 },
    trap: { coefficient: 0.02 },
    particles: { chemicalPotential: 1.3 },
    solver: { compressibility: false },
  });

  it('names the faces, their atoms and a lattice that holds the cloud; at that size the warning is gone', async () => {
    const a = await solve(clipped);
    const w = warningsOf(a).filter((x) => x.code === 'cloud-at-edge');
    expect(w).toHaveLength(1);
    // Atoms on the two x faces, summed here.
    let faceAtoms = 0;
    for (let i = 0; i < a.fields.density.length; i++) {
      const x = Math.floor(i / 144);
      if (x === 0 || x === 11) faceAtoms += a.fields.density[i];
    }
    expect(faceAtoms).toBeGreaterThan(1);
    expect(w[0].message).toContain(`x faces: density up to`);
    expect(w[0].message).toContain(`${threeDigits(faceAtoms)} atoms`);
    const size = /about \[(\d+), (\d+), (\d+)\]/.exec(w[0].message);
    expect(size).not.toBeNull();
    const edge = Math.sqrt((1.3 + 6 * 0.01) / 0.02);
    const length = Number(size![1]);
    expect(length).toBeGreaterThanOrEqual(2 * edge);
    expect(length).toBeLessThanOrEqual(2 * edge + 8);
    const big = await solve(clipped, [`lattice.shape=[${size![1]},${size![2]},${size![3]}]`]);
    expect(warningsOf(big)).toEqual([]);
    expect(big.outcome.solve.totals.atoms).toBeGreaterThan(a.outcome.solve.totals.atoms + faceAtoms);
  });

  it('an untrapped axis with open faces is a wall by design, not a clipped cloud', async () => {
    const box = await solve(scenario('box', { lattice: { shape: [8, 8] }, hubbard: { hopping: 0.05 }, particles: { chemicalPotential: 0.5 } }));
    expect(warningsOf(box)).toEqual([]);
  });
});

describe('empty-cloud, truncation, not-converged', () => {
  it('mu = -5 U: no atoms, an empty-cloud warning, fractions null', async () => {
    const a = await solve(scenario('vacuum', { lattice: { shape: [10, 10] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, particles: { chemicalPotential: -5 } }));
    const atoms = a.outcome.solve.totals.atoms;
    expect(atoms).toBeLessThan(1e-6);
    const w = warningsOf(a);
    expect(w.map((x) => x.code)).toEqual(['empty-cloud']);
    expect(fractionOfAtoms(a.outcome.solve.totals.condensedAtoms, atoms)).toBeNull();
    expect(fractionOfAtoms(0.3, 2)).toBe(0.15);
  });

  it('a sweep budget too small: not-converged, naming the residual and the tolerance', async () => {
    const a = await solve(scenario('short', { lattice: { shape: [16, 16] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, particles: { chemicalPotential: 1.2 }, solver: { maxSweeps: 3, compressibility: false } }));
    expect(a.outcome.converged).toBe(false);
    const w = warningsOf(a).find((x) => x.code === 'not-converged');
    expect(w?.message).toContain(`max |delta phi| = ${a.outcome.solve.relax.residual.toExponential(2)} after ${a.outcome.totalSweeps} sweeps, tolerance 1e-8`);
  });

  it('weight on |nmax> above the allowed value: truncation', () => {
    const w = readingWarnings({
      shape: [4],
      periodic: [false],
      density: Float64Array.from([0, 1, 1, 0]),
      atoms: 2,
      convergence: { converged: true, stopped: false, residual: 1e-9, tolerance: 1e-8, sweeps: 10, muSearchConverged: null, temperatureSearchConverged: null },
      truncation: { nmax: 3, maxTopWeight: 2e-5, topWeightMax: 1e-6 },
    });
    expect(w.map((x) => x.code)).toEqual(['truncation']);
    expect(w[0].message).toContain('|nmax = 3>');
  });
});

describe('bundled scenarios sit inside their lattices', () => {
  const configs = new URL('../../configs/', import.meta.url);
  const files = readdirSync(configs).filter((f) => f.endsWith('.json'));

  for (const f of files.filter((name) => JSON.parse(readFileSync(new URL(name, configs), 'utf8')).lattice.shape.length < 3)) {
    it(`${f}: a full solve gives no warning`, async () => {
      const a = await solve(new URL(f, configs).pathname);
      expect(warningsOf(a)).toEqual([]);
    });
  }

  it('cube-shells.json: the local-density cloud at its atom number has density below 1e-3 on every face', () => {
    const { scenario: s } = loadScenario(new URL('cube-shells.json', configs).pathname, []);
    const resolved = resolveScenario(s);
    const { model } = resolved;
    const [nx, ny, nz] = model.geometry.shape;
    const zJ = 2 * (model.hopping as number[]).reduce((p, h) => p + h, 0);
    const U = model.interactionU as number;
    const nmax = s.truncation.nmax;
    const ws = createSiteWorkspace(nmax);
    const obs = createSiteObservables();
    const scratch = createSiteObservables();
    // Homogeneous density at each distinct local chemical potential (the trap repeats them).
    const cache = new Map<number, number>();
    const densityAt = (muLoc: number): number => {
      const hit = cache.get(muLoc);
      if (hit !== undefined) return hit;
      const phi = homogeneousPhi(ws, { zJ, interactionU: U, mu: muLoc, temperature: 0, nmax }, scratch);
      solveSite(ws, U, muLoc, zJ * phi, 0, obs);
      cache.set(muLoc, obs.density);
      return obs.density;
    };
    const atomsAt = (mu: number): number => {
      cache.clear();
      let n = 0;
      for (let i = 0; i < model.eps.length; i++) n += densityAt(mu - model.eps[i]);
      return n;
    };
    const target = s.particles.atoms!;
    const root = brentRoot((mu) => atomsAt(mu) - target, 0.5, 3, atomsAt(0.5) - target, atomsAt(3) - target, 1e-6);
    const mu = root.root;
    cache.clear();
    let faceMax = 0;
    for (let i = 0; i < model.eps.length; i++) {
      const x = Math.floor(i / (ny * nz));
      const y = Math.floor(i / nz) % ny;
      const z = i % nz;
      const onFace = x === 0 || x === nx - 1 || y === 0 || y === ny - 1 || z === 0 || z === nz - 1;
      if (onFace) faceMax = Math.max(faceMax, densityAt(mu - model.eps[i]));
    }
    expect(faceMax).toBeLessThan(1e-3);
    // The demo before the fix (60000 atoms) was clipped by the same estimate.
    const before = brentRoot((m) => atomsAt(m) - 60000, 0.5, 3, atomsAt(0.5) - 60000, atomsAt(3) - 60000, 1e-6).root;
    cache.clear();
    let beforeMax = 0;
    for (let i = 0; i < model.eps.length; i++) {
      const x = Math.floor(i / (ny * nz));
      if (x === 0 || x === nx - 1) beforeMax = Math.max(beforeMax, densityAt(before - model.eps[i]));
    }
    expect(beforeMax).toBeGreaterThan(0.5);
  });
});

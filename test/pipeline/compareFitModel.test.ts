// The model of the compare fit (src/pipeline/compareFitModel.ts): whatever the warm start
// (predictor, reused solver state), an evaluation is the converged solution at its
// parameters. Checked against the homogeneous mean-field solution of a uniform periodic
// lattice (src/solver/homogeneous.ts, itself checked against the analytic Mott lobes), and
// against a cold solve of the same trapped scenario by the ordinary pipeline. The fit's
// linear model between solves must agree with an exact solve far below the solver
// tolerance (1e-8 in phi), and a temperature-only fit must keep the scenario's atom number.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createFitModel, emptyLatticeEdge, START_ATOM_TOLERANCE } from '../../src/pipeline/compareFitModel.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { solveHomogeneous } from '../../src/solver/homogeneous.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-fit-model-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function scenarioFile(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 6 }, ...body }));
  return path;
}

const maxDifference = (a: Float64Array, b: Float64Array): number => a.reduce((m, v, i) => Math.max(m, Math.abs(v - b[i])), 0);

describe('evaluations are converged solutions, whatever the warm start', () => {
  it('uniform periodic layer: every evaluation matches the homogeneous mean-field solution', async () => {
    // zJ = 4 x 0.045 = 0.18 U: superfluid between the n = 1 and n = 2 lobes for these mu.
    const { resolved } = prepareScenario(scenarioFile('uniform', { lattice: { shape: [8, 8], boundary: 'periodic' }, hubbard: { hopping: 0.045 }, particles: { chemicalPotential: 1 } }));
    const model = createFitModel(resolved, { fitsAtoms: true, fitsTemperature: false, internalPerScenarioUnit: 1 }, { threads: 1, pool: null });
    const floor = emptyLatticeEdge(resolved);
    expect(floor).toBeCloseTo(-0.18, 14); // min eps (0) - zJ
    for (const mu of [0.9, 0.95, 0.9001, 1.2]) {
      const s = await model.solveAt(Float64Array.of(mu - floor));
      const exact = solveHomogeneous({ zJ: 0.18, interactionU: 1, mu, temperature: 0, nmax: 6 });
      // Tolerance: the solver stops at 1e-8 in phi; the density follows to the same order.
      for (let i = 0; i < s.density.length; i++) expect(Math.abs(s.density[i] - exact.density)).toBeLessThan(1e-7);
      expect(s.muInternal).toBeCloseTo(mu, 12);
      expect(s.interpolated).toBe(false);
    }
    expect(model.evaluations).toBe(4);
  });

  it('trapped layer: a warm-started chain of evaluations equals a cold solve at the last one', async () => {
    const layer = { lattice: { shape: [20, 20] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, solver: { compressibility: false } };
    const path = scenarioFile('trapped', { ...layer, particles: { atoms: 300 } });
    const { resolved } = prepareScenario(path);
    const model = createFitModel(resolved, { fitsAtoms: true, fitsTemperature: false, internalPerScenarioUnit: 1 }, { threads: 1, pool: null });
    const start = await model.startAtAtoms(300, null);
    expect(Math.abs(start.solution.atoms - 300) / 300).toBeLessThan(START_ATOM_TOLERANCE);
    let last;
    for (const step of [1e-4, -3e-3, 2e-2, 2.0001e-2]) last = await model.solveAt(Float64Array.of(start.physics[0] * (1 + step)));
    const mu = model.muFloor + start.physics[0] * (1 + 2.0001e-2);
    const cold = await solveScenario(prepareScenario(scenarioFile('trapped-mu', { ...layer, particles: { chemicalPotential: mu } })), { threads: 1 });
    expect(cold.outcome.solve.mu).toBe(mu);
    expect(maxDifference(last!.density, cold.fields.density)).toBeLessThan(1e-7);
    expect(Math.abs(last!.atoms - cold.outcome.solve.totals.atoms)).toBeLessThan(1e-5);
  });
});

describe('the linear model between solves', () => {
  it('answers a point far inside the finite-difference step, within 1e-9 of an exact solve', async () => {
    const { resolved } = prepareScenario(scenarioFile('linear', { lattice: { shape: [16, 16] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.015 }, particles: { chemicalPotential: 1.4 } }));
    const model = createFitModel(resolved, { fitsAtoms: true, fitsTemperature: false, internalPerScenarioUnit: 1 }, { threads: 1, pool: null });
    const a = 1.4 - model.muFloor;
    const h = 1e-4 * a;
    await model.solveAt(Float64Array.of(a));
    // Out of reach without a partner: a real solve.
    expect(model.peek(Float64Array.of(a + 1e-3 * h))).toBeUndefined();
    await model.solveAt(Float64Array.of(a + h));
    const q = Float64Array.of(a + 4e-3 * h);
    const linear = model.peek(q);
    expect(linear?.interpolated).toBe(true);
    expect(model.interpolations).toBe(1);
    expect(model.evaluations).toBe(2);
    // The same vector is answered from the cache, the same object.
    expect(await model.solveAt(q)).toBe(linear);
    const exact = await model.solveAt(q, true);
    expect(exact.interpolated).toBe(false);
    expect(model.evaluations).toBe(3);
    // Taylor remainder |q - a| h n'' plus two solver errors of ~1e-9: 1e-8 bounds both.
    expect(maxDifference(linear!.density, exact.density)).toBeLessThan(1e-8);
    expect(Math.abs(linear!.atoms - exact.atoms)).toBeLessThan(1e-6);
    // Beyond 1e-2 h the model solves again.
    expect(model.peek(Float64Array.of(a + 0.5 * h))).toBeUndefined();
  });
});

describe('a temperature-only fit', () => {
  it('keeps the scenario at fixed N: every evaluation holds the atoms it asks for', async () => {
    const { resolved } = prepareScenario(scenarioFile('thermal', { lattice: { shape: [12, 12] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.02 }, particles: { atoms: 120 } }));
    const model = createFitModel(resolved, { fitsAtoms: false, fitsTemperature: true, internalPerScenarioUnit: 1 }, { threads: 1, pool: null });
    for (const kT of [0.1, 0.12, 0.3]) {
      const s = await model.solveAt(Float64Array.of(kT));
      expect(s.kTInternal).toBe(kT);
      expect(Math.abs(s.atoms - 120) / 120).toBeLessThan(10 * resolved.scenario.solver.atomTolerance);
      expect(s.converged).toBe(true);
    }
    await expect(model.startAtAtoms(10, null)).rejects.toThrow(/not a fit parameter/);
  });
});

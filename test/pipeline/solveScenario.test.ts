// Stage 2 of `solve` (src/pipeline/solveScenario.ts): a uniform periodic lattice must give
// the homogeneous mean-field solution at every site (src/solver/homogeneous.ts, checked
// against the analytic Mott-lobe boundary of van Oosten et al., PRA 63, 053601 (2001)); a
// resumed run from a converged field needs almost no sweeps and gives the same field;
// timings come from the injected clock only; small lattices stay on one thread.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { PARALLEL_MIN_SITES, solveScenario, threadsFor, trapAxisScale } from '../../src/pipeline/solveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveHomogeneous } from '../../src/solver/homogeneous.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-solve-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function file(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 6 }, ...body }));
  return path;
}

describe('solveScenario', () => {
  it('a uniform periodic layer is the homogeneous mean-field solution at every site', async () => {
    // zJ = 4 x 0.05 = 0.2 U, mu = 1.5 U: superfluid between the n = 1 and n = 2 lobes.
    const a = await solveScenario(prepareScenario(file('uniform', { lattice: { shape: [8, 8], boundary: 'periodic' }, hubbard: { hopping: 0.05 }, particles: { chemicalPotential: 1.5 }, solver: { compressibility: false } })), { threads: 1 });
    const exact = solveHomogeneous({ zJ: 0.2, interactionU: 1, mu: 1.5, temperature: 0, nmax: 6 });
    expect(exact.phi).toBeGreaterThan(0.1);
    for (let i = 0; i < 64; i++) {
      expect(Math.abs(a.fields.orderParameter[i] - exact.phi)).toBeLessThan(1e-7);
      expect(Math.abs(a.fields.density[i] - exact.density)).toBeLessThan(1e-7);
    }
    expect(a.outcome.converged).toBe(true);
    expect(a.threadsUsed).toBe(1);
  });

  it('resuming from a converged field takes a few sweeps and gives the same field', async () => {
    const path = file('trapped', { lattice: { shape: [16, 16] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, particles: { atoms: 200 }, solver: { compressibility: false } });
    const first = await solveScenario(prepareScenario(path), { threads: 1 });
    const resumed = await solveScenario(prepareScenario(path), {
      threads: 1,
      resume: { phi: Float64Array.from(first.outcome.state.fields.phi), mu: first.outcome.solve.mu, nmax: first.outcome.model.nmax },
    });
    expect(resumed.outcome.totalSweeps).toBeLessThan(first.outcome.totalSweeps / 2);
    for (let i = 0; i < 256; i++) expect(Math.abs(resumed.fields.density[i] - first.fields.density[i])).toBeLessThan(1e-7);
  });

  it('timings come from the injected clock (none without one)', async () => {
    const path = file('clock', { lattice: { shape: [4, 4] }, hubbard: { hopping: 0.02 }, particles: { chemicalPotential: 0.5 }, solver: { compressibility: false } });
    const ticks = [1000, 3000, 3500];
    const timed = await solveScenario(prepareScenario(path), { threads: 1, clock: () => ticks.shift() as number, prepareSeconds: 0.25 });
    expect(timed.timings).toEqual({ resolveSeconds: 0.25, solveSeconds: 2, analysisSeconds: 0.5 });
    const untimed = await solveScenario(prepareScenario(path), { threads: 1 });
    expect(untimed.timings).toEqual({ resolveSeconds: 0, solveSeconds: 0, analysisSeconds: 0 });
  });

  it('threads only from PARALLEL_MIN_SITES sites on; trap axis scale sqrt(k_d / k_ref)', () => {
    expect(threadsFor(PARALLEL_MIN_SITES - 1, 8)).toBe(1);
    expect(threadsFor(PARALLEL_MIN_SITES, 8)).toBe(8);
    expect(trapAxisScale([0.01, 0.04])).toEqual([1, 2]);
    expect(trapAxisScale([0, 0.02, 0.08])).toEqual([1, 1, 2]);
    expect(trapAxisScale([0, 0])).toEqual([1, 1]);
  });
});

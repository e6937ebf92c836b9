// The run request every command builds from a resolved scenario, and the phase labels of a
// finished run (src/pipeline/runRequest.ts): the scenario's solver settings arrive unchanged,
// the automatic truncation may rise to NMAX_CEILING, and in a deep Mott insulator (J -> 0,
// 0 < mu < U) every occupied site is labelled Mott with filling 1 (the atomic limit).

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { classifyOutcome, NMAX_CEILING, runRequestOf } from '../../src/pipeline/runRequest.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { runLattice } from '../../src/solver/runLattice.js';
import { createSweepExecutor } from '../../src/solver/sweepExecutor.js';
import { siteFieldsFrom } from '../../src/observables/siteFields.js';
import { siteArraysOf } from '../../src/solver/siteArrays.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-request-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('runRequestOf and classifyOutcome', () => {
  it('carries the solver settings and labels the atomic-limit Mott insulator', async () => {
    const path = join(dir, 'mott.json');
    writeFileSync(
      path,
      JSON.stringify({
        name: 'mott',
        energyUnit: 'U',
        lattice: { shape: [6, 6], boundary: 'periodic' },
        hubbard: { hopping: 1e-6 },
        particles: { chemicalPotential: 0.5 },
        truncation: { nmax: 4 },
        solver: { tolerance: 1e-9, maxSweeps: 777, accelerate: false },
      }),
    );
    const { resolved } = prepareScenario(path);
    const observed: number[] = [];
    const request = runRequestOf(resolved, (p) => {
      observed.push(p.totalSweeps);
    });
    expect(request).toMatchObject({ tolerance: 1e-9, maxSweeps: 777, accelerate: false, compressibility: true, chemical: { kind: 'mu', mu: 0.5 } });
    expect(request.truncation.nmaxLimit).toBe(Math.max(4, NMAX_CEILING));
    const outcome = await runLattice(request, (state) => createSweepExecutor(state, null, 1));
    expect(observed.length).toBeGreaterThan(0);
    const fields = siteFieldsFrom(siteArraysOf(outcome.state), outcome.compressibility);
    const labels = classifyOutcome(resolved, outcome, fields);
    expect(Array.from(labels.codes).every((c) => c === PhaseCode.mott)).toBe(true);
    expect(Array.from(labels.mottFilling).every((n) => n === 1)).toBe(true);
    for (let i = 0; i < 36; i++) expect(fields.density[i]).toBeCloseTo(1, 6);
  });
});

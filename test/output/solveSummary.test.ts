// summary.json of a solve (src/output/solveSummary.ts buildSummary), its keys checked against
// the values the solve returned, and against outside facts:
// - fixed-N search: results.atoms is the requested N to the search's relative tolerance;
// - condensateFraction = condensedAtoms / atoms (definition), null for an empty cloud, and the
//   visibility of an empty cloud is null (a ratio of nothing);
// - the sites per phase add up to the lattice (a count), mu in every unit is mu / U in U;
// - the superfluid-fraction block holds the twist reading per axis (curvature in the energy
//   unit), null without solver.stiffness; on a clean periodic lattice f_s = |phi|^2/n (the
//   mean-field identity of solveStiffness.test.ts), here equal to the condensate fraction;
// - the thread notes say why fewer threads ran than asked for.
import { rmSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { buildSummary, clusterThreadsNote, threadsNote } from '../../src/output/solveSummary.js';
import { PARALLEL_MIN_SITES, solveScenario } from '../../src/pipeline/solveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { tinyFolder, tinyScenarioFile, tinySolve } from '../helpers/tinyRuns.js';

const dir = tinyFolder('solve-summary');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('buildSummary', () => {
  it('results, parameters, lattice and phases hold the solve values', async () => {
    const a = await tinySolve(dir);
    const s = buildSummary(a, ['x.npy']) as Record<string, any>;
    const t = a.outcome.solve.totals;
    expect(Math.abs(s.results.atoms - 20) / 20).toBeLessThan(1e-5);
    expect(s.results.atoms).toBe(t.atoms);
    expect(s.results.condensedAtoms).toBe(t.condensedAtoms);
    expect(s.results.condensateFraction).toBe(t.condensedAtoms / t.atoms);
    expect(s.results.energy.U).toBe(t.freeEnergy / a.resolved.units.interaction);
    expect(s.results.superfluidFraction).toBeNull();
    expect(s.parameters.chemicalPotential.U).toBe(a.outcome.solve.mu / a.resolved.units.interaction);
    expect(s.parameters.interactionOverHopping).toBeCloseTo(1 / 0.04, 10);
    expect(s.lattice.sites).toBe(36);
    expect(s.lattice.shape).toEqual([6, 6]);
    expect(Object.values(s.phases.sitesPerPhase as Record<string, number>).reduce((x, y) => x + y, 0)).toBe(36);
    expect(s.convergence.converged).toBe(a.outcome.converged);
    expect(s.convergence.totalSweeps).toBe(a.outcome.totalSweeps);
    expect(s.shells.map((x: { filling: number }) => x.filling)).toEqual(a.shells.shells.map((x) => x.filling));
    expect(s.shellRadiusFrame).toBe('trap'); // the tiny layer has a harmonic trap
    expect(s.warnings).toEqual(a.readingWarnings.map((w) => ({ code: w.code, message: w.message })));
    expect(s.energyUnit).toBe('U');
    expect(s.files).toEqual(['x.npy']);
    expect(s.threads).toBe(1);
    expect('threadsNote' in s).toBe(false);
    expect(s.method.kind).toBe('single-site');
  });

  it('an empty cloud: fractions and the visibility are null; fewer threads than asked are explained', async () => {
    const file = tinyScenarioFile(dir, 'empty', { lattice: { shape: [4, 4] }, hubbard: { hopping: 0.04 }, particles: { chemicalPotential: -1 }, solver: { compressibility: false } });
    const a = await solveScenario(prepareScenario(file), { threads: 4 });
    expect(a.outcome.solve.totals.atoms).toBeLessThan(1e-12); // mu < 0 at T = 0, no trap: the vacuum (round-off only)
    const s = buildSummary(a, [], { imaging: { visibility: { value: 0.3, momentumDistributionValue: 0.2 } }, warnings: [{ code: 'w', message: 'm' }] }) as Record<string, any>;
    expect(s.results.condensateFraction).toBeNull();
    expect(s.results.entropyPerAtom).toBeNull();
    expect(s.imaging.visibility.value).toBeNull();
    expect(s.imaging.visibility.momentumDistributionValue).toBeNull();
    expect(s.imaging.visibility.emptyCloud).toMatch(/no atoms/);
    expect(s.warnings).toEqual([{ code: 'w', message: 'm' }]);
    expect(s.threads).toBe(1);
    expect(s.threadsNote).toBe(threadsNote(1, 4, 16));
  });

  it('with solver.stiffness on a clean periodic lattice: f_s per axis, equal to the condensate fraction |phi|^2/n', async () => {
    const file = tinyScenarioFile(dir, 'stiff', {
      lattice: { shape: [4, 4], boundary: 'periodic' },
      hubbard: { hopping: 0.05 },
      particles: { chemicalPotential: 0.5 },
      solver: { compressibility: false, stiffness: true, tolerance: 1e-12 },
    });
    const a = await solveScenario(prepareScenario(file), { threads: 1 });
    const s = buildSummary(a, []) as Record<string, any>;
    const block = s.results.superfluidFraction;
    expect(block.perAxis.map((x: { value: number }) => x.value)).toEqual(a.stiffness!.axes.map((x) => x.value));
    expect(block.perAxis[0].curvature).toBe(a.stiffness!.axes[0].curvature); // energy unit U = internal unit
    for (const x of block.perAxis) expect(Math.abs(x.value - s.results.condensateFraction)).toBeLessThan(1e-6);
    expect(block.converged).toBe(true);
    expect(s.shellRadiusFrame).toBe('none'); // periodic, no trap: no centre to measure radii from
  });

  it('thread notes', () => {
    expect(threadsNote(1, 4, 100)).toBe(`1 thread of 4 requested: the lattice has 100 sites, below the parallel threshold of ${PARALLEL_MIN_SITES} sites, where worker threads cost more than they save`);
    expect(threadsNote(2, 4, 10, 50)).toMatch(/^2 threads of 4 requested: .*threshold of 50 sites/);
    expect(clusterThreadsNote(2, 8)).toBe('2 threads of 8 requested: the cluster method uses no more threads than one colour has clusters');
  });
});

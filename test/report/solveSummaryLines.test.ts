// The stdout lines of `solve` (src/report/solveSummaryLines.ts), checked against the values
// the solve returned (atoms to 8 digits, condensate fraction = condensed / atoms, mu in U,
// the shells counted by the shell summary), and the thread statement in its three cases.
import { rmSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { solveSummaryLines, solveThreadText } from '../../src/report/solveSummaryLines.js';
import { PARALLEL_MIN_SITES, solveScenario } from '../../src/pipeline/solveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { clusterThreadsNote } from '../../src/output/solveSummary.js';
import { tinyFolder, tinyScenarioFile, tinySolve } from '../helpers/tinyRuns.js';

const dir = tinyFolder('solve-lines');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('solveSummaryLines', () => {
  it('names the solve, its atoms, condensate fraction, mu/U and shells, and the folder', async () => {
    const a = await tinySolve(dir);
    const t = a.outcome.solve.totals;
    const lines = solveSummaryLines(a, '/tmp/x');
    expect(lines[0]).toMatch(new RegExp(`^tiny-solve: converged after ${a.outcome.totalSweeps} sweeps \\(\\d+\\.\\d\\d s, 1 thread\\)$`));
    expect(lines[1]).toBe(`  atoms ${t.atoms.toPrecision(8)}, condensate fraction ${(t.condensedAtoms / t.atoms).toFixed(4)}, mu = ${a.outcome.solve.mu.toPrecision(6)} U`);
    expect(lines[1]).toContain('atoms 20.0000'); // the fixed N of the scenario
    expect(lines[2]).toBe(`  shells: ${a.shells.shells.map((s) => `n=${s.filling} (${s.sites} sites)`).join(', ') || 'none'}`);
    expect(lines.at(-1)).toBe('  results in /tmp/x');
    expect(lines).toHaveLength(4);
  });

  it('the superfluid fraction per axis when asked for; the threads statement', async () => {
    const file = tinyScenarioFile(dir, 'stiff', { lattice: { shape: [4, 4], boundary: 'periodic' }, hubbard: { hopping: 0.05 }, particles: { chemicalPotential: 0.5 }, solver: { compressibility: false, stiffness: true } });
    const a = await solveScenario(prepareScenario(file), { threads: 3 });
    const lines = solveSummaryLines(a, 'out');
    const [x, y] = a.stiffness!.axes;
    expect(lines[3]).toBe(`  superfluid fraction (twist): x ${x.value!.toFixed(4)} ± ${x.error!.toExponential(1)}, y ${y.value!.toFixed(4)} ± ${y.error!.toExponential(1)}`);
    expect(lines[0]).toContain(`1 thread: 16 sites are below the parallel threshold of ${PARALLEL_MIN_SITES} sites`);
    expect(solveThreadText({ ...a, threadsUsed: 2, threadsRequested: 2 })).toBe('2 threads');
    expect(solveThreadText({ ...a, threadsUsed: 2, threadsRequested: 4, cluster: {} as never })).toBe(clusterThreadsNote(2, 4));
  });
});

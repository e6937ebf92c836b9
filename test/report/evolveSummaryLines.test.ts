// The stdout lines of `evolve` (src/report/evolveSummaryLines.ts), checked against the values
// the evolution returned: status, steps, first and last rows, the verdict, the spectrum.
import { rmSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { evolveSummaryLines } from '../../src/report/evolveSummaryLines.js';
import type { EvolveArtifacts } from '../../src/pipeline/evolveScenario.js';
import { tinyEvolve, tinyFolder } from '../helpers/tinyRuns.js';

const dir = tinyFolder('evolve-lines');
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let a: EvolveArtifacts;
beforeAll(async () => {
  a = await tinyEvolve(dir);
});

describe('evolveSummaryLines', () => {
  it('status, rows from first to last, verdict, spectrum, folder', () => {
    const lines = evolveSummaryLines(a, '/r');
    const s = a.series;
    const st = a.result.statistics;
    // no clock injected: 0.00 s
    expect(lines[0]).toBe(`tiny-evolve: evolution done to t = 2 ${a.plan.timeUnit}: ${st.steps} steps, ${st.rejectedSteps} rejected (0.00 s, 1 thread)`);
    expect(lines[1]).toBe(
      `  atoms ${s.atoms[0].toPrecision(8)} -> ${s.atoms[4].toPrecision(8)}, condensed ${s.condensedAtoms[0].toPrecision(5)} -> ${s.condensedAtoms[4].toPrecision(5)}, visibility ${s.visibility[0].toFixed(3)} -> ${s.visibility[4].toFixed(3)}`,
    );
    const v = a.verdict!;
    expect(lines[2]).toMatch(new RegExp(`^  verdict: ${v.adiabaticOverall ? 'adiabatic' : 'NOT adiabatic'}; excess energy ${v.excessEnergyPerAtomInScale.toPrecision(3).replace(/[.+-]/g, '\\$&')} U per atom \\(threshold 0.01 U\\); `));
    expect(lines[3]).toBe('  modulation spectrum: 2 frequencies in spectrum.csv');
    expect(lines[4]).toBe('  results in /r');
    expect(lines).toHaveLength(5);
  });

  it('a failed run says so and has no verdict; a quench is named', () => {
    const failed = { ...a, status: 'failed' as const, verdict: null, spectrum: null, plan: { ...a.plan, quenches: [{ path: 'hubbard.hopping' }] as never } };
    const lines = evolveSummaryLines(failed, '/r');
    expect(lines[0]).toContain('evolution FAILED to t = ');
    expect(lines[2]).toBe('  verdict: none (the evolution did not reach its end)');
    expect(lines[3]).toBe('  quench at t = 0: hubbard.hopping');
    expect(lines).toHaveLength(5);
  });
});

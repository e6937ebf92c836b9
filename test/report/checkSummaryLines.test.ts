// The lines of `check` (src/report/checkSummaryLines.ts) for a resolved scenario: every
// energy in all units of the run (a 'U' scenario: J and U, the value divided by each), U/J,
// the lattice counted by hand, the landscape terms with their range, then notes and warnings.
import { describe, expect, it } from 'vitest';
import { checkSummaryLines } from '../../src/report/checkSummaryLines.js';
import { validateScenario } from '../../src/scenario/loadScenario.js';
import { resolveScenario } from '../../src/scenario/resolveScenario.js';
import type { ScenarioInput } from '../../src/scenario/scenarioSchema.js';

const resolved = (extra: Partial<ScenarioInput>) =>
  resolveScenario(
    validateScenario(
      { name: 'checked', energyUnit: 'U', lattice: { shape: [6, 4], boundary: 'periodic' }, hubbard: { hopping: 0.04 }, particles: { chemicalPotential: 0.6 }, truncation: { nmax: 5 }, ...extra } as ScenarioInput,
      'test scenario',
    ),
  );

describe('checkSummaryLines', () => {
  it('the resolved parameters in every unit, then notes and warnings', () => {
    const lines = checkSummaryLines(resolved({}), ['a note'], [{ code: 'w-code', message: 'w message' }]);
    expect(lines[0]).toBe('scenario checked: valid');
    expect(lines).toContain('  lattice                6 x 4 sites (24), periodic/periodic');
    // J = 0.04 U: 1 J, 0.04 U; U: 25 J, 1 U; U/J = 25
    expect(lines).toContain(`  ${'hopping J'.padEnd(22)} 1.00000 J   0.0400000 U`);
    expect(lines).toContain(`  ${'interaction U'.padEnd(22)} 25.0000 J   1.00000 U`);
    expect(lines).toContain('  U/J                    25.0000');
    expect(lines).toContain(`  ${'chemical potential'.padEnd(22)} 15.0000 J   0.600000 U`);
    expect(lines).toContain(`  ${'k_B T'.padEnd(22)} 0.00000 J   0.00000 U`);
    expect(lines).toContain('  nmax                   5 (raised automatically if needed)');
    expect(lines).toContain('  landscape              none');
    expect(lines.slice(-2)).toEqual(['  note: a note', '  warning: w-code: w message']);
  });

  it('fixed atoms and a landscape term with its range', () => {
    const lines = checkSummaryLines(resolved({ particles: { atoms: 12 }, landscape: [{ kind: 'gradient', direction: [1, 0], perSite: 0.01 }], lattice: { shape: [6, 4] } }), [], []);
    expect(lines).toContain('  atoms                  12');
    expect(lines).toContain('  landscape              1 term');
    // a gradient of 0.01 U per site over x = 0..5 about the centre 2.5: -0.025 .. 0.025 U
    const term = lines.find((l) => l.startsWith('    [0] '))!;
    expect(term).toMatch(/^    \[0\] .* \(gradient\): -0\.025\d* \.\. 0\.025\d* U$/);
  });
});

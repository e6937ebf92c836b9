// Non-convergence is never silent: with a sweep budget too small, `solve` still writes its
// results, flags them in summary.json and in the report, keeps the residual history, and
// exits with code 3 (DESIGN.md section 6).
import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';

describe('non-convergence', () => {
  it('writes results, flags them and exits 3', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tiercake-nc-'));
    const scenario = join(dir, 'short.json');
    writeFileSync(
      scenario,
      JSON.stringify({
        name: 'short-budget',
        energyUnit: 'U',
        lattice: { shape: [24, 24] },
        hubbard: { hopping: 0.02 },
        trap: { coefficient: 0.005 },
        particles: { chemicalPotential: 1.2 },
        solver: { maxSweeps: 3, compressibility: false },
      }),
    );
    const out = join(dir, 'out');
    const code = await runCli(['solve', scenario, '--out', out, '--quiet']);
    expect(code).toBe(3);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.convergence.converged).toBe(false);
    expect(summary.convergence.residualHistory.length).toBe(3);
    expect(summary.convergence.residual).toBeGreaterThan(summary.convergence.tolerance);
    expect(existsSync(join(out, 'fields', 'density.npy'))).toBe(true);
    const report = readFileSync(join(out, 'report.html'), 'utf8');
    expect(report).toContain('NOT CONVERGED');
  });
});

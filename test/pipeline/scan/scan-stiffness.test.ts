// `scan` with solver.stiffness: the superfluid_fraction column over a disorder-strength scan.
// References: at W = 0 the clean-lattice mean-field identity f_s = |phi|^2/n (the twist turns
// J into J cos q; Hellmann-Feynman) with phi and n from the homogeneous self-consistency
// (src/solver/homogeneous.ts, checked against van Oosten, van der Straten & Stoof, PRA 63,
// 053601 (2001)); every row against a separate cold solve at that point (a warm start must
// not change the answer beyond the reported numerical error); without solver.stiffness the
// column is nan (the same columns in every mode).
import { afterAll, describe, expect, it, vi } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runScanCommand } from '../../../src/cli/commands/scan.js';
import { prepareScenario } from '../../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../../src/pipeline/solveScenario.js';
import { scanRowOf } from '../../../src/pipeline/scan/scanRow.js';
import { overrideFor } from '../../../src/pipeline/scan/scanPoint.js';
import { solveHomogeneous } from '../../../src/solver/homogeneous.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scan-stiff-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function scenarioFile(name: string, stiffness: boolean): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(
    path,
    JSON.stringify({
      name,
      energyUnit: 'U',
      truncation: { nmax: 6 },
      lattice: { shape: [8, 8], boundary: 'periodic' },
      hubbard: { hopping: 0.05 },
      disorder: { kind: 'box', width: 0, seed: 'scan-stiff' },
      particles: { chemicalPotential: 0.5 },
      solver: { compressibility: false, tolerance: 1e-10, stiffness },
    }),
  );
  return path;
}

async function scan(scenario: string, out: string): Promise<number> {
  const quiet = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
  try {
    return await runScanCommand(scenario, { threads: '1', quiet: true, out, vary: ['disorder.width=0,0.4,0.8'] }, {});
  } finally {
    quiet.mockRestore();
    err.mockRestore();
  }
}

function csvRows(folder: string): Array<Record<string, number>> {
  const lines = readFileSync(join(folder, 'scan.csv'), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  return lines.slice(1).map((l) => Object.fromEntries(l.split(',').map((v, k) => [header[k], v === 'nan' ? NaN : Number(v)])));
}

describe('scan with solver.stiffness', () => {
  it('superfluid_fraction over the disorder width: clean point = |phi|^2/n, every row = a cold solve', async () => {
    const scenario = scenarioFile('stiff-on', true);
    const out = join(dir, 'on');
    expect(await scan(scenario, out)).toBe(0);
    const rows = csvRows(out);
    expect(rows.map((r) => r['disorder.width'])).toEqual([0, 0.4, 0.8]);
    const ref = solveHomogeneous({ zJ: 4 * 0.05, interactionU: 1, mu: 0.5, temperature: 0, nmax: 6 });
    expect(Math.abs(rows[0].superfluid_fraction - (ref.phi * ref.phi) / ref.density)).toBeLessThan(1e-6);
    for (const r of rows) {
      expect(r.superfluid_fraction).toBeGreaterThan(0);
      expect(r.superfluid_fraction).toBeLessThanOrEqual(1);
      expect(r.superfluid_fraction_error).toBeLessThan(1e-3 * r.superfluid_fraction);
      const cold = scanRowOf(0, [r['disorder.width']], await solveScenario(prepareScenario(scenario, [overrideFor('disorder.width', r['disorder.width'])]), { threads: 1 }), false);
      expect(Math.abs(r.superfluid_fraction - cold.superfluidFraction)).toBeLessThan(1e-6);
    }
    const report = readFileSync(join(out, 'report.html'), 'utf8');
    expect(report).toContain('superfluid fraction (twist)');
    expect(existsSync(join(out, 'images', 'scan_stiffness.png'))).toBe(true);
  });

  it('without solver.stiffness the column is nan', async () => {
    const out = join(dir, 'off');
    expect(await scan(scenarioFile('stiff-off', false), out)).toBe(0);
    for (const r of csvRows(out)) {
      expect(Number.isNaN(r.superfluid_fraction)).toBe(true);
      expect(Number.isNaN(r.superfluid_fraction_error)).toBe(true);
    }
    expect(existsSync(join(out, 'images', 'scan_stiffness.png'))).toBe(false);
  });
});

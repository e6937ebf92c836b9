// Ensembles with solver.stiffness: the superfluid fraction of every realisation, its
// ensemble mean, spread and standard error, and the count of realisations whose condensate
// carries no superflow.
//
// What each check is measured against:
// - W = 0: every realisation is the clean lattice, where Gutzwiller mean field gives the
//   superfluid fraction f_s = |phi|^2/n exactly (a twist q turns J into J cos q on the
//   twisted bonds; Hellmann-Feynman), with phi and n from the homogeneous self-consistency
//   (src/solver/homogeneous.ts, checked against van Oosten, van der Straten & Stoof, PRA 63,
//   053601 (2001)); identical realisations have a spread of exactly 0.
// - Strong box disorder at small J (J = 0.01 U, W = 1.6 U, mu = U/2, deep in the region where
//   compressible puddles carry a condensate): mean and spread against the textbook two-pass
//   formulas mean = sum x / R, s^2 = sum (x - mean)^2 / (R - 1), evaluated here on the
//   per-realisation column, the standard error s / sqrt(R), and the puddle count against the
//   rule written out here (condensate fraction > 1e-3, f_s < 0.05 of it; the no-superflow
//   rule of a single solve, Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989)).
// - Shards written before this change (records without the three new keys) still parse.
import { afterAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runEnsembleCommand } from '../../../src/cli/commands/ensemble.js';
import { runMergeCommand } from '../../../src/cli/commands/merge.js';
import { solveHomogeneous } from '../../../src/solver/homogeneous.js';
import { solveRealisation } from '../../../src/pipeline/ensemble/solveRealisation.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-ensemble-stiff-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function scenarioFile(name: string, hopping: number, width: number): { path: string; raw: Record<string, unknown> } {
  const raw = {
    name,
    energyUnit: 'U',
    truncation: { nmax: 5 },
    lattice: { shape: [8, 8], boundary: 'periodic' },
    hubbard: { hopping },
    disorder: { kind: 'box', width, seed: 'puddles' },
    particles: { chemicalPotential: 0.5 },
    solver: { compressibility: false, tolerance: 1e-10, stiffness: true },
  };
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify(raw));
  return { path, raw };
}

async function ensemble(scenario: string, out: string, realisations: number, extra: Record<string, unknown> = {}): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((stdout += String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((stderr += String(s)), true));
  try {
    const code = await runEnsembleCommand(scenario, { realisations: String(realisations), blockSize: '2', threads: '1', set: [], out, quiet: true, ...extra });
    return { code, stdout, stderr };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

function csvColumns(file: string): Record<string, number[]> {
  const lines = readFileSync(file, 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  const columns: Record<string, number[]> = Object.fromEntries(header.map((h) => [h, []]));
  for (const line of lines.slice(1)) line.split(',').forEach((v, k) => columns[header[k]].push(Number(v)));
  return columns;
}

describe('ensemble with solver.stiffness', () => {
  it('W = 0: every realisation and the mean give |phi|^2/n of the homogeneous solution, spread 0', async () => {
    const { path } = scenarioFile('clean', 0.05, 0);
    const out = join(dir, 'clean');
    const run = await ensemble(path, out, 3);
    expect(run.code).toBe(0);
    const ref = solveHomogeneous({ zJ: 4 * 0.05, interactionU: 1, mu: 0.5, temperature: 0, nmax: 5 });
    const expected = (ref.phi * ref.phi) / ref.density;
    const cols = csvColumns(join(out, 'realisations.csv'));
    expect(cols.superfluid_fraction).toHaveLength(3);
    for (const v of cols.superfluid_fraction) expect(Math.abs(v - expected)).toBeLessThan(1e-6);
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    const fs = summary.results.superfluidFraction;
    expect(Math.abs(fs.mean - expected)).toBeLessThan(1e-6);
    expect(fs.spread).toBe(0);
    expect(fs.noSuperflowRealisations).toBe(0);
    expect(fs.criterion).toContain('Fisher');
    expect(run.stdout).toContain('superfluid fraction');
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain('superfluid fraction (mean ± spread)');
  });

  it('strong disorder: per-realisation values = separate solves, mean/spread = two-pass formulas, puddles counted', async () => {
    const { path, raw } = scenarioFile('puddles', 0.01, 1.6);
    const out = join(dir, 'puddles');
    const R = 4;
    const run = await ensemble(path, out, R);
    expect(run.code).toBe(0);
    const cols = csvColumns(join(out, 'realisations.csv'));
    const values = cols.superfluid_fraction;
    expect(values).toHaveLength(R);
    // each realisation solved on its own (seed "puddles/r") gives the same reading
    for (let r = 0; r < R; r++) {
      const alone = await solveRealisation(raw, 'puddles', r);
      expect(Math.abs((alone.record.superfluidFraction as number) - values[r])).toBeLessThan(1e-12 + 1e-9 * Math.abs(values[r]));
    }
    const mean = values.reduce((a, b) => a + b, 0) / R;
    const spread = Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (R - 1));
    const fs = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')).results.superfluidFraction;
    expect(fs.realisations).toBe(R);
    expect(Math.abs(fs.mean - mean)).toBeLessThan(1e-9 * Math.max(mean, 1e-12) + 1e-15);
    expect(Math.abs(fs.spread - spread)).toBeLessThan(1e-9 * Math.max(spread, 1e-12) + 1e-15);
    expect(Math.abs(fs.standardError - spread / Math.sqrt(R))).toBeLessThan(1e-9 * Math.max(spread, 1e-12) + 1e-15);
    const puddles = values.filter((v, r) => {
      const cf = cols.condensed_atoms[r] / cols.atoms[r];
      return cf > 1e-3 && v < 0.05 * cf;
    }).length;
    expect(fs.noSuperflowRealisations).toBe(puddles);
    // the regime is the one the test is about: a condensate in puddles, (almost) no superflow
    expect(puddles).toBeGreaterThan(0);
    expect(run.stderr).toContain('no-superflow');
  });

  it('two shards merged give the superfluid fractions and summary entry of the single run', async () => {
    const { path } = scenarioFile('sharded', 0.02, 1.0);
    const single = join(dir, 'sharded-single');
    expect((await ensemble(path, single, 4)).code).toBe(0);
    const shards = join(dir, 'sharded-shards');
    for (const k of [0, 1]) expect((await ensemble(path, shards, 4, { shard: `${k}/2` })).code).toBe(0);
    const merged = join(dir, 'sharded-merged');
    const o = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    const e = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    try {
      expect(await runMergeCommand([shards], { out: merged, quiet: true })).toBe(0);
    } finally {
      o.mockRestore();
      e.mockRestore();
    }
    expect(readFileSync(join(merged, 'realisations.csv'), 'utf8')).toBe(readFileSync(join(single, 'realisations.csv'), 'utf8'));
    const a = JSON.parse(readFileSync(join(single, 'summary.json'), 'utf8')).results.superfluidFraction;
    const b = JSON.parse(readFileSync(join(merged, 'summary.json'), 'utf8')).results.superfluidFraction;
    expect(b).toEqual(a);
  });

  it('without solver.stiffness there is no superfluid column and no summary entry', async () => {
    const { path } = scenarioFile('off', 0.05, 0.2);
    const raw = JSON.parse(readFileSync(path, 'utf8'));
    raw.solver.stiffness = false;
    writeFileSync(path, JSON.stringify(raw));
    const out = join(dir, 'off');
    expect((await ensemble(path, out, 2)).code).toBe(0);
    expect(readFileSync(join(out, 'realisations.csv'), 'utf8').split('\n')[0]).not.toContain('superfluid_fraction');
    expect(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')).results.superfluidFraction).toBeUndefined();
  });
});

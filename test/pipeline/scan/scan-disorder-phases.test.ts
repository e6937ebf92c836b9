// `scan --realisations` and the phase by stiffness (src/pipeline/scan/stiffnessPhase.ts):
// the disorder phase map of Mott insulator, Bose glass and superfluid.
//
// What each check is measured against:
// - J -> 0 (1e-9 U; the schema needs J > 0), box disorder of width W = 0.6 U: the site problems decouple, n_i = ceil(mu - eps_i)
//   with eps_i uniform in [-W/2, W/2], so the lattice is a Mott insulator (every site n = 1,
//   dn/dmu = 0) exactly inside the window W/2 < mu < U - W/2 and a compressible insulator
//   with zero superfluid fraction, a Bose glass, outside it (Fisher, Weichman, Grinstein &
//   Fisher, PRB 40, 546 (1989)).
// - Clean lattice (W = 0) at mu = 0.5 U: the mean-field n = 1 lobe boundary
//   zJ_c/U = (1 - mu)(mu)/(1 + mu) = 1/6, J_c = 0.0417 U for z = 4 (van Oosten, van der
//   Straten & Stoof, PRA 63, 053601 (2001)): Mott below, superfluid above.
// - R realisations per point: the row's superfluid fraction and condensate fraction are the
//   means of R separate solves with seeds "<seed>/r" (the ensemble rule), the spread their
//   sample standard deviation sqrt(sum (x - mean)^2 / (R - 1)) (textbook two-pass formulas),
//   the shares the label counts over R; two shards merged give the bytes of one run.
import { afterAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runScanCommand } from '../../../src/cli/commands/scan.js';
import { runMergeCommand } from '../../../src/cli/commands/merge.js';
import { prepareScenario } from '../../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../../src/pipeline/solveScenario.js';
import { scanRowOf } from '../../../src/pipeline/scan/scanRow.js';
import { overrideFor } from '../../../src/pipeline/scan/scanPoint.js';
import { InputError } from '../../../src/scenario/inputError.js';
import { PhaseCode } from '../../../src/observables/phaseCodes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scan-glass-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function scenarioFile(name: string, hopping: number, width: number, disorder = true): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(
    path,
    JSON.stringify({
      name,
      energyUnit: 'U',
      truncation: { nmax: 4 },
      lattice: { shape: [8, 8], boundary: 'periodic' },
      hubbard: { hopping },
      ...(disorder ? { disorder: { kind: 'box', width, seed: 'glassmap' } } : {}),
      particles: { chemicalPotential: 0.5 },
      solver: { tolerance: 1e-10, stiffness: true },
    }),
  );
  return path;
}

async function scan(scenario: string, out: string, options: Record<string, unknown>): Promise<number> {
  const o = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  const e = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
  try {
    return await runScanCommand(scenario, { threads: '1', quiet: true, out, ...options }, {});
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

function csvRows(folder: string): Array<Record<string, number>> {
  const lines = readFileSync(join(folder, 'scan.csv'), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  return lines.slice(1).map((l) => Object.fromEntries(l.split(',').map((v, k) => [header[k], v === 'nan' ? NaN : Number(v)])));
}

describe('phase by stiffness', () => {
  it('J -> 0, box W = 0.6: Mott exactly inside W/2 < mu < U - W/2, Bose glass outside', async () => {
    const scenario = scenarioFile('atomic', 1e-9, 0.6);
    const out = join(dir, 'atomic');
    const mus = [0.1, 0.25, 0.35, 0.5, 0.65, 0.75, 0.9];
    expect(await scan(scenario, out, { vary: [`particles.chemicalPotential=${mus.join(',')}`] })).toBe(0);
    const rows = csvRows(out);
    for (const r of rows) {
      const mu = r['particles.chemicalPotential'];
      const inside = mu > 0.3 && mu < 0.7;
      expect(r.stiffness_phase, `mu = ${mu}`).toBe(inside ? PhaseCode.mott : PhaseCode.boseGlass);
      expect(r.superfluid_fraction).toBeLessThan(1e-6);
      expect(r.realisations).toBe(1);
      expect(r.mott_share + r.bose_glass_share + r.superfluid_share + r.normal_fluid_share).toBe(1);
    }
  });

  it('clean lattice at mu = U/2: Mott below the mean-field lobe boundary J_c = U/24, superfluid above', async () => {
    const scenario = scenarioFile('clean', 0.02, 0);
    const out = join(dir, 'clean');
    const hoppings = [0.02, 0.035, 0.05, 0.07];
    expect(await scan(scenario, out, { vary: [`hubbard.hopping=${hoppings.join(',')}`] })).toBe(0);
    const jc = (0.5 * 0.5) / 1.5 / 4;
    for (const r of csvRows(out)) {
      const j = r['hubbard.hopping'];
      expect(r.stiffness_phase, `J = ${j}`).toBe(j < jc ? PhaseCode.mott : PhaseCode.superfluid);
      if (j < jc) expect(r.compressibility_per_site).toBeLessThan(1e-9);
    }
  });
});

describe('scan --realisations', () => {
  it('rows are the means of separate solves per seed, spread two-pass, shards merge to the same bytes', async () => {
    const scenario = scenarioFile('glass', 0.02, 1.2);
    const out = join(dir, 'glass');
    const R = 3;
    const vary = ['disorder.width=0.4,1.2', 'hubbard.hopping=0.005,0.03'];
    expect(await scan(scenario, out, { vary, realisations: String(R) })).toBe(0);
    const rows = csvRows(out);
    expect(rows).toHaveLength(4);
    for (const row of rows) {
      expect(row.realisations).toBe(R);
      const w = row['disorder.width'];
      const j = row['hubbard.hopping'];
      const alone = [];
      for (let r = 0; r < R; r++) {
        const prepared = prepareScenario(scenario, [overrideFor('disorder.width', w), overrideFor('hubbard.hopping', j), `disorder.seed=glassmap/${r}`]);
        alone.push(scanRowOf(0, [w, j], await solveScenario(prepared, { threads: 1 }), false));
      }
      const fs = alone.map((a) => a.superfluidFraction);
      const mean = fs.reduce((a, b) => a + b, 0) / R;
      const spread = Math.sqrt(fs.reduce((a, b) => a + (b - mean) ** 2, 0) / (R - 1));
      expect(Math.abs(row.superfluid_fraction - mean)).toBeLessThan(1e-12);
      expect(Math.abs(row.superfluid_fraction_spread - spread)).toBeLessThan(1e-12);
      const cf = alone.reduce((a, b) => a + b.condensateFraction, 0) / R;
      expect(Math.abs(row.condensate_fraction - cf)).toBeLessThan(1e-12);
      const boseGlass = alone.filter((a) => a.stiffnessPhase === 'boseGlass').length;
      expect(row.bose_glass_share).toBeCloseTo(boseGlass / R, 15);
    }
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.realisationsPerPoint).toBe(R);
    expect(summary.stiffnessPhaseRule.superfluidFractionMin).toBeGreaterThan(0);
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain('Phase by stiffness on a finite lattice');

    const shards = join(dir, 'glass-shards');
    for (const k of [0, 1]) expect(await scan(scenario, shards, { vary, realisations: String(R), chainLength: '2', shard: `${k}/2` })).toBe(0);
    const single = join(dir, 'glass-chains');
    expect(await scan(scenario, single, { vary, realisations: String(R), chainLength: '2' })).toBe(0);
    const merged = join(dir, 'glass-merged');
    const o = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    const e = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    try {
      expect(await runMergeCommand([shards], { out: merged, quiet: true })).toBe(0);
    } finally {
      o.mockRestore();
      e.mockRestore();
    }
    expect(readFileSync(join(merged, 'scan.csv'), 'utf8')).toBe(readFileSync(join(single, 'scan.csv'), 'utf8'));
    // realisations are solved cold, so the chain length does not change a bit either
    expect(readFileSync(join(single, 'scan.csv'), 'utf8')).toBe(readFileSync(join(out, 'scan.csv'), 'utf8'));
  });

  it('refuses --realisations without a disorder block, naming the option', async () => {
    const scenario = scenarioFile('plain', 0.02, 0, false);
    await expect(scan(scenario, join(dir, 'plain'), { vary: ['hubbard.hopping=0.01,0.02'], realisations: '4' })).rejects.toThrow(InputError);
    await expect(scan(scenario, join(dir, 'plain'), { vary: ['hubbard.hopping=0.01,0.02'], realisations: '4' })).rejects.toThrow(/--realisations: the scenario has no disorder block/);
  });
});

// `tiercake scan` (issue 16, "Scans"), shards and merge, resumption.
//
// What each check is measured against:
// - Every scan row against a separate cold solve at that point (solveScenario with the
//   point's value as a --set override, no warm start): the scan's promise that a warm start
//   changes the answer by no more than the solver's tolerances. Tolerances, from the
//   scenario's settings: atom number at fixed N to 2e-6 relative (two solves, each within
//   solver.atomTolerance = 1e-6); at fixed mu the atoms and condensed atoms to 1e-6
//   relative (phi converged to 1e-8 per site); mu to 1e-5 U; k_B T at fixed entropy to
//   5e-6 relative (the search stops at 1e-9 relative in S/N, but S/N is taken at an N
//   known to 1e-6 relative in each of the two solves, and T inherits that with the factor
//   (d ln S / d ln T)^-1, about 1 here); site labels and shell sizes
//   exactly (the labels sit far from their thresholds at these points).
// - Merged shards against the single run, byte for byte (scanPlan.ts: chains fixed by the
//   scan, shards hold whole chains), and a resumed run against an uninterrupted one, byte
//   for byte (runScan.ts: the chain continues from the stored solutions).
import { afterAll, describe, expect, it, vi } from 'vitest';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runScanCommand, type ScanHooks } from '../../../src/cli/commands/scan.js';
import { runMergeCommand } from '../../../src/cli/commands/merge.js';
import { runEnsembleCommand } from '../../../src/cli/commands/ensemble.js';
import { prepareScenario } from '../../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../../src/pipeline/solveScenario.js';
import { scanRowOf } from '../../../src/pipeline/scan/scanRow.js';
import { overrideFor } from '../../../src/pipeline/scan/scanPoint.js';
import { ExitCode, InputError } from '../../../src/scenario/inputError.js';
import { phaseNames } from '../../../src/observables/phaseCodes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scan-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function scenarioFile(name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 5 }, ...body }));
  return path;
}

/** A 2D layer with an n = 1 Mott shell that shrinks as J grows. */
const layer = {
  lattice: { shape: [30, 30] },
  hubbard: { hopping: 0.02 },
  trap: { coefficient: 0.01 },
  particles: { atoms: 420 },
};
const fixedN = scenarioFile('fixed-n', layer);
const fixedMu = scenarioFile('fixed-mu', { ...layer, particles: { chemicalPotential: 1.2 } });
const fixedS = scenarioFile('fixed-s', { ...layer, temperature: { entropyPerAtom: 0.1 }, solver: { compressibility: false } });

/** Runs a command quietly; InputErrors come back as exit code 2 with their message. */
async function quietly(run: () => Promise<number>): Promise<{ code: number; message: string; stderr: string }> {
  let stderr = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => {
    stderr += String(chunk);
    return true;
  });
  try {
    return { code: await run(), message: '', stderr };
  } catch (e) {
    if (e instanceof InputError) return { code: ExitCode.badInput, message: e.message, stderr };
    throw e;
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}

const scan = (scenario: string, out: string, args: Record<string, string | boolean | string[]>, hooks: ScanHooks = {}) =>
  quietly(() => runScanCommand(scenario, { threads: '1', quiet: true, out, ...args }, hooks));

function csvRows(folder: string): Array<Record<string, number>> {
  const lines = readFileSync(join(folder, 'scan.csv'), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  return lines.slice(1).map((l) => Object.fromEntries(l.split(',').map((v, k) => [header[k], v === 'nan' ? NaN : Number(v)])));
}

function summaryWithoutProvenance(folder: string): unknown {
  const s = JSON.parse(readFileSync(join(folder, 'summary.json'), 'utf8')) as Record<string, unknown>;
  delete s.provenance;
  return s;
}

async function coldSolve(scenario: string, path: string, value: number) {
  const prepared = prepareScenario(scenario, [overrideFor(path, value)]);
  return scanRowOf(0, [value], await solveScenario(prepared, { threads: 1 }), false);
}

const hopping = { vary: ['hubbard.hopping=0.01:0.035:6'], chainLength: '3' };
const single = join(dir, 'single');

describe('scan rows equal separate solves', () => {
  it('fixed N: hopping scan, every row against a cold solve at that hopping', async () => {
    expect((await scan(fixedN, single, hopping)).code).toBe(0);
    const rows = csvRows(single);
    expect(rows.map((r) => r['hubbard.hopping'])).toEqual([0.01, 0.015, 0.02, 0.025, 0.03, 0.035]);
    expect(rows.map((r) => r.warm_start)).toEqual([0, 1, 1, 0, 1, 1]);
    expect(rows.every((r) => r.converged === 1)).toBe(true);
    // The n = 1 shell exists at small J and shrinks as J grows (the Mott lobe closes).
    expect(rows[0].shell_1_sites).toBeGreaterThan(rows[3].shell_1_sites);
    for (const r of rows) {
      const cold = await coldSolve(fixedN, 'hubbard.hopping', r['hubbard.hopping']);
      expect(Math.abs(r.atoms - cold.atoms) / cold.atoms).toBeLessThan(2e-6);
      expect(Math.abs(r.chemical_potential - cold.chemicalPotential)).toBeLessThan(1e-5);
      expect(Math.abs(r.condensed_atoms - cold.condensedAtoms) / cold.atoms).toBeLessThan(2e-5);
      expect(Math.abs(r.central_density - cold.centralDensity)).toBeLessThan(1e-5);
      phaseNames.forEach((p, c) => expect(r[`${p.replace(/[A-Z]/g, (x) => `_${x.toLowerCase()}`)}_sites`]).toBe(cold.phaseSites[c]));
      const shell = cold.shells.find((s) => s.filling === 1);
      expect(r.shell_1_sites).toBe(shell?.sites ?? 0);
      if (shell) expect(r.shell_1_outer_radius).toBe(shell.outerRadius);
    }
  });

  it('fixed mu and fixed entropy per atom', async () => {
    const mu = join(dir, 'mu');
    expect((await scan(fixedMu, mu, { vary: ['hubbard.hopping=0.012,0.02,0.028'] })).code).toBe(0);
    for (const r of csvRows(mu)) {
      const cold = await coldSolve(fixedMu, 'hubbard.hopping', r['hubbard.hopping']);
      expect(Math.abs(r.atoms - cold.atoms) / cold.atoms).toBeLessThan(1e-6);
      expect(Math.abs(r.condensed_atoms - cold.condensedAtoms) / cold.atoms).toBeLessThan(1e-6);
      expect(r.superfluid_sites).toBe(cold.phaseSites[1]);
      expect(r.mott_sites).toBe(cold.phaseSites[2]);
    }
    const s = join(dir, 'entropy');
    expect((await scan(fixedS, s, { vary: ['hubbard.hopping=0.012,0.016,0.02'] })).code).toBe(0);
    for (const r of csvRows(s)) {
      const cold = await coldSolve(fixedS, 'hubbard.hopping', r['hubbard.hopping']);
      expect(r.temperature).toBeGreaterThan(0);
      expect(Math.abs(r.temperature - cold.temperature) / cold.temperature).toBeLessThan(5e-6);
      expect(Math.abs(r.entropy_per_atom - 0.1)).toBeLessThan(1e-7);
      expect(Math.abs(r.atoms - 420) / 420).toBeLessThan(2e-6);
    }
  });
});

describe('scan shards and merge', () => {
  const shards = join(dir, 'shards');
  it('K = 3 shards (one without work) merge into the bytes of the single run', async () => {
    for (const k of [0, 1, 2]) expect((await scan(fixedN, shards, { ...hopping, shard: `${k}/3` })).code).toBe(0);
    expect(readdirSync(shards).sort()).toEqual(['shard-0-of-3', 'shard-1-of-3', 'shard-2-of-3']);
    const merged = join(dir, 'merged');
    expect((await quietly(() => runMergeCommand([shards], { out: merged, quiet: true }))).code).toBe(0);
    expect(readFileSync(join(merged, 'scan.csv')).equals(readFileSync(join(single, 'scan.csv')))).toBe(true);
    expect(summaryWithoutProvenance(merged)).toEqual(summaryWithoutProvenance(single));
    expect(existsSync(join(merged, 'report.html'))).toBe(true);
  });

  it('refuses a missing shard and a foreign one, naming them; accepts the shard run again', async () => {
    const partial = [join(shards, 'shard-0-of-3'), join(shards, 'shard-2-of-3')];
    const missing = await quietly(() => runMergeCommand(partial, { out: join(dir, 'm-missing') }));
    expect(missing.code).toBe(2);
    expect(missing.message).toMatch(/shard 1 of 3 \(folder shard-1-of-3\) is missing: chain 0 of the scan.s 2 \(scenario [0-9a-f]{12}/);
    const other = join(dir, 'other-shards');
    expect((await scan(fixedN, other, { ...hopping, shard: '1/3', set: ['particles.atoms=400'] })).code).toBe(0);
    const foreign = await quietly(() => runMergeCommand([...partial, join(other, 'shard-1-of-3')], { out: join(dir, 'm-foreign') }));
    expect(foreign.code).toBe(2);
    expect(foreign.message).toMatch(/shard 1 of 3 \(".*other-shards\/shard-1-of-3", scenario [0-9a-f]{12}\) belongs to a different scan/);
    expect(foreign.message).toMatch(/scenario \(SHA-256 of the scenario as run\)/);
    // the same shard solved again (a resubmitted task) replaces its folder and merges
    expect((await scan(fixedN, shards, { ...hopping, shard: '1/3' })).code).toBe(0);
    expect((await quietly(() => runMergeCommand([shards], { out: join(dir, 'merged-again'), quiet: true }))).code).toBe(0);
    expect(readFileSync(join(dir, 'merged-again', 'scan.csv')).equals(readFileSync(join(single, 'scan.csv')))).toBe(true);
    // scan and ensemble shards are never mixed
    const ensembleScenario = scenarioFile('ens', { ...layer, lattice: { shape: [8, 8] }, disorder: { kind: 'box', width: 0.2, seed: 's' }, particles: { chemicalPotential: 0.5 } });
    const ens = join(dir, 'ens-shards');
    expect((await quietly(() => runEnsembleCommand(ensembleScenario, { realisations: '2', shard: '0/1', threads: '1', quiet: true, out: ens }))).code).toBe(0);
    const mixed = await quietly(() => runMergeCommand([shards, join(ens, 'shard-0-of-1')], { out: join(dir, 'm-mixed') }));
    expect(mixed.code).toBe(2);
    expect(mixed.message).toMatch(/is not a scan shard/);
  });
});

describe('resuming an interrupted scan', () => {
  it('exit 130 with the points kept; the same command finishes with the bytes of an uninterrupted run', async () => {
    const out = join(dir, 'resumed');
    // interrupted in the middle of chain 0 (2 of its 3 points done)
    const first = await scan(fixedN, out, hopping, { interrupt: (finished) => finished >= 2 });
    expect(first.code).toBe(ExitCode.interrupted);
    expect(existsSync(out)).toBe(false);
    const points = readdirSync(join(`${out}.partial`, 'points')).sort();
    expect(points).toEqual(['point-000000.json', 'point-000000.phi.npy', 'point-000001.json', 'point-000001.phi.npy']);
    // a different scan does not mix with these points
    const other = await scan(fixedN, out, { ...hopping, chainLength: '2' });
    expect(other.code).toBe(2);
    expect(other.message).toMatch(/holds the partial results of a different scan/);
    const second = await quietly(() => runScanCommand(fixedN, { threads: '1', out, ...hopping }));
    expect(second.code).toBe(0);
    expect(second.stderr).toMatch(/continuing from .*resumed\.partial: 2 points already done/);
    expect(readFileSync(join(out, 'scan.csv')).equals(readFileSync(join(single, 'scan.csv')))).toBe(true);
    expect(existsSync(`${out}.partial`)).toBe(false);
  });
});

describe('two axes, output files, kept points', () => {
  it('a 3 x 3 map: snake order, maps, columns described in summary.json', async () => {
    const out = join(dir, 'map');
    expect((await scan(fixedMu, out, { vary: ['hubbard.hopping=0.01:0.03:3', 'trap.coefficient=0.008,0.01,0.012'], chainLength: '9' })).code).toBe(0);
    const rows = csvRows(out);
    expect(rows.map((r) => [r['hubbard.hopping'], r['trap.coefficient']])).toEqual([
      [0.01, 0.008], [0.01, 0.01], [0.01, 0.012], [0.02, 0.008], [0.02, 0.01], [0.02, 0.012], [0.03, 0.008], [0.03, 0.01], [0.03, 0.012],
    ]);
    expect(rows.filter((r) => r.warm_start === 0).length).toBe(1);
    const header = readFileSync(join(out, 'scan.csv'), 'utf8').split('\n')[0].split(',');
    const summary = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    expect(summary.columns.map((c: { name: string }) => c.name)).toEqual(header);
    for (const need of ['atoms', 'chemical_potential', 'condensed_atoms', 'condensate_fraction', 'entropy', 'sweeps', 'superfluid_sites', 'bose_glass_sites', 'shell_1_inner_radius', 'shell_1_outer_radius', 'converged']) {
      expect(header).toContain(need);
    }
    expect(summary.columns.find((c: { name: string }) => c.name === 'shell_1_outer_radius').unit).toBe('sites');
    expect(summary.columns.find((c: { name: string }) => c.name === 'chemical_potential').unit).toBe('U');
    expect(readdirSync(join(out, 'images')).sort()).toEqual(['scan_map_cloud.png', 'scan_map_phases.png']);
    // characteristic density of each row: N V / J in 2D
    for (const r of rows) expect(r.characteristic_density).toBeCloseTo((r.atoms * r['trap.coefficient']) / r['hubbard.hopping'], 9);
  });

  it('--keep-points writes each point as solve would', async () => {
    const out = join(dir, 'kept');
    expect((await scan(fixedMu, out, { vary: ['hubbard.hopping=0.015,0.025'], keepPoints: true })).code).toBe(0);
    expect(readdirSync(join(out, 'points')).sort()).toEqual(['point-000000', 'point-000001']);
    const summary = JSON.parse(readFileSync(join(out, 'points', 'point-000001', 'summary.json'), 'utf8'));
    expect(JSON.stringify(summary)).toContain('0.025');
    expect(existsSync(join(out, 'points', 'point-000001', 'report.html'))).toBe(true);
  });
});

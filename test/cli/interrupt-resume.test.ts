// No lost work: SIGTERM during a solve stops cleanly with exit code 130, writes a checkpoint
// and no output folder; `--resume` continues from it and gives the same result (to the
// solver tolerance) as an uninterrupted run. A worker that cannot start is reported, not hung.
import { describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { decodeNpy } from '../../src/formats/npy.js';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel } from '../../src/lattice/latticeModel.js';
import { createSolverState } from '../../src/solver/solverState.js';
import { createSweepExecutor, createSweepPool } from '../../src/solver/sweepExecutor.js';
import { solveLattice } from '../../src/solver/latticeSolve.js';

const cli = fileURLToPath(new URL('../../dist/main.js', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'tiercake-resume-'));
const scenario = join(dir, 'resume.json');
writeFileSync(
  scenario,
  JSON.stringify({
    name: 'resume-test',
    energyUnit: 'U',
    lattice: { shape: [40, 40, 40] },
    hubbard: { hopping: 0.0065 },
    trap: { coefficient: 0.004 },
    particles: { atoms: 40000 },
    solver: { tolerance: 1e-10, atomTolerance: 1e-9 },
  }),
);

function run(args: string[]) {
  return spawnSync(process.execPath, [cli, 'solve', scenario, '--threads', '2', ...args], { encoding: 'utf8' });
}

describe('interrupt and resume', () => {
  it('SIGTERM writes a checkpoint and nothing else; --resume reproduces the uninterrupted result', async () => {
    const out = join(dir, 'interrupted');
    const child = spawn(process.execPath, [cli, 'solve', scenario, '--threads', '2', '--out', out, '--json-progress']);
    let lines = 0;
    let stderr = '';
    const exit = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
    child.stderr.on('data', (chunk: Buffer) => {
      stderr += chunk.toString();
      lines = stderr.split('\n').filter((l) => l.startsWith('{')).length;
      if (lines >= 8 && !child.killed) child.kill('SIGTERM');
    });
    const code = await exit;
    expect(code).toBe(130);
    expect(stderr).toContain('checkpoint written');
    expect(existsSync(out)).toBe(false);
    expect(existsSync(`${out}.checkpoint/checkpoint.json`)).toBe(true);

    const resumed = run(['--out', out, '--resume', '--quiet']);
    expect(resumed.status).toBe(0);
    expect(existsSync(`${out}.checkpoint`)).toBe(false);

    const direct = join(dir, 'direct');
    expect(run(['--out', direct, '--quiet']).status).toBe(0);
    const a = JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
    const b = JSON.parse(readFileSync(join(direct, 'summary.json'), 'utf8'));
    expect(Math.abs(a.results.atoms - b.results.atoms)).toBeLessThan(1e-6 * 40000);
    expect(Math.abs(a.parameters.chemicalPotential.U - b.parameters.chemicalPotential.U)).toBeLessThan(1e-7);
    const da = decodeNpy(readFileSync(join(out, 'fields', 'density.npy'))).data;
    const db = decodeNpy(readFileSync(join(direct, 'fields', 'density.npy'))).data;
    let worst = 0;
    for (let i = 0; i < da.length; i++) worst = Math.max(worst, Math.abs(da[i] - db[i]));
    expect(worst).toBeLessThan(1e-6);
  });

  it('a worker thread that cannot start is reported as an error, not a hang', async () => {
    const pool = createSweepPool({ workers: 1, filename: new URL('./no-such-worker.mjs', import.meta.url).href });
    const g = createLatticeGeometry([64, 64], [false, false]);
    const model = uniformModel(g, 1, 0.05, 5);
    const state = createSolverState(model, new Float64Array(g.siteCount).fill(0.3));
    await expect(
      solveLattice(model, state, createSweepExecutor(state, pool, 2), { mode: { kind: 'mu', mu: 0.5 }, temperature: 0, tolerance: 1e-8, maxSweeps: 10, accelerate: true }),
    ).rejects.toThrow(/worker/);
    await pool.destroy();
  });
});

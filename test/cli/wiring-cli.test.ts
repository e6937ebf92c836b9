// Command-line behaviour a user meets (issue 13, "small things a user trips on"), through
// runCli in this process with stdout and stderr captured:
// - `check` lists the scenario's landscape terms (with the SHA-256 of their files) and the
//   notes of --set switches;
// - `ensemble` reads landscape files relative to the scenario in every realisation (not the
//   working folder), its hash covers the files' contents, and its progress advances during
//   a realisation, not only after it;
// - `hubbard --power-w` shows the laser-safety caution once per output folder (recorded in
//   the folder's marker), and on every run without --out;
// - hints print a command that works (commandPrefix: `tiercake` only when it is on PATH).

import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { commandPrefix } from '../../src/cli/invocation.js';
import { encodeNpy } from '../../src/formats/npy.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';
import { loadScenario } from '../../src/scenario/loadScenario.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-wiring-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function cli(argv: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((chunk) => {
    stdout += String(chunk);
    return true;
  });
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => {
    stderr += String(chunk);
    return true;
  });
  try {
    return { code: await runCli(argv), stdout, stderr };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

/** A disorder scenario in its own folder with a per-site landscape file beside it. */
function landscapeScenario(folder: string, tilt: number): string {
  const where = join(dir, folder);
  mkdirSync(where, { recursive: true });
  const shape = [12, 12];
  const eps = Float64Array.from({ length: 144 }, (_, i) => tilt * ((i % 12) - 5.5));
  writeFileSync(join(where, 'tilt.npy'), encodeNpy(eps, shape));
  const path = join(where, 'scenario.json');
  writeFileSync(
    path,
    JSON.stringify({
      name: 'tilted-box',
      energyUnit: 'U',
      lattice: { shape },
      hubbard: { hopping: 0.03 },
      trap: { coefficient: 0.05 },
      disorder: { kind: 'box', width: 0.2, seed: 'tilted' },
      landscape: [{ kind: 'sites', name: 'tilt', file: 'tilt.npy' }],
      particles: { chemicalPotential: 0.6 },
      truncation: { nmax: 4 },
    }),
  );
  return path;
}

describe('check', () => {
  it('lists the landscape terms and the notes of the overrides', async () => {
    const path = landscapeScenario('check', 0.01);
    const run = await cli(['check', path, '--set', 'particles.atoms=20']);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/landscape\s+1 term/);
    expect(run.stdout).toMatch(/\[0\] tilt \(sites\): -0\.055\d* \.\. 0\.055\d* U; file tilt\.npy \(sha256 [0-9a-f]{12}\.\.\.\)/);
    expect(run.stdout).toContain('note: --set particles.atoms replaces particles.chemicalPotential');
    expect(run.stdout).toMatch(/atoms\s+20/);
  });
});

describe('ensemble', () => {
  it('reads landscape files next to the scenario from any working folder, hashes their contents, and shows progress during a realisation', async () => {
    const path = landscapeScenario('ensemble', 0.01);
    const out = join(dir, 'ensemble-out');
    // The working folder of this process is not the scenario's folder, so a path taken
    // relative to it would not find tilt.npy.
    const run = await cli(['ensemble', path, '-n', '2', '--threads', '1', '--out', out, '--json-progress']);
    expect(run.code).toBe(0);
    const progress = run.stderr
      .split('\n')
      .filter((l) => l.startsWith('{'))
      .map((l) => JSON.parse(l) as { stage: string; sweep: number; fraction?: number; detail?: string });
    // Progress before the first realisation is done, with sweeps counting up.
    const during = progress.filter((p) => p.stage === 'realisation 1/2' && p.sweep > 0);
    expect(during.length).toBeGreaterThan(1);
    expect(during.at(-1)!.sweep).toBeGreaterThan(during[0].sweep);
    expect(progress.some((p) => p.stage === 'realisation 2/2' && /blocks 1 of 1 done/.test(p.detail ?? ''))).toBe(true);
    // realisations.csv describes the spanning rule in use (bulk, enclosing the centre), in its CSVW metadata.
    const meta = JSON.parse(readFileSync(join(out, 'realisations.csv-metadata.json'), 'utf8'));
    const spans = meta.tableSchema.columns.find((c: { name: string }) => c.name === 'superfluid_spans');
    expect(spans['dc:description']).toMatch(/spans the bulk of the cloud.*encloses the trap centre/);
    expect(readFileSync(join(out, 'realisations.csv'), 'utf8').startsWith('realisation,converged,')).toBe(true);
    // The marker's hash covers the file: a different tilt file gives a different hash.
    const marker = readMarker(out) as { scenarioHash: string };
    const plain = scenarioHash(loadScenario(path).scenario);
    expect(marker.scenarioHash).not.toBe(plain);
    landscapeScenario('ensemble', 0.02);
    const again = join(dir, 'ensemble-out-2');
    expect((await cli(['ensemble', path, '-n', '2', '--threads', '1', '--out', again, '--quiet'])).code).toBe(0);
    expect((readMarker(again) as { scenarioHash: string }).scenarioHash).not.toBe(marker.scenarioHash);
  });
});

describe('hubbard --power-w: the laser caution once per output folder', () => {
  const argv = ['hubbard', '--species', '87Rb', '--wavelength-nm', '1064', '--depth', '10', '--power-w', '0.5', '--waist-um', '100'];
  it('shows it for a new folder, records it in the marker, and not again for the same folder', async () => {
    const out = join(dir, 'hubbard-out');
    const first = await cli([...argv, '--out', out]);
    expect(first.stdout).toContain('CAUTION:');
    expect((readMarker(out) as { cautions?: string[] }).cautions).toEqual(['laser-safety']);
    expect(readFileSync(join(out, 'hubbard.txt'), 'utf8')).toContain('CAUTION:');
    const second = await cli([...argv, '--out', out]);
    expect(second.code).toBe(0);
    expect(second.stdout).not.toContain('CAUTION:');
    expect(readFileSync(join(out, 'hubbard.txt'), 'utf8')).toContain('CAUTION:');
    // Without a folder there is nowhere to keep it: shown every time.
    expect((await cli(argv)).stdout).toContain('CAUTION:');
    // hubbard.csv comes with its CSV-on-the-Web metadata.
    const meta = JSON.parse(readFileSync(join(out, 'hubbard.csv-metadata.json'), 'utf8'));
    expect(meta.tableSchema.columns.map((c: { name: string }) => c.name)).toEqual(readFileSync(join(out, 'hubbard.csv'), 'utf8').split('\n')[0].split(','));
    expect(meta.tableSchema.columns.find((c: { name: string }) => c.name === 'U_Hz')['schema:unitText']).toBe('Hz');
  });
});

describe('hints name a command that works', () => {
  it('node and the script path from the user\'s folder, unless tiercake is on PATH', () => {
    const repo = join(dir, 'repo');
    mkdirSync(join(repo, 'dist'), { recursive: true });
    writeFileSync(join(repo, 'dist', 'main.js'), '');
    // npm run demo: the script runs in the package folder; INIT_CWD is where the user typed it.
    expect(commandPrefix({ script: join(repo, 'dist', 'main.js'), env: { INIT_CWD: repo }, cwd: repo })).toBe('node dist/main.js');
    expect(commandPrefix({ script: join(repo, 'dist', 'main.js'), env: {}, cwd: join(repo, 'dist') })).toBe('node main.js');
    // From elsewhere: the absolute path.
    expect(commandPrefix({ script: join(repo, 'dist', 'main.js'), env: {}, cwd: join(dir, 'elsewhere') })).toBe(`node ${join(repo, 'dist', 'main.js')}`);
    // A tiercake link: the bare name only if its folder is on PATH.
    const bin = join(dir, 'bin');
    mkdirSync(bin, { recursive: true });
    symlinkSync(join(repo, 'dist', 'main.js'), join(bin, 'tiercake'));
    expect(commandPrefix({ script: join(bin, 'tiercake'), env: { PATH: `/usr/bin:${bin}` }, cwd: repo })).toBe('tiercake');
    expect(commandPrefix({ script: join(bin, 'tiercake'), env: { PATH: '/usr/bin' }, cwd: bin })).toBe('node tiercake');
  });

  it('the usage lines of the built program, run as node dist/main.js from the package folder, say so', () => {
    const root = fileURLToPath(new URL('../..', import.meta.url));
    const help = execFileSync(process.execPath, ['dist/main.js', '--help'], { cwd: root, encoding: 'utf8', env: { ...process.env, INIT_CWD: '' } });
    expect(help).toMatch(/^Usage: node dist\/main\.js \[options\] \[command\]/);
  });
});

// `tiercake evolve` end to end (in this process through runCli, and as a child process of the
// built tool where worker threads or signals are involved). Checks against outside references:
//   - quench of a trapped superfluid to J = 0: sum_i |phi_i|^2 collapses and revives with the
//     period h/U = 2 pi hbar/U (Greiner, Mandel, Hansch & Bloch, Nature 419, 51 (2002); at J = 0
//     every site evolves as c_n e^{-i E_n t}, so |phi_i|^2 is periodic in 2 pi/U exactly);
//   - a slow hopping ramp into the Mott regime ends close to the final ground state and a fast
//     one does not (adiabatic theorem; numbers in the test names' comments);
//   - laboratory mode: a depth ramp in ms and E_r ends at the J and U `tiercake hubbard` tabulates;
//   - modulation spectrum of a uniform superfluid: the absorption peaks at the k = 0 amplitude
//     mode of the linearised Gutzwiller equations (ml-matrix eigenvalues,
//     test/dynamics/linearisedSpectrum.ts), which checks the frequency units; a mean-field Mott
//     insulator absorbs nothing (phi = 0 is stationary: the caveat the report states);
//   - 1 and 2 threads write identical files; SIGINT exits 130 and writes nothing; bad input exits 2.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it, vi } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { staticGroundState } from '../../src/dynamics/staticGround.js';
import { uniformPeriodic } from '../dynamics/fixtures.js';
import { linearisedFrequencies } from '../dynamics/linearisedSpectrum.js';

const cli = fileURLToPath(new URL('../../dist/main.js', import.meta.url));
const root = mkdtempSync(join(tmpdir(), 'tiercake-evolve-'));
let counter = 0;

function scenarioFile(body: Record<string, unknown>): string {
  const file = join(root, `scenario-${++counter}.json`);
  writeFileSync(file, JSON.stringify(body));
  return file;
}

async function quiet(argv: string[]): Promise<{ code: number; stderr: string; stdout: string }> {
  let stderr = '';
  let stdout = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((c: string | Uint8Array) => ((stdout += String(c)), true));
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((c: string | Uint8Array) => ((stderr += String(c)), true));
  try {
    return { code: await runCli(argv), stderr, stdout };
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}

function readCsv(file: string): { names: string[]; column: (name: string) => number[] } {
  const [header, ...rows] = readFileSync(file, 'utf8').trim().split('\n');
  const names = header.split(',');
  const values = rows.map((r) => r.split(',').map((v) => (v === 'nan' ? NaN : Number(v))));
  return { names, column: (name) => values.map((r) => r[names.indexOf(name)]) };
}

const summaryOf = (dir: string): Record<string, any> => JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8'));

function runChild(argv: string[], onStderr?: (text: string, kill: (signal: NodeJS.Signals) => void) => void): Promise<{ code: number | null; signal: string | null; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [cli, ...argv], { stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, NO_COLOR: '1' } });
    let stderr = '';
    child.stderr.on('data', (d: Buffer) => {
      stderr += d.toString('utf8');
      onStderr?.(stderr, (s) => child.kill(s));
    });
    child.stdout.resume();
    child.on('error', reject);
    child.on('close', (code, signal) => resolve({ code, signal, stderr }));
  });
}

const trappedLayer = (extra: Record<string, unknown>): Record<string, unknown> => ({
  name: 'evolve-layer',
  energyUnit: 'U',
  lattice: { shape: [12, 12] },
  hubbard: { hopping: 0.06 },
  trap: { coefficient: 0.03 },
  particles: { chemicalPotential: 1.6 },
  truncation: { nmax: 7 },
  ...extra,
});

describe('tiercake evolve', () => {
  it('quench to J = 0: condensed atoms collapse and revive with period h/U; the quench is named', async () => {
    const step = Math.PI / 20;
    const file = scenarioFile(
      trappedLayer({
        evolution: {
          duration: 4 * Math.PI,
          outputEvery: step,
          ramps: [{ path: 'hubbard.hopping', points: [[0, 0]] }],
          integrator: { absoluteTolerance: 1e-11, relativeTolerance: 1e-11 },
          animationFrames: 6,
        },
      }),
    );
    const out = join(root, 'quench');
    const run = await quiet(['evolve', file, '--out', out, '--quiet']);
    expect(run.code).toBe(0);
    expect(run.stderr).toContain('[quench-at-start]');
    const csv = readCsv(join(out, 'evolution.csv'));
    expect(csv.names.slice(0, 4)).toEqual(['time', 'energy', 'atoms', 'condensed_atoms']);
    for (const name of ['number_variance', 'doublons', 'holes', 'visibility']) expect(csv.names).toContain(name);
    const time = csv.column('time');
    const condensed = csv.column('condensed_atoms');
    const at = (t: number): number => time.findIndex((x) => Math.abs(x - t) < 1e-9);
    const k0 = at(0);
    const kHalf = at(Math.PI);
    const kRevival = at(2 * Math.PI);
    expect(kHalf).toBeGreaterThan(0);
    expect(kRevival).toBeGreaterThan(kHalf);
    // revival at h/U: every |phi_i|^2 is back (the tolerance covers the integrator at 1e-11)
    expect(Math.abs(condensed[kRevival] - condensed[k0]) / condensed[k0]).toBeLessThan(1e-8);
    expect(Math.abs(condensed[at(4 * Math.PI)] - condensed[k0]) / condensed[k0]).toBeLessThan(1e-8);
    // collapse in between
    expect(condensed[kHalf]).toBeLessThan(0.2 * condensed[k0]);
    // the period from the samples alone: the maximum over (pi, 3 pi), refined by a parabola
    let best = kHalf;
    for (let k = kHalf; k < at(3 * Math.PI); k++) if (condensed[k] > condensed[best]) best = k;
    const [a, b, c] = [condensed[best - 1], condensed[best], condensed[best + 1]];
    const peak = time[best] + (0.5 * step * (a - c)) / (a - 2 * b + c);
    expect(Math.abs(peak - 2 * Math.PI)).toBeLessThan(1e-8); // measured 5e-12: the samples are symmetric about the revival
    // atoms conserved, J = 0 recorded, quench in the summary
    const atoms = csv.column('atoms');
    expect(Math.max(...atoms.map((n) => Math.abs(n - atoms[0]) / atoms[0]))).toBeLessThan(1e-9);
    expect(csv.column('hopping').every((j) => j === 0)).toBe(true);
    const summary = summaryOf(out);
    expect(summary.evolution.quenchAtStart).toEqual(['hubbard.hopping']);
    expect(summary.warnings.map((w: { code: string }) => w.code)).toContain('quench-at-start');
    // units sidecar: every column with a unit and a meaning
    const sidecar = JSON.parse(readFileSync(join(out, 'evolution.csv-metadata.json'), 'utf8')).tableSchema;
    expect(sidecar.columns.map((c: { name: string }) => c.name)).toEqual(csv.names);
    for (const col of sidecar.columns) expect(col['schema:unitText'].length * col['dc:description'].length).toBeGreaterThan(0);
    expect(sidecar.columns[0]['schema:unitText']).toBe('ħ/U');
    // report: animation frames, no script
    const html = readFileSync(join(out, 'report.html'), 'utf8');
    expect((html.match(/class="anim-frame anim-frame-/g) ?? []).length).toBe(6);
    expect(html).not.toMatch(/<script/i);
    for (const f of ['snapshots/s00/density.npy', 'snapshots/s02/order_parameter_abs.npy', 'snapshots/s01/parity_odd.npy', 'images/in_situ_s01.png', 'images/momentum_s02.npy', 'fields/reference_mott_filling.npy']) {
      expect(existsSync(join(out, f))).toBe(true);
    }
  });

  // Measured (12 x 12 trap, J 0.08 -> 0.02 U, linear in time): excess energy per atom 0.051 U
  // and 0.32 excess defects per n = 1 shell site after 1 hbar/U; 6.7e-4 U and 0.041 after 100;
  // 1.5e-4 U and 0.017 after 300; 2.1e-5 U and 0.0029 after 1000 (algebraic: the mean-field
  // gap closes at the transition).
  it('a slow ramp into the Mott regime is adiabatic, a fast one is not', async () => {
    const verdicts: Record<string, any> = {};
    for (const tau of [1, 300]) {
      const file = scenarioFile(
        trappedLayer({
          hubbard: { hopping: 0.08 },
          trap: { coefficient: 0.04 },
          particles: { chemicalPotential: 1.4 },
          evolution: { duration: tau, ramps: [{ path: 'hubbard.hopping', points: [[0, 0.08], [tau, 0.02]] }], animationFrames: 0, snapshots: { count: 1 } },
        }),
      );
      const out = join(root, `ramp-${tau}`);
      const run = await quiet(['evolve', file, '--out', out, '--quiet']);
      expect(run.code).toBe(0);
      verdicts[tau] = summaryOf(out).verdict;
    }
    expect(verdicts[300].adiabatic).toBe(true);
    expect(verdicts[1].adiabatic).toBe(false);
    expect(verdicts[300].excessEnergyPerAtomU).toBeLessThan(0.01);
    expect(verdicts[300].excessEnergyPerAtomU).toBeGreaterThan(-1e-9);
    expect(verdicts[1].excessEnergyPerAtomU).toBeGreaterThan(100 * verdicts[300].excessEnergyPerAtomU);
    const shell = (v: any) => v.shells.find((s: { filling: number }) => s.filling === 1);
    expect(shell(verdicts[1]).excessDefectsPerSite).toBeGreaterThan(10 * shell(verdicts[300]).excessDefectsPerSite);
    expect(verdicts[300].meanSiteInfidelity).toBeLessThan(verdicts[1].meanSiteInfidelity);
  });

  it('laboratory mode: a depth ramp in ms and E_r ends at the J and U of `tiercake hubbard`', async () => {
    const file = scenarioFile({
      name: 'evolve-lab',
      energyUnit: 'Hz',
      lattice: { shape: [14, 14] },
      laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 8, transverse: { trapFrequencyHz: 9000 } },
      trap: { frequencyHz: 60 },
      particles: { atoms: 100 },
      truncation: { nmax: 5 },
      evolution: { duration: 4, outputEvery: 0.5, ramps: [{ path: 'laboratory.depthEr', points: [[0, 8], [4, 16]], shape: 's-curve' }], animationFrames: 3 },
    });
    const out = join(root, 'lab');
    expect((await quiet(['evolve', file, '--out', out, '--quiet'])).code).toBe(0);
    const table = join(root, 'hubbard-table');
    expect((await quiet(['hubbard', '--species', '87Rb', '--wavelength-nm', '1064', '--depth', '8:16:2', '--axes', '2', '--confinement-hz', '9000', '--out', table])).code).toBe(0);
    const hub = readCsv(join(table, 'hubbard.csv'));
    const csv = readCsv(join(out, 'evolution.csv'));
    const J = csv.column('hopping');
    const U = csv.column('interaction');
    const last = J.length - 1;
    expect(csv.column('time')[last]).toBe(4);
    expect(Math.abs(J[0] / hub.column('J_Hz')[0] - 1)).toBeLessThan(1e-9);
    expect(Math.abs(U[0] / hub.column('U_Hz')[0] - 1)).toBeLessThan(1e-9);
    expect(Math.abs(J[last] / hub.column('J_Hz')[1] - 1)).toBeLessThan(1e-9);
    expect(Math.abs(U[last] / hub.column('U_Hz')[1] - 1)).toBeLessThan(1e-9);
    const sidecar = JSON.parse(readFileSync(join(out, 'evolution.csv-metadata.json'), 'utf8')).tableSchema;
    expect(sidecar.columns[0]['schema:unitText']).toBe('ms');
    expect(sidecar.columns.find((c: { name: string }) => c.name === 'hopping')['schema:unitText']).toBe('h·Hz');
    expect(existsSync(join(out, 'images/time_of_flight_s02.png'))).toBe(true);
    expect(summaryOf(out).evolution.quenchAtStart).toEqual([]);
  });

  it('modulation spectrum of a uniform superfluid peaks at the amplitude mode; a Mott insulator absorbs nothing', async () => {
    const J = 0.1;
    const mu = 0.5;
    const ground = await staticGroundState({ model: uniformPeriodic([4, 4], J, 6), chemical: { kind: 'mu', mu } });
    const c0 = new Float64Array(7);
    for (let n = 0; n < 7; n++) c0[n] = ground.state.amplitudes[2 * n];
    const omega = linearisedFrequencies(c0, 1, J, mu, 4, 4)[0]; // hbar omega in units of U
    const duration = 80;
    const spacing = (2 * Math.PI * 0.25) / duration; // a quarter of the resolution 1/T, as h f
    const uniform = (hopping: number): Record<string, unknown> => ({
      name: 'evolve-uniform',
      energyUnit: 'U',
      lattice: { shape: [4, 4], boundary: 'periodic' },
      hubbard: { hopping },
      particles: { chemicalPotential: mu },
      truncation: { nmax: 6, automatic: false },
      evolution: {
        duration: 0,
        spectrum: { path: 'hubbard.hopping', relativeAmplitude: 0.002, from: omega - 4 * spacing, to: omega + 4 * spacing, count: 9, duration },
        integrator: { absoluteTolerance: 1e-11, relativeTolerance: 1e-11 },
      },
    });
    const out = join(root, 'spectrum');
    expect((await quiet(['evolve', scenarioFile(uniform(J)), '--out', out, '--quiet'])).code).toBe(0);
    const sp = readCsv(join(out, 'spectrum.csv'));
    const absorbed = sp.column('energy_absorbed');
    const peak = absorbed.indexOf(Math.max(...absorbed));
    expect(peak).toBeGreaterThanOrEqual(3);
    expect(peak).toBeLessThanOrEqual(5);
    expect(absorbed[peak]).toBeGreaterThan(20 * Math.max(absorbed[0], absorbed[8]));
    expect(existsSync(join(out, 'images/spectrum.png'))).toBe(true);
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain('absorbs nothing at U');

    // zJ/U = 0.08 < 0.172 (mean-field n = 1 lobe tip): Mott insulator, phi = 0; modulated at U
    const mott = join(root, 'spectrum-mott');
    const mottScenario = uniform(0.02);
    (mottScenario.evolution as Record<string, any>).spectrum = { path: 'hubbard.hopping', relativeAmplitude: 0.2, frequencies: [0.9, 1, 1.1], duration: 40 };
    expect((await quiet(['evolve', scenarioFile(mottScenario), '--out', mott, '--quiet'])).code).toBe(0);
    for (const e of readCsv(join(mott, 'spectrum.csv')).column('energy_absorbed_per_atom')) expect(Math.abs(e)).toBeLessThan(1e-9);
  });

  it('1 and 2 threads write the same evolution.csv and snapshots bit for bit (worker threads, built tool)', async () => {
    const file = scenarioFile({
      name: 'evolve-threads',
      energyUnit: 'U',
      lattice: { shape: [48, 48] },
      hubbard: { hopping: 0.05 },
      trap: { coefficient: 0.006 },
      particles: { chemicalPotential: 1.2 },
      truncation: { nmax: 5 },
      evolution: {
        duration: 1.5,
        outputEvery: 0.25,
        ramps: [
          { path: 'hubbard.hopping', points: [[0, 0.05], [1.5, 0.03]] },
          { path: 'trap.centreSites.0', points: [[0, 23.5], [1, 24]] },
        ],
        snapshots: { count: 2 },
        animationFrames: 2,
      },
    });
    const outs = [join(root, 'threads-1'), join(root, 'threads-2')];
    for (const [k, threads] of ['1', '2'].entries()) {
      const run = await runChild(['evolve', file, '--out', outs[k], '--threads', threads, '--quiet']);
      expect(run.code, run.stderr).toBe(0);
    }
    expect(summaryOf(outs[0]).threads).toBe(1);
    expect(summaryOf(outs[1]).threads).toBe(2);
    for (const f of ['evolution.csv', 'snapshots/s01/density.npy', 'snapshots/s01/order_parameter_re.npy', 'snapshots/s01/order_parameter_im.npy']) {
      expect(readFileSync(join(outs[1], f)).equals(readFileSync(join(outs[0], f))), f).toBe(true);
    }
  });

  it('SIGINT stops the evolution cleanly: exit 130, no output folder, no staging folder', async () => {
    const file = scenarioFile({
      name: 'evolve-interrupt',
      energyUnit: 'U',
      lattice: { shape: [32, 32] },
      hubbard: { hopping: 0.05 },
      trap: { coefficient: 0.01 },
      particles: { chemicalPotential: 1.2 },
      evolution: { duration: 100000, ramps: [{ path: 'hubbard.hopping', points: [[0, 0.05], [100000, 0.02]] }] },
    });
    const parent = mkdtempSync(join(root, 'interrupt-'));
    const out = join(parent, 'result');
    let sent = false;
    const run = await runChild(['evolve', file, '--out', out, '--json-progress'], (text, kill) => {
      if (!sent && text.includes('"stage":"evolving"')) {
        sent = true;
        kill('SIGINT');
      }
    });
    expect(sent).toBe(true);
    expect(run.code).toBe(130);
    expect(run.stderr).toContain('interrupted');
    expect(readdirSync(parent)).toEqual([]);
  });

  it('bad input exits 2 and writes nothing', async () => {
    const out = join(root, 'bad');
    const cases: Array<[string[], RegExp]> = [
      [['evolve', scenarioFile(trappedLayer({ temperature: { kT: 0.1 }, evolution: { duration: 1 } })), '--out', out], /temperature: .*thermal start is not supported/],
      [['evolve', scenarioFile(trappedLayer({ evolution: { duration: 1, ramps: [{ path: 'particles.atoms', points: [[0, 5]] }] } })), '--out', out], /evolution\.ramps\[0\]\.path: particles\.atoms cannot be ramped/],
      [['evolve', scenarioFile(trappedLayer({ evolution: { duration: 1, ramps: [{ path: 'hubbard.hoping', points: [[0, 5]] }] } })), '--out', out], /evolution\.ramps\[0\]\.path/],
      [['evolve', scenarioFile(trappedLayer({})), '--out', out], /evolution: .*has no "evolution" section/],
      [['evolve', scenarioFile(trappedLayer({ evolution: { duration: 1 } })), '--out', out, '--modulation-frequencies', '2:1:5'], /--modulation-frequencies/],
      [['evolve', scenarioFile(trappedLayer({ evolution: { duration: 1, integrator: { kind: 'splitting' } } })), '--out', out], /evolution\.integrator\.step/],
    ];
    for (const [argv, message] of cases) {
      const run = await quiet(argv);
      expect(run.code, argv.join(' ')).toBe(2);
      expect(run.stderr).toMatch(message);
      expect(existsSync(out)).toBe(false);
    }
  });
});

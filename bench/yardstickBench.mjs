// The site kernel against the speed yardstick (an optimised single-threaded C implementation
// of the same T = 0 algorithm, ../shared/yardstick/site_kernel.c, compiled here with
// gcc -O3 -march=native into a temporary folder), in one run, best of three:
// 48^3 and 64^3 trapped clouds, J/U 0.0125, mu/U 1.45, trap coefficient 0.00325 U, nmax 6,
// tolerance 1e-8, phi = 0.5 at the start (as the C code), the configurations interleaved so
// that machine noise hits them alike. Printed: site updates per second
// (sweeps only), wall time to solution (tiercake: solveLattice, measuring pass included),
// sweeps, the atom number against the C code's, and the same for the JavaScript reference
// kernel, for 2 threads, and at kT = 0.05 U (tiercake only; the C code is T = 0 only).
// When gcc or the yardstick folder is missing, the ratios are skipped and the reason shown.
//
// Usage: node bench/yardstickBench.mjs [--reps N]   (default 5; after `npm run build`)
// Importable: `runYardstickBench({ log, reps })`.

import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { performance } from 'node:perf_hooks';

const root = fileURLToPath(new URL('../', import.meta.url));
const dist = (p) => new URL(`../dist/${p}`, import.meta.url).href;

function findYardstick() {
  const candidates = [process.env.TIERCAKE_YARDSTICK, join(root, '../shared/yardstick'), join(root, '../../shared/yardstick')].filter(Boolean);
  return candidates.map((d) => join(d, 'site_kernel.c')).find((f) => existsSync(f)) ?? null;
}

function buildYardstick(dir) {
  const source = findYardstick();
  if (source === null) return { binary: null, reason: 'yardstick folder not found (../shared/yardstick or TIERCAKE_YARDSTICK)' };
  const binary = join(dir, 'site_kernel');
  try {
    execFileSync('gcc', ['-O3', '-march=native', '-o', binary, source, '-lm'], { stdio: 'pipe' });
  } catch (err) {
    return { binary: null, reason: `gcc failed: ${err instanceof Error ? err.message.split('\n')[0] : String(err)}` };
  }
  return { binary, reason: '' };
}

const CASE = { J: 0.0125, mu: 1.45, V2: 0.00325, nmax: 6, tol: 1e-8 };

function runYardstick(binary, L, dir) {
  const out = join(dir, `out-${L}`);
  execFileSync(binary, ['--shape', String(L), String(L), String(L), '--J', String(CASE.J), '--U', '1', '--mu', String(CASE.mu), '--V2', String(CASE.V2), '--nmax', String(CASE.nmax), '--tol', String(CASE.tol), '--out', out], { stdio: 'pipe' });
  return JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'));
}

export async function runYardstickBench({ log, reps = 5 }) {
  const { createLatticeGeometry } = await import(dist('lattice/latticeGeometry.js'));
  const { uniformModel } = await import(dist('lattice/latticeModel.js'));
  const { addHarmonicTrap, latticeCentre } = await import(dist('lattice/harmonicTrap.js'));
  const { createSolverState } = await import(dist('solver/solverState.js'));
  const { createSweepExecutor, createSweepPool } = await import(dist('solver/sweepExecutor.js'));
  const { solveLattice } = await import(dist('solver/latticeSolve.js'));
  const { kernelModule } = await import(dist('solver/kernel/kernelModule.js'));
  if (kernelModule.module === null) log('yardstick', 'WebAssembly kernel', 'missing', '', kernelModule.reason);

  const dir = mkdtempSync(join(tmpdir(), 'tiercake-yardstick-'));
  const { binary, reason } = buildYardstick(dir);
  const pool = createSweepPool({ workers: 1 });
  const model = (L) => {
    const g = createLatticeGeometry([L, L, L], [false, false, false]);
    const m = uniformModel(g, 1, CASE.J, CASE.nmax);
    addHarmonicTrap(g, { coefficient: [CASE.V2, CASE.V2, CASE.V2], centre: latticeCentre(g) }, m.eps);
    return m;
  };
  const start = (m) => new Float64Array(m.geometry.siteCount).fill(0.5);
  // Whole solve at fixed mu: wall time, sweeps, atoms.
  // CPU seconds of the process over wall seconds: about 2 when both cores worked for us, about
  // 1 when another program held one of them (then 2 threads cannot be faster).
  const cpuNow = () => {
    const u = process.cpuUsage();
    return (u.user + u.system) / 1e6;
  };
  const solve = async (m, kernel, threads, temperature) => {
    const state = createSolverState(m, start(m), { thermal: temperature > 0 });
    const executor = createSweepExecutor(state, threads > 1 ? pool : null, threads, { kernel });
    const t = performance.now();
    const c = cpuNow();
    const r = await solveLattice(m, state, executor, { mode: { kind: 'mu', mu: CASE.mu }, temperature, tolerance: CASE.tol, maxSweeps: 100000, accelerate: true });
    const seconds = (performance.now() - t) / 1000;
    return { seconds, cores: (cpuNow() - c) / seconds, sweeps: r.relax.sweeps, atoms: r.totals.atoms, converged: r.converged };
  };
  // Sweeps only, from the same start, as many as `sweeps`: site updates per second.
  const sweepRate = async (m, kernel, threads, temperature, sweeps) => {
    const state = createSolverState(m, start(m), { thermal: temperature > 0 });
    const executor = createSweepExecutor(state, threads > 1 ? pool : null, threads, { kernel });
    const t = performance.now();
    for (let k = 0; k < sweeps; k++) {
      await executor.sweep(0, CASE.mu, temperature);
      await executor.sweep(1, CASE.mu, temperature);
    }
    return (sweeps * m.geometry.siteCount) / ((performance.now() - t) / 1000);
  };
  const best = (xs, pick) => xs.reduce((a, b) => (pick(b) < pick(a) ? b : a));

  for (const L of [48, 64]) {
    const m = model(L);
    const configs = [
      ['js', 1],
      ['wasm', 1],
      ['wasm', 2],
    ].filter(([k]) => k === 'js' || kernelModule.module !== null);
    // Interleave the configurations so that machine noise hits them alike.
    const solves = new Map(configs.map((c) => [c.join('/'), []]));
    const c = [];
    for (let rep = 0; rep < reps; rep++) {
      if (binary) c.push(runYardstick(binary, L, dir));
      for (const [kernel, threads] of configs) solves.get(`${kernel}/${threads}`).push(await solve(m, kernel, threads, 0));
    }
    const sweeps = solves.get(configs[0].join('/'))[0].sweeps;
    const rates = new Map(configs.map((cfg) => [cfg.join('/'), 0]));
    for (let rep = 0; rep < reps; rep++) {
      for (const [kernel, threads] of configs) {
        const key = `${kernel}/${threads}`;
        rates.set(key, Math.max(rates.get(key), await sweepRate(m, kernel, threads, 0, sweeps)));
      }
    }
    const cBest = c.length ? best(c, (x) => x.seconds) : null;
    const cRate = c.length ? Math.max(...c.map((x) => x.site_updates_per_second)) : NaN;
    if (cBest) {
      log('yardstick', `${L}^3 C yardstick, 1 thread: site updates`, cRate / 1e6, 'M upd/s', `${cBest.sweeps} sweeps`);
      log('yardstick', `${L}^3 C yardstick: wall time of the sweeps`, cBest.seconds, 's', `atoms ${cBest.atoms.toFixed(6)}`);
    } else if (L === 48) {
      log('yardstick', 'C yardstick', 'skipped', '', reason);
    }
    const one = rates.get('wasm/1') || rates.get('js/1');
    for (const [kernel, threads] of configs) {
      const key = `${kernel}/${threads}`;
      const s = best(solves.get(key), (x) => x.seconds);
      const perThread = rates.get(key) / threads;
      const vsC = cBest ? `; per thread ${(perThread / cRate).toFixed(2)}x C` : '';
      const scaling = threads > 1 ? `; ${(rates.get(key) / one).toFixed(2)}x 1 thread` : '';
      log('yardstick', `${L}^3 ${kernel}, ${threads} thread${threads > 1 ? 's' : ''}: site updates (total)`, rates.get(key) / 1e6, 'M upd/s', `${vsC.slice(2)}${scaling}`);
      const atoms = cBest ? `; atoms vs C ${(Math.abs(s.atoms - cBest.atoms) / cBest.atoms).toExponential(1)} rel.` : '';
      const wall = cBest ? `${(cBest.seconds / s.seconds).toFixed(2)}x C speed; ` : '';
      const cores = threads > 1 ? `; ${s.cores.toFixed(2)} cores busy` : '';
      log('yardstick', `${L}^3 ${kernel}, ${threads} thread${threads > 1 ? 's' : ''}: wall time to solution`, s.seconds, 's', `${wall}${s.sweeps} sweeps${atoms}${cores}${s.converged ? '' : ' NOT CONVERGED'}`);
    }
    // T > 0 through the same kernels (sweeps only; the C code has no T > 0).
    const thermal = new Map(configs.map((cfg) => [cfg.join('/'), 0]));
    for (let rep = 0; rep < reps; rep++) {
      for (const [kernel, threads] of configs) {
        const key = `${kernel}/${threads}`;
        thermal.set(key, Math.max(thermal.get(key), await sweepRate(m, kernel, threads, 0.05, 8)));
      }
    }
    for (const [kernel, threads] of configs) {
      const key = `${kernel}/${threads}`;
      const note = `T>0/T=0 cost ${(rates.get(key) / thermal.get(key)).toFixed(2)}x${threads > 1 ? `; ${(thermal.get(key) / (thermal.get('wasm/1') || thermal.get('js/1'))).toFixed(2)}x 1 thread` : ''}`;
      log('yardstick', `${L}^3 kT = 0.05 U, ${kernel}, ${threads} thread${threads > 1 ? 's' : ''}: site updates`, thermal.get(key) / 1e6, 'M upd/s', note);
    }
  }
  await pool.destroy();
  rmSync(dir, { recursive: true, force: true });
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const at = process.argv.indexOf('--reps');
  const reps = at > 0 ? Number(process.argv[at + 1]) : 5;
  const log = (section, label, value, unit, note = '') => {
    const v = typeof value === 'number' ? (Math.abs(value) >= 100 ? value.toFixed(0) : Math.abs(value) >= 1 ? value.toFixed(2) : value.toPrecision(3)) : value;
    process.stdout.write(`${section.padEnd(10)} ${label.padEnd(64)} ${String(v).padStart(10)} ${unit.padEnd(8)} ${note}\n`);
  };
  await runYardstickBench({ log, reps });
}

// tiercake benchmarks (run with `npm run bench`; `npm run bench -- --large` adds the 128^3
// cloud). Figures are measured in one run and printed with ratios; nothing here asserts a
// time. Uses the compiled sources in dist/.
import { performance } from 'node:perf_hooks';
import { availableParallelism } from 'node:os';
import { createSiteWorkspace, createSiteObservables, solveSiteGround, solveSiteThermal, weylLowerBound } from '../dist/solver/site/index.js';
import { createLatticeGeometry } from '../dist/lattice/latticeGeometry.js';
import { uniformModel } from '../dist/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../dist/lattice/harmonicTrap.js';
import { createSolverState } from '../dist/solver/solverState.js';
import { createSweepExecutor, createSweepPool } from '../dist/solver/sweepExecutor.js';
import { initialOrderParameter, solveLattice } from '../dist/solver/latticeSolve.js';
import { runLattice } from '../dist/solver/runLattice.js';
import { solveHomogeneous } from '../dist/solver/homogeneous.js';
import { phaseMap } from '../dist/solver/phaseMap.js';

const large = process.argv.includes('--large');
// `npm run bench -- --only compare,ensemble` runs only the named sections.
const onlyAt = process.argv.indexOf('--only');
const only = onlyAt > 0 ? new Set(process.argv[onlyAt + 1].split(',')) : null;
const want = (section) => only === null || only.has(section);
const rows = [];
const log = (section, label, value, unit, note = '') => {
  rows.push({ section, label, value, unit, note });
  process.stdout.write(`${section.padEnd(10)} ${label.padEnd(58)} ${formatValue(value).padStart(12)} ${unit.padEnd(10)} ${note}\n`);
};
function formatValue(v) {
  if (typeof v === 'string') return v;
  if (!Number.isFinite(v)) return String(v);
  return Math.abs(v) >= 100 ? v.toFixed(0) : Math.abs(v) >= 1 ? v.toFixed(2) : v.toPrecision(3);
}
const now = () => performance.now();

process.stdout.write(`tiercake benchmarks: node ${process.version}, ${availableParallelism()} cores (sweep rates: best of three blocks; yardstick: best of five)\n\n`);

// 0. The site kernel beside the C yardstick (48^3 and 64^3 clouds; JS and WebAssembly
//    kernels, 1 and 2 threads, T = 0 and kT = 0.05 U) ------------------------------------
if (want('yardstick')) {
  const { runYardstickBench } = await import('./yardstickBench.mjs');
  await runYardstickBench({ log, reps: 5 });
}

// 1. Site problem throughput (JavaScript reference primitives), nmax = 6 -----------------
if (want('site')) {
  const ws = createSiteWorkspace(6);
  const out = createSiteObservables();
  const N = 2_000_000;
  const mus = Float64Array.from({ length: 1024 }, (_, k) => -0.3 + 3.3 * ((k * 0.618034) % 1));
  const psis = Float64Array.from({ length: 1024 }, (_, k) => 0.02 + 0.5 * ((k * 0.414214) % 1));
  let acc = 0;
  for (let k = 0; k < 200_000; k++) acc += solveSiteGround(ws, 1, mus[k & 1023], psis[k & 1023], NaN);
  let t = now();
  for (let k = 0; k < N; k++) acc += solveSiteGround(ws, 1, mus[k & 1023], psis[k & 1023], NaN);
  const cold = N / ((now() - t) / 1000);
  // warm: the bound a sweep has when psi moved by 1e-6 since the last solve of the site
  const lower = new Float64Array(1024);
  for (let k = 0; k < 1024; k++) {
    solveSiteGround(ws, 1, mus[k], psis[k], NaN);
    lower[k] = weylLowerBound(ws.eigenvalues[0], psis[k] + 1e-6, psis[k], mus[k], mus[k], 6);
  }
  t = now();
  for (let k = 0; k < N; k++) acc += solveSiteGround(ws, 1, mus[k & 1023], psis[k & 1023] + 1e-6, lower[k & 1023]);
  const warm = N / ((now() - t) / 1000);
  const NT = 400_000;
  t = now();
  for (let k = 0; k < NT; k++) acc += solveSiteThermal(ws, 1, mus[k & 1023], psis[k & 1023], 0.1, null);
  const thermal = NT / ((now() - t) / 1000);
  t = now();
  for (let k = 0; k < NT; k++) acc += solveSiteThermal(ws, 1, mus[k & 1023], psis[k & 1023], 0.1, out);
  const thermalFull = NT / ((now() - t) / 1000);
  log('site', 'T = 0 ground state, cold start (Gershgorin bound)', cold / 1e6, 'M calls/s');
  log('site', 'T = 0 ground state, warm start (Weyl bound, as in sweeps)', warm / 1e6, 'M calls/s');
  log('site', 'T > 0 thermal phi, cold (QL from scratch; sweeps warm-start)', thermal / 1e6, 'M calls/s', `T>0/T=0 warm cost ${(warm / thermal).toFixed(2)}x`);
  log('site', 'T > 0 thermal, all observables', thermalFull / 1e6, 'M calls/s');
  if (acc === 42) process.stdout.write('');
}

// 2. Sweep throughput on trapped clouds ----------------------------------------------------
function trapped(shape, J, coefficient, nmax = 6) {
  const g = createLatticeGeometry(shape, shape.map(() => false));
  const model = uniformModel(g, 1, J, nmax);
  addHarmonicTrap(g, { coefficient: shape.map(() => coefficient), centre: latticeCentre(g) }, model.eps);
  return model;
}
const pool = createSweepPool({ workers: Math.max(1, Math.min(availableParallelism(), 2) - 1) });
async function sweepRate(model, mu, temperature, threads, sweeps) {
  const state = createSolverState(model, initialOrderParameter(model, mu), { thermal: temperature > 0 });
  const ex = createSweepExecutor(state, threads > 1 ? pool : null, threads);
  for (let k = 0; k < 6; k++) { await ex.sweep(0, mu, temperature); await ex.sweep(1, mu, temperature); }
  // Best of three timed blocks: on a shared machine the minimum time is the stable figure.
  let best = Infinity;
  for (let rep = 0; rep < 3; rep++) {
    const t = now();
    for (let k = 0; k < sweeps; k++) { await ex.sweep(0, mu, temperature); await ex.sweep(1, mu, temperature); }
    best = Math.min(best, (now() - t) / 1000);
  }
  return (sweeps * model.geometry.siteCount) / best;
}
if (want('sweep')) {
  const cloud2d = trapped([256, 256], 0.01, 0.00004);
  const cloud3d = trapped([64, 64, 64], 0.008, 0.0012);
  const r2d0 = await sweepRate(cloud2d, 1.6, 0, 1, 20);
  const r2dT = await sweepRate(cloud2d, 1.6, 0.1, 1, 5);
  const r3d0 = await sweepRate(cloud3d, 1.6, 0, 1, 12);
  const r3d0x2 = await sweepRate(cloud3d, 1.6, 0, 2, 12);
  const r3dT = await sweepRate(cloud3d, 1.6, 0.1, 1, 3);
  const r3dTx2 = await sweepRate(cloud3d, 1.6, 0.1, 2, 3);
  log('sweep', '2D 256^2 trapped, T = 0, 1 thread', r2d0 / 1e6, 'M upd/s');
  log('sweep', '2D 256^2 trapped, kT = 0.1 U, 1 thread', r2dT / 1e6, 'M upd/s', `cost ratio T>0/T=0 ${(r2d0 / r2dT).toFixed(2)}x`);
  log('sweep', '3D 64^3 trapped, T = 0, 1 thread', r3d0 / 1e6, 'M upd/s');
  log('sweep', '3D 64^3 trapped, T = 0, 2 threads (total)', r3d0x2 / 1e6, 'M upd/s', `speed-up ${(r3d0x2 / r3d0).toFixed(2)}x`);
  log('sweep', '3D 64^3 trapped, kT = 0.1 U, 1 thread', r3dT / 1e6, 'M upd/s', `cost ratio T>0/T=0 ${(r3d0 / r3dT).toFixed(2)}x`);
  log('sweep', '3D 64^3 trapped, kT = 0.1 U, 2 threads (total)', r3dTx2 / 1e6, 'M upd/s', `speed-up ${(r3dTx2 / r3dT).toFixed(2)}x`);
}

// 3. Sweeps to converge ---------------------------------------------------------------
if (want('converge')) {
  const run = async (model, mu, accelerate, phi0, tolerance = 1e-8) => {
    const state = createSolverState(model, phi0 ?? initialOrderParameter(model, mu));
    const r = await solveLattice(model, state, createSweepExecutor(state, null, 1), { mode: { kind: 'mu', mu }, temperature: 0, tolerance, maxSweeps: 200000, accelerate });
    return { r, state };
  };
  const shells = trapped([80, 80], 0.015, 0.0015);
  const plain = await run(shells, 1.6, false);
  const fast = await run(shells, 1.6, true);
  log('converge', '2D trapped cloud with n=1,2 shells, plain red-black', plain.r.relax.sweeps, 'sweeps', `error est. ${plain.r.relax.errorEstimate.toExponential(1)}`);
  log('converge', '2D trapped cloud with n=1,2 shells, accelerated', fast.r.relax.sweeps, 'sweeps', `error est. ${fast.r.relax.errorEstimate.toExponential(1)}; ${(plain.r.relax.sweeps / fast.r.relax.sweeps).toFixed(1)}x fewer`);
  // homogeneous lattice within 1e-3 of the n = 1 lobe boundary (superfluid side)
  const x = 0.5;
  const zJc = ((1 - x) * x) / (1 + x);
  const g = createLatticeGeometry([16, 16], [true, true]);
  const hom = uniformModel(g, 1, (1.001 * zJc) / 4, 6);
  const exact = solveHomogeneous({ zJ: 1.001 * zJc, interactionU: 1, mu: x, temperature: 0, nmax: 6 }).phi;
  const start = new Float64Array(g.siteCount).fill(0.3);
  const p = await run(hom, x, false, Float64Array.from(start));
  const a = await run(hom, x, true, Float64Array.from(start));
  const errP = Math.abs(p.state.fields.phi[0] - exact);
  const errA = Math.abs(a.state.fields.phi[0] - exact);
  log('converge', 'homogeneous, zJ = 1.001 zJc (n=1 edge), plain red-black', p.r.relax.sweeps, 'sweeps', `true error ${errP.toExponential(1)}, rate r ${p.r.relax.contractionRate.toFixed(5)}`);
  log('converge', 'homogeneous, zJ = 1.001 zJc (n=1 edge), accelerated', a.r.relax.sweeps, 'sweeps', `true error ${errA.toExponential(1)}; ${(p.r.relax.sweeps / a.r.relax.sweeps).toFixed(1)}x fewer`);
}

// 4. Whole solves at fixed N (and S/N) ----------------------------------------------------
async function wholeSolve(model, atoms, thermal, threads) {
  const t = now();
  const out = await runLattice(
    {
      model,
      chemical: { kind: 'atoms', atoms, relativeTolerance: 1e-6 },
      thermal,
      tolerance: 1e-8,
      maxSweeps: 100000,
      accelerate: true,
      truncation: { automatic: false, topWeightMax: 1, nmaxLimit: model.nmax },
      compressibility: false,
    },
    (state) => createSweepExecutor(state, threads > 1 ? pool : null, threads),
  );
  return { seconds: (now() - t) / 1000, out };
}
if (want('whole')) {
  const cloud = trapped([64, 64, 64], 0.0065, 0.0035);
  const z1 = await wholeSolve(cloud, 120000, { kind: 'temperature', kT: 0 }, 1);
  const z2 = await wholeSolve(cloud, 120000, { kind: 'temperature', kT: 0 }, 2);
  log('whole', '64^3 trapped, fixed N = 120000, T = 0, 1 thread', z1.seconds, 's', `${z1.out.totalSweeps} sweeps, ${z1.out.solve.muSearch.evaluations} mu steps`);
  log('whole', '64^3 trapped, fixed N = 120000, T = 0, 2 threads', z2.seconds, 's', `speed-up ${(z1.seconds / z2.seconds).toFixed(2)}x; converged ${z2.out.converged}`);
  const t2 = await wholeSolve(cloud, 120000, { kind: 'temperature', kT: 0.05 }, 2);
  log('whole', '64^3 trapped, fixed N, kT = 0.05 U, 2 threads', t2.seconds, 's', `${t2.out.totalSweeps} sweeps`);
  const s2 = await wholeSolve(cloud, 120000, { kind: 'entropy', entropyPerAtom: 0.3, relativeTolerance: 1e-6 }, 2);
  log('whole', '64^3 trapped, fixed N and S/N = 0.3 k_B, 2 threads', s2.seconds, 's', `kT = ${s2.out.temperature.toFixed(4)} U, ${s2.out.temperatureSearch?.evaluations} T steps`);
  if (large) {
    const big = trapped([128, 128, 128], 0.0065, 0.0009);
    const b = await wholeSolve(big, 1_000_000, { kind: 'temperature', kT: 0 }, 2);
    log('whole', '128^3 trapped, fixed N = 1e6, T = 0, 2 threads', b.seconds, 's', `${b.out.totalSweeps} sweeps; converged ${b.out.converged}`);
  }
}

// 5. Phase map ---------------------------------------------------------------------------
if (want('diagram')) {
  const t = now();
  phaseMap({ zJMax: 0.25, muMin: -0.2, muMax: 3, columns: 400, rows: 400, temperature: 0, nmax: 10, boundaryPoints: 400 });
  log('diagram', '400 x 400 homogeneous phase map, T = 0', (now() - t) / 1000, 's');
  const t2 = now();
  phaseMap({ zJMax: 0.25, muMin: -0.2, muMax: 3, columns: 200, rows: 200, temperature: 0.05, nmax: 10, boundaryPoints: 400 });
  log('diagram', '200 x 200 homogeneous phase map, kT = 0.05 U', (now() - t2) / 1000, 's');
}

// 6. Disorder ensemble ----------------------------------------------------------------
if (want('ensemble')) {
  const { runEnsembleBench } = await import('./ensembleBench.mjs');
  const r = await runEnsembleBench({ realisations: 64 });
  log('ensemble', '64x64 speckle layer, 1 thread', r.oneThread.realisationsPerMinute, 'real./min');
  log('ensemble', '64x64 speckle layer, 2 threads (realisations side by side)', r.twoThreads.realisationsPerMinute, 'real./min', `x${r.speedUp.toFixed(2)}${r.identical ? '' : ' NOT IDENTICAL'}`);
}

// 7. Compare fit against one solve ---------------------------------------------------------
if (want('compare')) {
  const { mkdtempSync, writeFileSync, rmSync } = await import('node:fs');
  const { tmpdir } = await import('node:os');
  const { join } = await import('node:path');
  const { prepareScenario } = await import('../dist/pipeline/prepareScenario.js');
  const { solveScenario } = await import('../dist/pipeline/solveScenario.js');
  const { solvePictures } = await import('../dist/pipeline/solvePictures.js');
  const { runCompareFit } = await import('../dist/pipeline/compareFit.js');
  const { measuredFromGrid } = await import('../dist/imaging/measuredImage.js');
  const dir = mkdtempSync(join(tmpdir(), 'tiercake-bench-'));
  const path = join(dir, 'layer84.json');
  const countsPerAtom = 100;
  writeFileSync(
    path,
    JSON.stringify({
      name: 'layer84',
      energyUnit: 'U',
      lattice: { shape: [84, 84] },
      hubbard: { hopping: 0.015 },
      trap: { coefficient: 0.0015 },
      particles: { atoms: 6000 },
      truncation: { nmax: 6 },
      camera: { cameraPixelSites: 1, psf: { sigmaSites: 0.5 }, noise: { kind: 'photon', countsPerAtom, seed: 'bench' } },
    }),
  );
  // The measured image: one noisy exposure of the scenario itself, whole detected counts.
  const truth = await solveScenario(prepareScenario(path), { threads: 1 });
  const shot = solvePictures(truth).pictures.find((p) => p.name === 'in_situ_shot').picture;
  const shotAtoms = Float64Array.from(shot.values, (v) => Math.round(v * countsPerAtom) / countsPerAtom);
  const measured = measuredFromGrid({ values: shotAtoms, nx: shot.nx, ny: shot.ny }, { pixelUm: shot.pixelUm, countsPerAtom });
  // Seven repetitions, solve and fit taken in turn so that both see the same load; the ratio
  // of each pair, then the median of the pairs (a shared machine makes single runs differ by
  // 1.5x and more), with the spread of the pairs beside it.
  const reps = 7;
  const solveTimes = [];
  const fitTimes = [];
  const ratios = [];
  let fit;
  for (let rep = 0; rep < reps; rep++) {
    let t = now();
    await solveScenario(prepareScenario(path), { threads: 1 });
    const solveSeconds = (now() - t) / 1000;
    t = now();
    fit = await runCompareFit({ prepared: prepareScenario(path), measured, fit: ['atoms'], maxIterations: 30, threads: 1 });
    const fitSeconds = (now() - t) / 1000;
    solveTimes.push(solveSeconds);
    fitTimes.push(fitSeconds);
    ratios.push(fitSeconds / solveSeconds);
  }
  rmSync(dir, { recursive: true, force: true });
  const median = (v) => {
    const s = v.slice().sort((a, b) => a - b);
    return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
  };
  const spread = (v, digits) => `${Math.min(...v).toFixed(digits)}-${Math.max(...v).toFixed(digits)}`;
  const atoms = fit.parameters.find((p) => p.name === 'atoms');
  log('compare', `84x84 layer, one solve (fixed N = 6000, 1 thread), median of ${reps}`, median(solveTimes), 's', `spread ${spread(solveTimes, 3)} s`);
  log('compare', `84x84 layer, fit of N and the centre to a noisy exposure, median of ${reps}`, median(fitTimes), 's', `spread ${spread(fitTimes, 3)} s; ${fit.fit.solves} solves, ${fit.fit.sweeps} sweeps; N = ${atoms.best.toFixed(1)} ± ${atoms.uncertainty.toFixed(1)}, chi2_nu ${fit.fit.reducedChiSquare.toFixed(3)} on ${fit.fit.degreesOfFreedom}`);
  log('compare', `84x84 layer, fit/solve, median of ${reps} pairs`, median(ratios), 'ratio', `spread ${spread(ratios, 2)}; best fit / best solve ${(Math.min(...fitTimes) / Math.min(...solveTimes)).toFixed(2)}`);
}

// 8. Figures of a solve ---------------------------------------------------------------
if (want('figures')) {
  const { runFigureBench } = await import('./figureBench.mjs');
  for (const r of await runFigureBench()) {
    log('figures', `${r.name}: all ${r.images} images of a solve, SVG -> PNG`, r.milliseconds, 'ms', `${(r.pngBytes / 1024).toFixed(0)} KiB of PNG`);
  }
}

// 9. Time-of-flight pictures ----------------------------------------------------------
if (want('tof')) {
  const { runTofBench } = await import('./tofBench.mjs');
  for (const r of await runTofBench()) {
    log('tof', `${r.name}: free expansion (${r.pixels} px, ${r.subSamples}^2 samples)`, r.freeExpansionMs, 'ms', `far field ${r.farFieldMs.toFixed(0)} ms, x${(r.freeExpansionMs / r.farFieldMs).toFixed(1)}`);
  }
}

// 10. Warm starts of a scan -----------------------------------------------------------
if (want('scan')) {
  const { runScanBench } = await import('./scanBench.mjs');
  for (const r of await runScanBench()) {
    log(
      'scan',
      `80x80 layer, J/U 0.01-0.03, ${r.points} pts, ${r.name}: sweeps warm/cold`,
      r.warm.sweeps / r.cold.sweeps,
      'ratio',
      `${r.warm.sweeps} vs ${r.cold.sweeps} sweeps, ${(100 * r.saving).toFixed(0)} % saved (chains of ${r.chainLength}); ${r.warm.seconds.toFixed(1)} s vs ${r.cold.seconds.toFixed(1)} s`,
    );
  }
}

// 11. Cluster mean field through the whole solve ---------------------------------------------
if (want('cluster')) {
  const { mkdtempSync, writeFileSync, rmSync } = await import('node:fs');
  const { tmpdir } = await import('node:os');
  const { join } = await import('node:path');
  const { prepareScenario } = await import('../dist/pipeline/prepareScenario.js');
  const { solveScenario } = await import('../dist/pipeline/solveScenario.js');
  const dir = mkdtempSync(join(tmpdir(), 'tiercake-bench-cluster-'));
  const scenario = (cluster) => {
    const path = join(dir, `layer-${cluster.join('x')}.json`);
    writeFileSync(
      path,
      JSON.stringify({
        name: 'bench-cluster',
        energyUnit: 'U',
        lattice: { shape: [16, 16], boundary: 'open' },
        hubbard: { hopping: 0.045 },
        trap: { coefficient: 0.012 },
        particles: { chemicalPotential: 0.6 },
        truncation: { nmax: 3, automatic: false, topWeightMax: 0.1 },
        solver: { cluster, tolerance: 1e-8, compressibility: false },
      }),
    );
    return path;
  };
  const timed = async (cluster, threads) => {
    const t = now();
    const a = await solveScenario(prepareScenario(scenario(cluster)), { threads });
    return { seconds: (now() - t) / 1000, sweeps: a.outcome.totalSweeps, density: a.fields.density, threadsUsed: a.threadsUsed, clusters: a.cluster?.clusterCount ?? 256 };
  };
  const single = await timed([1, 1], 1);
  const one = await timed([2, 2], 1);
  const two = await timed([2, 2], 2);
  const identical = one.density.every((v, i) => Object.is(v, two.density[i]));
  log('cluster', '16x16 trap, nmax 3, fixed mu: single-site solve', single.seconds, 's', `${single.sweeps} sweeps`);
  log('cluster', '16x16 trap, nmax 3, fixed mu: 2x2 clusters, 1 thread', one.seconds, 's', `${one.sweeps} sweeps, ${one.clusters} clusters of 256 states; ${(one.seconds / single.seconds).toFixed(0)}x single-site; ${((1000 * one.seconds) / (one.sweeps + 1) / one.clusters).toFixed(2)} ms per cluster solve`);
  log('cluster', '16x16 trap, nmax 3, fixed mu: 2x2 clusters, 2 threads', two.seconds, 's', `x${(one.seconds / two.seconds).toFixed(2)} vs 1 thread${identical ? ', identical fields' : ' FIELDS DIFFER'}`);
  rmSync(dir, { recursive: true, force: true });
}

await pool.destroy();

// Cluster mean-field benchmarks (run `npm run build`, then `node bench/clusterBench.mjs`;
// `--large` adds the 2x2x2 cluster at nmax 4, 390625 states). Figures are measured in one
// run and printed with ratios to the single-site update; nothing here asserts a time.
// Uses the compiled sources in dist/.
//
// 1. dense eigen-solvers: our Householder + QL and the partial solver (lowest vectors by
//    inverse iteration) against ml-matrix's EigenvalueDecomposition
// 2. T = 0 ground state: dense against Lanczos (cold), to place the dense threshold;
//    T > 0: dense against block Lanczos
// 3. cost per cluster update in a sweep (warm start, fields moved by 1e-4 relative), per
//    cluster and per site, against one warm single-site update; T > 0 at kT = 0.1 U
// 4. cost per sweep of a trapped 24x24 lattice, cluster 1x1 / 2x1 / 2x2 (T = 0)
import { performance } from 'node:perf_hooks';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { createSiteWorkspace, solveSiteGround, weylLowerBound } from '../dist/solver/site/index.js';
import { createClusterSolver, solveClusterGround, solveClusterThermal } from '../dist/solver/cluster/clusterSolver.js';
import { createSymmetricEigenWorkspace, symmetricEigen } from '../dist/solver/cluster/symmetricEigen.js';
import { createPartialEigenWorkspace, partialEigenvalues, partialEigenvectors } from '../dist/solver/cluster/partialSymmetricEigen.js';
import { solveClusterLattice } from '../dist/solver/cluster/clusterLattice.js';
import { createLatticeGeometry } from '../dist/lattice/latticeGeometry.js';
import { uniformModel } from '../dist/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../dist/lattice/harmonicTrap.js';
import { createSolverState } from '../dist/solver/solverState.js';
import { createSweepExecutor } from '../dist/solver/sweepExecutor.js';
import { initialOrderParameter } from '../dist/solver/latticeSolve.js';

const large = process.argv.includes('--large');
const now = () => performance.now();
const fmt = (v) => (Math.abs(v) >= 100 ? v.toFixed(0) : Math.abs(v) >= 1 ? v.toFixed(2) : v.toPrecision(3));
const line = (section, label, value, unit, note = '') =>
  process.stdout.write(`${section.padEnd(9)} ${label.padEnd(52)} ${fmt(value).padStart(10)} ${unit.padEnd(9)} ${note}\n`);
/** best time (ms) per call over `blocks` blocks of `reps` calls */
function best(fn, reps, blocks = 3) {
  fn();
  let b = Infinity;
  for (let k = 0; k < blocks; k++) {
    const t = now();
    for (let r = 0; r < reps; r++) fn(r);
    b = Math.min(b, (now() - t) / reps);
  }
  return b;
}
function fillInputs(solver, psi = 0.08, J = 0.05) {
  const h = solver.hamiltonian;
  for (let i = 0; i < solver.geometry.siteCount; i++) {
    h.interactionU[i] = 1;
    h.muLocal[i] = 0.45 + 0.03 * i;
    h.fieldPsi[i] = psi * (1 + 0.1 * i);
  }
  h.bondHopping.fill(J);
}

process.stdout.write(`cluster mean-field benchmarks: node ${process.version}\n\n`);

// 1. Dense eigen-solvers ------------------------------------------------------------
for (const n of [16, 64, 256]) {
  const a = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => Math.cos(i * 7 + j * 7) + (i === j ? i : 0)));
  const sym = a.map((row, i) => row.map((_, j) => 0.5 * (a[i][j] + a[j][i])));
  const flat = Float64Array.from(sym.flat());
  const ws = createSymmetricEigenWorkspace(n);
  const reps = n <= 16 ? 2000 : n <= 64 ? 100 : 4;
  const ours = best(() => {
    ws.a.set(flat);
    symmetricEigen(ws, n);
  }, reps);
  const M = new Matrix(sym);
  const ml = best(() => new EigenvalueDecomposition(M, { assumeSymmetric: true }), reps);
  const pws = createPartialEigenWorkspace(n);
  const partial = (k) =>
    best(() => {
      pws.a.set(flat);
      partialEigenvalues(pws, n);
      partialEigenvectors(pws, n, k);
    }, reps);
  const p1 = partial(1);
  const pq = partial(Math.max(1, n >> 2));
  line('dense', `full eigendecomposition n = ${n}: ours`, ours, 'ms', `ml-matrix ${fmt(ml)} ms (${(ml / ours).toFixed(2)}x ours)`);
  line('dense', `partial n = ${n}: all values + 1 vector`, p1, 'ms', `${(ours / p1).toFixed(1)}x faster than full; + n/4 vectors ${fmt(pq)} ms`);
}

// 2. Dense vs Lanczos for the ground state ---------------------------------------------
for (const [shape, nmax] of [[[3], 3], [[2, 2], 2], [[2, 2], 3]]) {
  const d = createClusterSolver(shape, nmax, { denseMaxStates: 1e9 });
  const l = createClusterSolver(shape, nmax, { denseMaxStates: 1 });
  fillInputs(d);
  fillInputs(l);
  const reps = d.basis.dim <= 64 ? 200 : 5;
  const td = best(() => solveClusterGround(d, null), reps);
  const tl = l.method === 'lanczos' ? best(() => solveClusterGround(l, null), reps) : NaN;
  line('ground', `${shape.join('x')} nmax ${nmax} (dim ${d.basis.dim}): dense`, td, 'ms', `Lanczos cold ${fmt(tl)} ms (${l.observables.matvecs} products)`);
}
for (const [nmax, T] of [[3, 0.1], [3, 0.05], [4, 0.1]]) {
  const d = createClusterSolver([2, 2], nmax);
  const l = createClusterSolver([2, 2], nmax, { thermalDenseMaxStates: 1, thermalWeightMax: 1e-8 });
  fillInputs(d);
  fillInputs(l);
  const td = best(() => solveClusterThermal(d, T, null), 2, 2);
  const keptDense = d.observables.keptStates;
  const tl = best(() => solveClusterThermal(l, T, null), 1, 1);
  line('thermal', `2x2 nmax ${nmax} kT = ${T} U: dense (${keptDense} vectors)`, td, 'ms', `block Lanczos ${fmt(tl)} ms (${l.observables.keptStates} states, top weight ${l.observables.truncationWeight.toExponential(1)})`);
}

// 3. Cost per cluster update -------------------------------------------------------------
const siteWs = createSiteWorkspace(4);
const mus = Float64Array.from({ length: 256 }, (_, k) => 0.2 + 0.6 * ((k * 0.618034) % 1));
const psis = Float64Array.from({ length: 256 }, (_, k) => 0.05 + 0.2 * ((k * 0.414214) % 1));
const lower = new Float64Array(256);
for (let k = 0; k < 256; k++) {
  solveSiteGround(siteWs, 1, mus[k], psis[k], NaN);
  lower[k] = weylLowerBound(siteWs.eigenvalues[0], psis[k] * (1 + 1e-4), psis[k], mus[k], mus[k], 4);
}
const single = best((r) => solveSiteGround(siteWs, 1, mus[r & 255], psis[r & 255] * (1 + 1e-4), lower[r & 255]), 200_000);
line('update', 'single-site update, T = 0, warm (as in sweeps), nmax 4', single * 1000, 'us', 'reference');
const shapes = [[[1, 1], 3], [[1, 1], 4], [[2, 1], 3], [[2, 1], 4], [[2, 2], 3], [[2, 2], 4], [[2, 2, 2], 3]];
if (large) shapes.push([[2, 2, 2], 4]);
for (const [shape, nmax] of shapes) {
  const t0 = now();
  const s = createClusterSolver(shape, nmax);
  const build = now() - t0;
  fillInputs(s);
  solveClusterGround(s, null);
  const coldProducts = s.observables.matvecs;
  const warm = Float64Array.from(s.groundVector);
  const dim = s.basis.dim;
  const reps = dim <= 64 ? 2000 : dim <= 1000 ? 50 : dim <= 100_000 ? 3 : 1;
  let flip = 1;
  const tw = best(() => {
    // the next sweep: fields moved by 1e-4 relative, start from the last state
    flip = -flip;
    for (let i = 0; i < s.geometry.siteCount; i++) s.hamiltonian.fieldPsi[i] *= 1 + 1e-4 * flip;
    solveClusterGround(s, s.method === 'lanczos' ? warm : null);
  }, reps, dim > 100_000 ? 1 : 3);
  const warmProducts = s.observables.matvecs;
  const sites = s.geometry.siteCount;
  line(
    'update',
    `${shape.join('x')} nmax ${nmax} (dim ${dim}, ${s.method}) T = 0 warm`,
    tw,
    'ms',
    `per site ${fmt((tw * 1000) / sites)} us = ${fmt((tw * 1000) / sites / (single * 1000))}x single-site; products warm ${warmProducts} / cold ${coldProducts}; build ${fmt(build)} ms`,
  );
  if (dim <= 1296) {
    const reps = dim <= 64 ? 500 : 2;
    const tt = best(() => solveClusterThermal(s, 0.1, s.thermalMethod === 'lanczos' ? warm : null), reps);
    line(
      'update',
      `${shape.join('x')} nmax ${nmax} T > 0 (kT = 0.1 U, ${s.thermalMethod})`,
      tt,
      'ms',
      `per site ${fmt((tt * 1000) / sites / (single * 1000))}x single-site T=0; kept ${s.observables.keptStates}, top weight ${s.observables.truncationWeight.toExponential(1)}`,
    );
  }
}

// 4. Cost per sweep on a trapped lattice --------------------------------------------------
{
  const g = createLatticeGeometry([24, 24], [false, false]);
  const model = uniformModel(g, 1, 0.045, 3);
  addHarmonicTrap(g, { coefficient: [0.006, 0.006], centre: latticeCentre(g) }, model.eps);
  const mu = 1.2;
  // single-site reference: the existing sweep kernel
  const state = createSolverState(model, initialOrderParameter(model, mu));
  const ex = createSweepExecutor(state, null, 1);
  for (let k = 0; k < 5; k++) {
    await ex.sweep(0, mu, 0);
    await ex.sweep(1, mu, 0);
  }
  let t = now();
  const N = 50;
  for (let k = 0; k < N; k++) {
    await ex.sweep(0, mu, 0);
    await ex.sweep(1, mu, 0);
  }
  const kernel = (now() - t) / N;
  line('sweep', '24x24 trap, nmax 3: single-site sweep kernel', kernel, 'ms', 'reference');
  for (const cluster of [[1, 1], [2, 1], [2, 2]]) {
    const sweeps = cluster[0] * cluster[1] === 1 ? 40 : 8;
    // warm-up run (JIT), then a timed run of fixed length; the measuring pass is one more solve per cluster
    solveClusterLattice({ model, cluster, mu, temperature: 0, tolerance: 0, maxSweeps: 2 });
    t = now();
    const r = solveClusterLattice({ model, cluster, mu, temperature: 0, tolerance: 0, maxSweeps: sweeps });
    const perSweep = (now() - t) / (r.sweeps + 1);
    line('sweep', `24x24 trap, nmax 3: cluster ${cluster.join('x')} driver`, perSweep, 'ms', `${fmt(perSweep / kernel)}x single-site kernel; ${r.clusterCount} clusters, products/sweep ${fmt(r.matvecs / (r.sweeps + 1))}`);
  }
}

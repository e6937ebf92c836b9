// Benchmarks of the time-dependent Gutzwiller core (run: `npx tsc -p . && node bench/dynamicsBench.mjs`).
// One run, figures and ratios printed; nothing asserts a time. Uses the compiled sources in dist/.
//   1. cost per site of one right-hand-side evaluation and of one colour propagation, against
//      one red-black sweep of the static solver on the same 64x64 trapped cloud;
//   2. steps and time per unit time (1/U) after a hopping quench for both integrators, with
//      the error of phi at t = 5/U against a tight adaptive reference (which is better?).
import { performance } from 'node:perf_hooks';
import { createLatticeGeometry } from '../dist/lattice/latticeGeometry.js';
import { uniformModel } from '../dist/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../dist/lattice/harmonicTrap.js';
import { createSolverState } from '../dist/solver/solverState.js';
import { createSweepExecutor } from '../dist/solver/sweepExecutor.js';
import { staticGroundState } from '../dist/dynamics/staticGround.js';
import { frameFromModel } from '../dist/dynamics/dynamicsFrame.js';
import { createSerialRunner } from '../dist/dynamics/dynamicsRunner.js';
import { createDrive } from '../dist/dynamics/drive.js';
import { rampSchedule } from '../dist/dynamics/rampSchedule.js';
import { evolve } from '../dist/dynamics/evolve.js';
import { copyState, sharedFloat64 } from '../dist/dynamics/gutzwillerState.js';
import { orderParameterRange } from '../dist/dynamics/equationsOfMotion.js';
import { createObservableWorkspace, evolutionTotals } from '../dist/dynamics/dynamicObservables.js';

const now = () => performance.now();
const log = (section, label, value, unit, note = '') => {
  const v = typeof value === 'string' ? value : Math.abs(value) >= 100 ? value.toFixed(0) : Math.abs(value) >= 1 ? value.toFixed(2) : value.toPrecision(3);
  process.stdout.write(`${section.padEnd(9)} ${label.padEnd(62)} ${v.padStart(10)} ${unit.padEnd(10)} ${note}\n`);
};
const best = async (fn, reps = 3) => {
  let t = Infinity;
  for (let r = 0; r < reps; r++) {
    const s = now();
    await fn();
    t = Math.min(t, now() - s);
  }
  return t;
};

const shape = [64, 64];
const J0 = 0.05;
const nmax = 6;
const g = createLatticeGeometry(shape, [false, false]);
const model = uniformModel(g, 1, J0, nmax);
addHarmonicTrap(g, { coefficient: [0.004, 0.004], centre: latticeCentre(g) }, model.eps);
const ground = await staticGroundState({ model, chemical: { kind: 'mu', mu: 1.5 }, tolerance: 1e-12 });
const sites = g.siteCount;
process.stdout.write(`dynamics benchmarks: node ${process.version}; 64x64 trapped cloud, nmax ${nmax}, J/U ${J0}, ${ground.atoms.toFixed(0)} atoms, eps up to ${Math.max(...model.eps).toFixed(1)} U\n\n`);

// 1. per-site costs -------------------------------------------------------------------------
{
  const frame = frameFromModel(model, { mu: ground.mu });
  const runner = createSerialRunner(frame);
  const y = Float64Array.from(ground.state.amplitudes);
  const out = sharedFloat64(y.length);
  const reps = 200;
  for (let k = 0; k < 20; k++) await runner.derivative(y, out);
  const tRhs = (await best(async () => { for (let k = 0; k < reps; k++) await runner.derivative(y, out); })) / reps;
  const yc = Float64Array.from(y);
  const tColour = (await best(async () => { for (let k = 0; k < 40; k++) await runner.propagateColour(yc, k & 1, 1e-3); })) / 40;
  const state = createSolverState(model, Float64Array.from(ground.phi));
  const ex = createSweepExecutor(state, null, 1);
  for (let k = 0; k < 5; k++) { await ex.sweep(0, ground.mu, 0); await ex.sweep(1, ground.mu, 0); }
  const tSweep = (await best(async () => { for (let k = 0; k < 40; k++) { await ex.sweep(0, ground.mu, 0); await ex.sweep(1, ground.mu, 0); } })) / 40;
  log('cost', 'right-hand side (phi, Psi, H c), all sites', tRhs * 1e3, 'us');
  log('cost', 'right-hand side per site', (tRhs * 1e6) / sites, 'ns/site', `${(sites / tRhs / 1e3).toFixed(1)} M site-evals/s`);
  log('cost', 'one colour propagation (splitting, exact exponentials), all sites', tColour * 1e3, 'us', `${(tColour / tRhs).toFixed(2)}x a RHS`);
  log('cost', 'static red-black sweep (both colours, warm), all sites', tSweep * 1e3, 'us', `${(tSweep / tRhs).toFixed(2)}x a RHS`);
  log('cost', 'static solve of this cloud from scratch (runLattice, 1e-12)', ground.outcome.totalSweeps, 'sweeps', `= ${(ground.outcome.totalSweeps * tSweep / tRhs).toFixed(0)} RHS evaluations`);
}

// 2. integrators after a hopping quench J0 -> 2 J0 ----------------------------------------------
{
  const duration = 5;
  const run = async (integrator) => {
    const frame = frameFromModel(model, { mu: ground.mu });
    const drive = createDrive(frame, { hoppingFactor: rampSchedule({ path: 'hopping', points: [[0, 2]] }) });
    const state = copyState(ground.state);
    const t = now();
    const result = await evolve({ state, frame, drive, outputTimes: [duration], integrator });
    const ms = now() - t;
    const phiRe = new Float64Array(sites);
    const phiIm = new Float64Array(sites);
    orderParameterRange(state.amplitudes, state.states, frame.sqrtN, phiRe, phiIm, 0, sites);
    const totals = evolutionTotals(state, frame, createObservableWorkspace(sites));
    return { result, ms, phiRe, phiIm, totals };
  };
  const reference = await run({ kind: 'dormand-prince', absoluteTolerance: 1e-13, relativeTolerance: 1e-13 });
  const initialEnergy = (() => {
    const frame = frameFromModel(model, { mu: ground.mu });
    frame.hopScale.fill(2);
    return evolutionTotals(ground.state, frame, createObservableWorkspace(sites)).energy;
  })();
  const error = (r) => {
    let e = 0;
    for (let i = 0; i < sites; i++) e = Math.max(e, Math.hypot(r.phiRe[i] - reference.phiRe[i], r.phiIm[i] - reference.phiIm[i]));
    return e;
  };
  const cases = [
    ['dormand-prince tol 1e-6', { kind: 'dormand-prince', absoluteTolerance: 1e-6, relativeTolerance: 1e-6 }],
    ['dormand-prince tol 1e-8', { kind: 'dormand-prince', absoluteTolerance: 1e-8, relativeTolerance: 1e-8 }],
    ['dormand-prince tol 1e-10', { kind: 'dormand-prince', absoluteTolerance: 1e-10, relativeTolerance: 1e-10 }],
    ['splitting order 2, step 0.05/U', { kind: 'splitting', step: 0.05 }],
    ['splitting order 2, step 0.01/U', { kind: 'splitting', step: 0.01 }],
    ['splitting order 4, step 0.1/U', { kind: 'splitting', step: 0.1, order: 4 }],
    ['splitting order 4, step 0.05/U', { kind: 'splitting', step: 0.05, order: 4 }],
  ];
  log('quench', `reference: dormand-prince tol 1e-13, t = 0..${duration}/U`, reference.result.statistics.steps / duration, 'steps/(1/U)', `${(reference.ms / duration).toFixed(0)} ms per 1/U`);
  for (const [label, integrator] of cases) {
    const r = await run(integrator);
    const s = r.result.statistics;
    const dE = Math.abs(r.totals.energy - initialEnergy) / Math.abs(initialEnergy);
    const dN = Math.abs(r.totals.atoms - ground.atoms) / ground.atoms;
    log('quench', label, s.steps / duration, 'steps/(1/U)',
      `${(r.ms / duration).toFixed(0)} ms per 1/U, ${(s.evaluations / duration).toFixed(0)} evals/(1/U), max|dphi| ${error(r).toExponential(1)}, dE/E ${dE.toExponential(1)}, dN/N ${dN.toExponential(1)}`);
  }
}

// Benchmarks of `tiercake evolve` (run: `npx tsc -p . && node bench/evolveBench.mjs`). One run,
// figures and ratios printed; nothing asserts a time. Uses the compiled sources in dist/.
//   1. one right-hand side on the serial runner against the worker-thread runner (2 threads),
//      64x64 and 128x128 trapped clouds: the ratio says where the parallel runner pays off
//      (DYNAMICS_PARALLEL_MIN_SITES);
//   2. the whole pipeline on a 64x64 loading ramp (J 0.08 -> 0.02 U in 20 hbar/U, Dormand-Prince
//      at 1e-9): start, reference, evolution, with 1 and 2 threads (identical results).
import { performance } from 'node:perf_hooks';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createLatticeGeometry } from '../dist/lattice/latticeGeometry.js';
import { uniformModel } from '../dist/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../dist/lattice/harmonicTrap.js';
import { staticGroundState } from '../dist/dynamics/staticGround.js';
import { frameFromModel } from '../dist/dynamics/dynamicsFrame.js';
import { createSerialRunner } from '../dist/dynamics/dynamicsRunner.js';
import { sharedFloat64 } from '../dist/dynamics/gutzwillerState.js';
import { createDynamicsPool, createParallelRunner, shareFrame } from '../dist/dynamics/parallelRunner.js';
import { prepareScenario } from '../dist/pipeline/prepareScenario.js';
import { evolveScenario } from '../dist/pipeline/evolveScenario.js';

const log = (section, label, value, unit, note = '') => {
  const v = typeof value === 'string' ? value : Math.abs(value) >= 100 ? value.toFixed(0) : Math.abs(value) >= 1 ? value.toFixed(2) : value.toPrecision(3);
  process.stdout.write(`${section.padEnd(9)} ${label.padEnd(58)} ${v.padStart(10)} ${unit.padEnd(8)} ${note}\n`);
};
const best = async (fn, reps = 5) => {
  let t = Infinity;
  for (let r = 0; r < reps; r++) {
    const s = performance.now();
    await fn();
    t = Math.min(t, performance.now() - s);
  }
  return t;
};

process.stdout.write(`evolve benchmarks: node ${process.version}\n\n`);
const pool = await createDynamicsPool({ workers: 1 });
for (const L of [32, 64, 128]) {
  const g = createLatticeGeometry([L, L], [false, false]);
  const model = uniformModel(g, 1, 0.05, 6);
  const k = (0.004 * 64 * 64) / (L * L);
  addHarmonicTrap(g, { coefficient: [k, k], centre: latticeCentre(g) }, model.eps);
  const ground = await staticGroundState({ model, chemical: { kind: 'mu', mu: 1.5 } });
  const frame = shareFrame(frameFromModel(model, { mu: ground.mu }));
  const y = ground.state.amplitudes;
  const out = sharedFloat64(y.length);
  const reps = Math.max(20, Math.round(200 * (64 * 64) / (L * L)));
  const serial = createSerialRunner(frame);
  const parallel = createParallelRunner(frame, pool);
  for (let r = 0; r < 20; r++) {
    await serial.derivative(y, out);
    await parallel.derivative(y, out);
  }
  const ts = (await best(async () => { for (let r = 0; r < reps; r++) await serial.derivative(y, out); })) / reps;
  const tp = (await best(async () => { for (let r = 0; r < reps; r++) await parallel.derivative(y, out); })) / reps;
  log('rhs', `${L}x${L}: right-hand side, serial / 2 threads`, `${(ts * 1e3).toFixed(0)}/${(tp * 1e3).toFixed(0)}`, 'us', `speed-up ${(ts / tp).toFixed(2)}x`);
}
await pool.destroy();

const dir = mkdtempSync(join(tmpdir(), 'tiercake-evolve-bench-'));
const file = join(dir, 'ramp.json');
writeFileSync(
  file,
  JSON.stringify({
    name: 'bench-ramp-64',
    energyUnit: 'U',
    lattice: { shape: [64, 64] },
    hubbard: { hopping: 0.08 },
    trap: { coefficient: 0.0025 },
    particles: { chemicalPotential: 1.4 },
    truncation: { nmax: 6 },
    evolution: { duration: 20, outputEvery: 0.5, ramps: [{ path: 'hubbard.hopping', points: [[0, 0.08], [20, 0.02]] }], snapshots: { count: 3 }, animationFrames: 24 },
  }),
);
const rows = [];
for (const threads of [1, 2]) {
  const prepared = prepareScenario(file, []);
  const t = performance.now();
  const a = await evolveScenario(prepared, { threads, clock: () => performance.now() });
  const total = (performance.now() - t) / 1000;
  rows.push(a);
  log('ramp', `64x64 ramp over 20 hbar/U, ${threads} thread(s): total`, total, 's',
    `start ${a.timings.startSeconds.toFixed(2)} s, reference ${a.timings.referenceSeconds.toFixed(2)} s, evolution ${a.timings.evolveSeconds.toFixed(2)} s, ${a.result.statistics.steps} steps, excess ${a.verdict.excessEnergyPerAtomInScale.toExponential(2)} U/atom`);
}
const same = rows[0].series.energy.every((e, k) => Object.is(e, rows[1].series.energy[k]));
log('ramp', '1 and 2 threads: energies identical bit for bit', same ? 'yes' : 'NO', '');
log('ramp', 'evolution speed-up with 2 threads', rows[0].timings.evolveSeconds / rows[1].timings.evolveSeconds, 'x');

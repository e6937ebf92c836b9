// Benchmarks of the landscape terms (run: `npx tsc -p . && node bench/landscapeBench.mjs`).
// One run, figures and ratios printed; nothing asserts a time. Uses the compiled sources in dist/.
//   1. the combined-lattice Wannier calculation of one axis (J, U, on-site energies under a
//      second standing wave): incommensurate (every window solved) against commensurate
//      (windows repeat and are solved once), by axis length and main-lattice depth;
//   2. the site terms on a 256 x 256 layer: tilt, erf-edged disc, picture (bilinear, area).
import { performance } from 'node:perf_hooks';
import { combinedLatticeAxis } from '../dist/physics/combinedLatticeWannier.js';
import { createLatticeGeometry } from '../dist/lattice/latticeGeometry.js';
import { boxPotential, gradientPotential, imagePotential } from '../dist/lattice/landscape/index.js';

const now = () => performance.now();
const log = (section, label, value, unit, note = '') => {
  const v = Math.abs(value) >= 100 ? value.toFixed(0) : Math.abs(value) >= 1 ? value.toFixed(2) : value.toPrecision(3);
  process.stdout.write(`${section.padEnd(9)} ${label.padEnd(62)} ${v.padStart(10)} ${unit.padEnd(6)} ${note}\n`);
};
const best = (fn, reps = 3) => {
  let t = Infinity;
  for (let r = 0; r < reps; r++) {
    const t0 = now();
    fn();
    t = Math.min(t, now() - t0);
  }
  return t;
};

combinedLatticeAxis({ depthEr: 10, siteCount: 16, periodic: false, extra: [{ amplitudeEr: 0.5, periodSites: 1.618, phaseRad: 0 }] }); // warm-up
for (const depthEr of [6, 14, 30]) {
  for (const n of [64, 256]) {
    const incommensurate = best(() => combinedLatticeAxis({ depthEr, siteCount: n, periodic: false, extra: [{ amplitudeEr: 0.5, periodSites: 1.6180339887, phaseRad: 0.3 }] }), 1);
    const commensurate = best(() => combinedLatticeAxis({ depthEr, siteCount: n, periodic: false, extra: [{ amplitudeEr: 0.5, periodSites: 2, phaseRad: 0.3 }] }), 1);
    log('wannier', `${n} sites at ${depthEr} E_r, golden-ratio period`, incommensurate, 'ms', `${(incommensurate / n).toFixed(1)} ms/site`);
    log('wannier', `${n} sites at ${depthEr} E_r, period 2 (windows repeat)`, commensurate, 'ms', `x${(incommensurate / commensurate).toFixed(1)} faster`);
  }
}

const g = createLatticeGeometry([256, 256], [false, false]);
const ones = [1, 1];
const tilt = best(() => gradientPotential(g, { direction: [1, 2], slope: 0.1, offset: [0, 0], lengthPerSite: ones }));
const disc = best(() => boxPotential(g, { shape: { kind: 'disc', radius: 90 }, wallHeight: 5, edgeWidth: 2, offset: [0, 0], lengthPerSite: ones }));
const picture = { values: Float64Array.from({ length: 512 * 512 }, (_, i) => i % 7), width: 512, height: 512 };
const bilinear = best(() => imagePotential(g, picture, { pixelSize: 1, offset: [0, 0], angleRad: 0.2, lengthPerSite: ones, scale: 1, resampling: 'bilinear' }));
const area = best(() => imagePotential(g, picture, { pixelSize: 0.5, offset: [0, 0], angleRad: 0.2, lengthPerSite: ones, scale: 1, resampling: 'area' }));
log('terms', '256 x 256 linear tilt', tilt, 'ms', `${((tilt * 1e6) / 65536).toFixed(0)} ns/site`);
log('terms', '256 x 256 disc with erf edge', disc, 'ms', `${((disc * 1e6) / 65536).toFixed(0)} ns/site`);
log('terms', '256 x 256 picture, bilinear, rotated', bilinear, 'ms', `${((bilinear * 1e6) / 65536).toFixed(0)} ns/site`);
log('terms', '256 x 256 picture, area average (8 x 8 samples per site)', area, 'ms', `x${(area / bilinear).toFixed(1)} bilinear`);

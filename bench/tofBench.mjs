// Cost of the time-of-flight pictures: the finite-time free expansion (freeExpansion.ts)
// against the far-field picture of the same state, for a 2D layer of 56^2 and 100^2 sites and a
// 3D cloud of 40^3 sites imaged along z (column of 40 layers), best of `repeats`.
// Synthetic trapped states (superfluid core, Mott ring), 87Rb in a 1064 nm lattice at 16 E_r.
//
// Runs against compiled sources: `npx tsc -p .` first (npm run bench builds).
// Usage: node bench/tofBench.mjs [distDir]; importable: runTofBench({ distDir }).

import { existsSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = new URL('../', import.meta.url);

async function load(distDir, relative) {
  const path = `${distDir}/${relative}`;
  if (!existsSync(path)) throw new Error(`${path} is missing; build first with \`npx tsc -p .\``);
  return import(pathToFileURL(path).href);
}

function trapped(shape) {
  const count = shape.reduce((a, b) => a * b, 1);
  const phiRe = new Float64Array(count);
  const density = new Float64Array(count);
  const n = [shape[0], shape[1] ?? 1, shape[2] ?? 1];
  const c = n.map((v) => (v - 1) / 2);
  const r = Math.min(...shape) / 2 - 1;
  for (let x = 0; x < n[0]; x++) {
    for (let y = 0; y < n[1]; y++) {
      for (let z = 0; z < n[2]; z++) {
        const i = (x * n[1] + y) * n[2] + z;
        const d = Math.hypot(x - c[0], y - c[1], shape.length === 3 ? z - c[2] : 0) / r;
        if (d > 1) continue;
        density[i] = d < 0.5 ? 1.3 : 1;
        phiRe[i] = d < 0.5 ? 0.9 : d > 0.85 ? 0.3 : 0;
      }
    }
  }
  return { phiRe, density, shape };
}

export async function runTofBench({ distDir = fileURLToPath(new URL('dist', root)), repeats = 3 } = {}) {
  const { timeOfFlightPicture } = await load(distDir, 'imaging/timeOfFlightPicture.js');
  const { latticeWannierOrbital } = await load(distDir, 'imaging/siteOrbital.js');
  const massKg = 86.909180527 * 1.6605390666e-27;
  const a = 0.532;
  const orbital = latticeWannierOrbital(16, a);
  const cases = [
    { name: '56^2 layer, 20 ms, default pixel', shape: [56, 56], t: 20 },
    { name: '56^2 layer, 15 ms, 6.5 um pixel', shape: [56, 56], t: 15, objectPixelUm: 6.5 },
    { name: '100^2 layer, 20 ms, default pixel', shape: [100, 100], t: 20 },
    { name: '40^3 cloud along z, 20 ms, default pixel', shape: [40, 40, 40], t: 20 },
  ];
  const results = [];
  for (const c of cases) {
    const field = trapped(c.shape);
    const time = (model) => {
      let best = Infinity;
      let picture;
      for (let k = 0; k < repeats; k++) {
        const start = performance.now();
        picture = timeOfFlightPicture({
          field,
          imagingAxis: 2,
          massKg,
          latticeSpacingUm: a,
          orbitals: [orbital, orbital],
          flightTimeMs: c.t,
          model,
          ...(c.objectPixelUm !== undefined ? { objectPixelUm: c.objectPixelUm } : {}),
        });
        best = Math.min(best, performance.now() - start);
      }
      return { ms: best, picture };
    };
    const finite = time('free-expansion');
    const far = time('far-field');
    results.push({
      name: c.name,
      freeExpansionMs: finite.ms,
      farFieldMs: far.ms,
      pixels: `${finite.picture.nx} x ${finite.picture.ny}`,
      subSamples: finite.picture.subSamplesPerPixel,
    });
  }
  return results;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const distDir = process.argv[2] ?? fileURLToPath(new URL('dist', root));
  for (const r of await runTofBench({ distDir })) {
    process.stdout.write(
      `${r.name.padEnd(42)} free expansion ${r.freeExpansionMs.toFixed(0).padStart(6)} ms (${r.pixels} px, ${r.subSamples}^2 samples)` +
        `   far field ${r.farFieldMs.toFixed(0).padStart(5)} ms   ratio ${(r.freeExpansionMs / r.farFieldMs).toFixed(1)}\n`,
    );
  }
}

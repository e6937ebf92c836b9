// Figure rendering cost of a `solve`: every image the solve writers make (field planes,
// phase map, camera pictures with their colour PNGs, time of flight in laboratory mode),
// timed after the solve itself, best of `repeats`. The figures are encoded to PNG bytes
// exactly as the writers do; nothing is written to disk.
//
// Runs against compiled sources: `npx tsc -p .` first (npm run bench builds).
// Usage: node bench/figureBench.mjs [distDir]   (default: this checkout's dist/), so the
// same script can time an older build for a before/after ratio.
// Importable: `runFigureBench({ distDir })` returns the numbers.

import { existsSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = new URL('../', import.meta.url);

async function load(distDir, relative) {
  const path = `${distDir}/${relative}`;
  if (!existsSync(path)) throw new Error(`${path} is missing; build first with \`npx tsc -p .\``);
  return import(pathToFileURL(path).href);
}

export async function runFigureBench({ distDir = fileURLToPath(new URL('dist', root)), repeats = 3 } = {}) {
  const { solveScenario } = await load(distDir, 'pipeline/solveScenario.js');
  const { solveImages } = await load(distDir, 'output/solveOutputs.js');
  const { cameraPictures, cloudForImaging } = await load(distDir, 'output/cameraOutputs.js');
  const results = [];
  for (const name of ['layer-two-shells', 'rb-layer-lab', 'cube-shells']) {
    const a = await solveScenario({ scenarioPath: fileURLToPath(new URL(`configs/${name}.json`, root)), overrides: [], threads: 1 });
    let best = Infinity;
    let images = 0;
    let pngBytes = 0;
    for (let k = 0; k < repeats; k++) {
      const t = performance.now();
      const planes = solveImages(a);
      const camera = cameraPictures(cloudForImaging(a), a.scenario.camera, a.scenario.timeOfFlight);
      best = Math.min(best, performance.now() - t);
      images = planes.length + camera.images.length;
      pngBytes = [...planes, ...camera.images].reduce((s, img) => s + img.png.length, 0);
    }
    results.push({ name, milliseconds: best, images, pngBytes });
  }
  return results;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const distDir = process.argv[2] ?? fileURLToPath(new URL('dist', root));
  for (const r of await runFigureBench({ distDir })) {
    process.stdout.write(`${r.name.padEnd(18)} ${r.images} images (incl. camera pictures) ${r.milliseconds.toFixed(0).padStart(6)} ms  ${(r.pngBytes / 1024).toFixed(0)} KiB PNG\n`);
  }
}

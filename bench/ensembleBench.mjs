// Ensemble throughput: realisations per minute for the 2D 64 x 64 trapped layer with
// speckle (configs/speckle-layer-ensemble.json), with 1 and 2 threads, and the speed-up.
// A single realisation has 4096 sites, below the solver's PARALLEL_MIN_SITES, so the
// threads run whole realisations side by side (--parallel-over realisations). The worker
// start-up is included: it is what a user pays. Both runs must give the same bits.
//
// Runs against the compiled sources: `npx tsc -p .` first (npm run bench builds).
// Usage: node bench/ensembleBench.mjs [--realisations N]   (default 16)
// Importable: `runEnsembleBench({ realisations })` returns the numbers.

import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = new URL('../', import.meta.url);
const scenarioPath = fileURLToPath(new URL('configs/speckle-layer-ensemble.json', root));

async function load(relative) {
  const url = new URL(`dist/${relative}`, root);
  if (!existsSync(fileURLToPath(url))) throw new Error(`${fileURLToPath(url)} is missing; build first with \`npx tsc -p .\``);
  return import(url.href);
}

export async function runEnsembleBench({ realisations = 16 } = {}) {
  const { loadScenario } = await load('scenario/loadScenario.js');
  const { planBlocks } = await load('pipeline/ensemble/blockPlan.js');
  const { histogramBins } = await load('pipeline/ensemble/histogramBins.js');
  const { runEnsembleBlocks } = await load('pipeline/ensemble/runEnsemble.js');
  const { absorbBlock, createEnsembleTotal } = await load('pipeline/ensemble/blockPartial.js');
  const { ensembleStatistics } = await load('pipeline/ensemble/ensembleStatistics.js');

  const { scenario, raw } = loadScenario(scenarioPath, []);
  const siteCount = scenario.lattice.shape.reduce((a, b) => a * b, 1);
  const plan = planBlocks(realisations, 4);
  const bins = histogramBins(scenario.truncation.nmax);
  const blocks = Array.from({ length: plan.blockCount }, (_, b) => b);

  const measure = async (threads) => {
    const t0 = performance.now();
    const total = createEnsembleTotal(siteCount, bins);
    await runEnsembleBlocks({ raw, baseSeed: scenario.disorder.seed, plan, blocks, bins, siteCount, threads, parallelOver: 'realisations', onBlock: (p) => absorbBlock(total, p) });
    const seconds = (performance.now() - t0) / 1000;
    const stats = ensembleStatistics(total);
    return { threads, seconds, perMinute: (60 * realisations) / seconds, stats };
  };
  const one = await measure(1);
  const two = await measure(2);
  const same = (a, b) => Buffer.from(a.buffer).equals(Buffer.from(b.buffer));
  const identical =
    same(one.stats.densityMean, two.stats.densityMean) &&
    same(one.stats.densitySpread, two.stats.densitySpread) &&
    same(one.stats.condensateMean, two.stats.condensateMean) &&
    same(one.stats.phaseFraction, two.stats.phaseFraction);
  return {
    scenario: scenario.name,
    shape: scenario.lattice.shape,
    realisations,
    oneThread: { seconds: one.seconds, realisationsPerMinute: one.perMinute },
    twoThreads: { seconds: two.seconds, realisationsPerMinute: two.perMinute },
    speedUp: two.perMinute / one.perMinute,
    identical,
    spanningFraction: one.stats.spanningFraction,
  };
}

function argValue(name, fallback) {
  const k = process.argv.indexOf(name);
  if (k < 0) return fallback;
  const n = Number(process.argv[k + 1]);
  if (!Number.isInteger(n) || n < 1) throw new Error(`${name}: expected a whole number >= 1`);
  return n;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const r = await runEnsembleBench({ realisations: argValue('--realisations', 16) });
  const line = (label, m) => `  ${label}: ${m.seconds.toFixed(2)} s, ${m.realisationsPerMinute.toFixed(0)} realisations/min`;
  process.stdout.write(
    [
      `ensemble: ${r.scenario}, ${r.shape.join(' x ')} sites, ${r.realisations} realisations (spanning fraction ${r.spanningFraction.toFixed(3)})`,
      line('1 thread ', r.oneThread),
      line('2 threads', r.twoThreads),
      `  speed-up 1 -> 2 threads: ${r.speedUp.toFixed(2)}x; identical results: ${r.identical ? 'yes' : 'NO'}`,
    ].join('\n') + '\n',
  );
  if (!r.identical) process.exitCode = 1;
}

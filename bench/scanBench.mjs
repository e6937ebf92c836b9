// Warm starts of a scan: sweeps of the scan as `tiercake scan` runs it (chains of the
// default length, each point started from its predecessors) against cold solves of the
// same points (each from the solver's own atomic-limit guess), and the ratio. Sweeps are
// counted, not seconds (the compressibility solves, the same in both, are not counted).
// Scenario: configs/layer-two-shells.json (80 x 80 layer, n = 1 and n = 2 shells), a scan
// of the hopping J/U = 0.01 ... 0.03, at fixed mu (the file), fixed N = 4000, and fixed
// N with fixed entropy per atom S/N = 0.1.
//
// Runs against the compiled sources: `npx tsc -p .` first (npm run bench builds).
// Usage: node bench/scanBench.mjs   Importable: `runScanBench()` returns the numbers.

import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const root = new URL('../', import.meta.url);
const scenarioPath = fileURLToPath(new URL('configs/layer-two-shells.json', root));

async function load(relative) {
  const url = new URL(`dist/${relative}`, root);
  if (!existsSync(fileURLToPath(url))) throw new Error(`${fileURLToPath(url)} is missing; build first with \`npx tsc -p .\``);
  return import(url.href);
}

export async function runScanBench() {
  const { prepareScenario } = await load('pipeline/prepareScenario.js');
  const { planScan, linearValues, DEFAULT_CHAIN_LENGTH } = await load('pipeline/scan/scanPlan.js');
  const { runScan } = await load('pipeline/scan/runScan.js');
  const cases = [
    { name: 'fixed mu', sets: [], points: 21 },
    { name: 'fixed N = 4000', sets: ['particles={"atoms":4000}'], points: 21 },
    { name: 'fixed N, S/N = 0.1', sets: ['particles={"atoms":4000}', 'temperature={"entropyPerAtom":0.1}'], points: 11 },
  ];
  const results = [];
  for (const c of cases) {
    const plan = planScan([{ path: 'hubbard.hopping', values: linearValues(0.01, 0.03, c.points), spacing: 'linear' }], DEFAULT_CHAIN_LENGTH);
    const chains = Array.from({ length: plan.chainCount }, (_, k) => k);
    const measure = async (warmStarts) => {
      const t0 = performance.now();
      let notConverged = 0;
      const s = await runScan({
        plan,
        chains,
        hold: 'trap',
        prepare: (extra) => prepareScenario(scenarioPath, [...c.sets, ...extra]),
        threads: 1,
        warmStarts,
        onPoint: (r) => {
          if (!r.row.converged) notConverged++;
        },
      });
      return { sweeps: s.sweeps, seconds: (performance.now() - t0) / 1000, notConverged };
    };
    const cold = await measure(false);
    const warm = await measure(true);
    results.push({ name: c.name, points: c.points, chainLength: plan.chainLength, cold, warm, saving: 1 - warm.sweeps / cold.sweeps });
  }
  return results;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const r of await runScanBench()) {
    process.stdout.write(`${r.name}: ${r.points} points, chains of ${r.chainLength}: cold ${r.cold.sweeps} sweeps (${r.cold.seconds.toFixed(1)} s), warm ${r.warm.sweeps} (${r.warm.seconds.toFixed(1)} s): ${(100 * r.saving).toFixed(0)} % fewer sweeps\n`);
  }
}

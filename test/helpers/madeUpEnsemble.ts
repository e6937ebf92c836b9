// A small disorder ensemble made up for the tests of its files (no solve): 7 realisations
// of a 3 x 2 lattice in blocks of 2 with seeded random densities, realisation 5 not
// converged; the block partials are built by the pipeline's own addRealisation.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { EnsembleIdentity } from '../../src/output/ensembleShard.js';
import { blockRange, planBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import { addRealisation, createBlockPartial, type BlockPartial } from '../../src/pipeline/ensemble/blockPartial.js';
import { histogramBins } from '../../src/pipeline/ensemble/histogramBins.js';
import { ensembleContextOf, type RealisationResult } from '../../src/pipeline/ensemble/solveRealisation.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';

export function madeUpEnsemble(): { identity: EnsembleIdentity; partial: (block: number) => BlockPartial } {
  const scenarioPath = join(mkdtempSync(join(tmpdir(), 'tiercake-madeup-ensemble-')), 'merge-layer.json');
  writeFileSync(scenarioPath, JSON.stringify({ name: 'merge-layer', energyUnit: 'U', lattice: { shape: [3, 2] }, hubbard: { hopping: 0.02 }, disorder: { kind: 'box', width: 0.4, seed: 'm' }, particles: { chemicalPotential: 0.5 } }));
  const prepared = prepareScenario(scenarioPath);
  const plan = planBlocks(7, 2);
  const bins = histogramBins(prepared.scenario.truncation.nmax, 4);
  const identity: EnsembleIdentity = { scenario: prepared.scenario, scenarioHash: scenarioHash(prepared.scenario), baseSeed: 'm', plan, bins, context: ensembleContextOf(prepared.resolved) };
  const random = seededRandom('merge-test');
  const results: RealisationResult[] = Array.from({ length: 7 }, (_, r) => ({
    record: { index: r, converged: r !== 5, sweeps: 10 + r, nmaxUsed: 6, mu: 0.3, temperature: 0, atoms: 5 + random.uniform(), condensedAtoms: random.uniform() / 3, superfluidSpans: r % 3 === 0, superfluidClusters: 1, largestClusterSites: 4, phaseSites: [0, 6, 0, 0, 0], superfluidFraction: null, superfluidFractionError: null, stiffnessConverged: true },
    density: Float64Array.from({ length: 6 }, () => random.uniform() * 2),
    condensateDensity: Float64Array.from({ length: 6 }, () => random.uniform() / 7),
    phaseCodes: new Uint8Array(6).fill(PhaseCode.superfluid),
  }));
  const partial = (block: number): BlockPartial => {
    const p = createBlockPartial(blockRange(plan, block), 6, bins);
    for (let r = p.range.first; r < p.range.first + p.range.count; r++) addRealisation(p, results[r], bins);
    return p;
  };
  return { identity, partial };
}

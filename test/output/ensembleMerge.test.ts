// The merge of ensemble shards (src/output/ensembleMerge.ts), shards written by the
// running shard's writer (EnsembleShardWriter, src/output/ensembleShard.ts): the merged
// total is, bit for bit, the in-memory total of the same block partials absorbed in block
// order (combineBlocks: what a single run computes), whatever order the shards are given
// in; provenance lists the shards. A discarded writer leaves nothing behind.
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { mergedEnsembleOutcome } from '../../src/output/ensembleMerge.js';
import { EnsembleShardWriter, readShardHeader, type EnsembleIdentity } from '../../src/output/ensembleShard.js';
import { checkShardSet, shardFolderName } from '../../src/output/shardSet.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { blockRange, planBlocks, shardBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import { addRealisation, combineBlocks, createBlockPartial, type BlockPartial } from '../../src/pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../../src/pipeline/ensemble/ensembleStatistics.js';
import { histogramBins } from '../../src/pipeline/ensemble/histogramBins.js';
import { ensembleContextOf, type RealisationResult } from '../../src/pipeline/ensemble/solveRealisation.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-ensemblemerge-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const scenarioPath = join(dir, 'merge-layer.json');
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
function partial(block: number): BlockPartial {
  const p = createBlockPartial(blockRange(plan, block), 6, bins);
  for (let r = p.range.first; r < p.range.first + p.range.count; r++) addRealisation(p, results[r], bins);
  return p;
}
function writeShard(index: number, count: number): string {
  const writer = new EnsembleShardWriter(checkOutputTarget(join(dir, 'shards', shardFolderName({ index, count })), { option: '--out' }), identity);
  for (const b of shardBlocks(plan, index, count)) writer.add(partial(b));
  expect(writer.records().map((r) => r.index)).toEqual(shardBlocks(plan, index, count).flatMap((b) => [2 * b, 2 * b + 1].filter((r) => r < 7)));
  return writer.commit({ index, count }, { threads: 1, parallelOver: 'realisations', seconds: 1 + index }).path;
}
const bytes = (a: Float64Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

describe('mergedEnsembleOutcome', () => {
  it('gives the single run\'s total bit for bit, the shards given in any order', () => {
    const paths = [writeShard(2, 3), writeShard(0, 3), writeShard(1, 3)];
    const shards = paths.map(readShardHeader);
    const merged = mergedEnsembleOutcome(shards, checkShardSet(shards));
    const single = combineBlocks([0, 1, 2, 3].map(partial), bins);
    expect(bytes(merged.total.density.mean).equals(bytes(single.density.mean))).toBe(true);
    expect(bytes(merged.total.density.m2).equals(bytes(single.density.m2))).toBe(true);
    expect(bytes(merged.total.condensate.m2).equals(bytes(single.condensate.m2))).toBe(true);
    expect(bytes(merged.total.phaseCounts).equals(bytes(single.phaseCounts))).toBe(true);
    expect(merged.total.records).toEqual(single.records);
    expect(merged.stats).toEqual(ensembleStatistics(single));
    expect(merged.stats.notConverged).toEqual([5]);
    expect(merged.plan).toEqual(plan);
    expect(merged.provenance).toMatchObject({ kind: 'merged shards', shards: [{ shard: '2/3', seconds: 3 }, { shard: '0/3', seconds: 1 }, { shard: '1/3', seconds: 2 }] });
  });

  it('a discarded shard writer leaves no folder', () => {
    const collect = join(dir, 'discarded');
    const writer = new EnsembleShardWriter(checkOutputTarget(join(collect, 'shard-0-of-1'), { option: '--out' }), identity);
    writer.add(partial(0));
    writer.discard();
    expect(existsSync(join(collect, 'shard-0-of-1'))).toBe(false);
    expect(readdirSync(collect)).toEqual([]);
  });
});

// Ensemble shards on disk (src/output/ensembleShard.ts) and the checks of a set of shards
// before a merge (src/output/shardSet.ts): every number survives the round trip bit for bit
// (float64 in .npy, shortest round-trip decimals in JSON, ECMAScript Number::toString), a
// damaged header or array is an input error naming the file, and sets that miss or repeat
// blocks, or mix ensembles, are refused naming the shards and the blocks.

import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { findShardFolders, readShardBlock, readShardHeader, writeShardBlock, writeShardHeader, type EnsembleIdentity, type LoadedShard } from '../../src/output/ensembleShard.js';
import { checkShardSet, shardFolderName } from '../../src/output/shardSet.js';
import { OutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { planBlocks, blockRange, shardBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import { addRealisation, createBlockPartial, type BlockPartial } from '../../src/pipeline/ensemble/blockPartial.js';
import { histogramBins } from '../../src/pipeline/ensemble/histogramBins.js';
import { ensembleContextOf, type RealisationResult } from '../../src/pipeline/ensemble/solveRealisation.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-shard-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const scenarioPath = join(dir, 'shard-layer.json');
writeFileSync(
  scenarioPath,
  JSON.stringify({ name: 'shard-layer', energyUnit: 'U', lattice: { shape: [3, 2] }, hubbard: { hopping: 0.02 }, disorder: { kind: 'box', width: 0.4, seed: 's' }, particles: { chemicalPotential: 0.5 } }),
);
const prepared = prepareScenario(scenarioPath);
const plan = planBlocks(5, 2);
const bins = histogramBins(prepared.scenario.truncation.nmax, 4);
const identity: EnsembleIdentity = { scenario: prepared.scenario, scenarioHash: scenarioHash(prepared.scenario), baseSeed: 's', plan, bins, context: ensembleContextOf(prepared.resolved) };
const random = seededRandom('shard-test');
const resultOf = (r: number): RealisationResult => ({
  record: { index: r, converged: r !== 3, sweeps: 7 + r, nmaxUsed: 6, mu: 0.1 + 0.2, temperature: 0, atoms: 5 + random.uniform(), condensedAtoms: random.uniform() / 3, superfluidSpans: r % 2 === 0, superfluidClusters: 1, largestClusterSites: 4, phaseSites: [0, 6, 0, 0, 0], superfluidFraction: null, superfluidFractionError: null, stiffnessConverged: true },
  density: Float64Array.from({ length: 6 }, () => random.uniform() * 2),
  condensateDensity: Float64Array.from({ length: 6 }, () => random.uniform() / 7),
  phaseCodes: new Uint8Array(6).fill(PhaseCode.superfluid),
});
const results = Array.from({ length: 5 }, (_, r) => resultOf(r));

function partial(block: number): BlockPartial {
  const p = createBlockPartial(blockRange(plan, block), 6, bins);
  for (let r = p.range.first; r < p.range.first + p.range.count; r++) addRealisation(p, results[r], bins);
  return p;
}

function writeShard(collect: string, index: number, count: number, id: EnsembleIdentity = identity): string {
  const target = checkOutputTarget(join(collect, shardFolderName({ index, count })), { option: '--out' });
  const folder = new OutputFolder(target, { command: 'ensemble shard', scenarioHash: id.scenarioHash });
  const entries = shardBlocks(id.plan, index, count).map((b) => writeShardBlock(folder, partial(b), id.context.shape));
  writeShardHeader(folder, id, { index, count }, entries, { threads: 1, parallelOver: 'realisations', seconds: 0.5 }, '0.1.0');
  return folder.commit().path;
}

const same = (a: Float64Array, b: Float64Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

describe('a shard round trip', () => {
  it('reads back every block and record bit for bit', () => {
    const path = writeShard(join(dir, 'k1'), 0, 1);
    const shard = readShardHeader(path);
    expect(shard.header.blocks.map((b) => b.block)).toEqual([0, 1, 2]);
    for (const entry of shard.header.blocks) {
      const back = readShardBlock(shard, entry);
      const original = partial(entry.block);
      expect(same(back.density.mean, original.density.mean)).toBe(true);
      expect(same(back.condensate.m2, original.condensate.m2)).toBe(true);
      expect(same(back.phaseCounts, original.phaseCounts)).toBe(true);
      expect(same(back.densityHistogram.counts, original.densityHistogram.counts)).toBe(true);
      expect(back.records).toEqual(original.records);
    }
    expect(shard.header.scenarioHash).toBe(scenarioHash(prepared.scenario));
  });

  it('finds the shards inside a collecting folder, ignoring hidden folders', () => {
    const collect = join(dir, 'k2');
    writeShard(collect, 0, 2);
    writeShard(collect, 1, 2);
    expect(findShardFolders([collect]).map((p) => p.slice(collect.length + 1))).toEqual(['shard-0-of-2', 'shard-1-of-2']);
    expect(() => findShardFolders([join(dir, 'nowhere')])).toThrow(/no such folder/);
    expect(() => findShardFolders([scenarioPath])).toThrow(/not a folder/);
  });

  it('a damaged header or array is an input error naming the file', () => {
    const path = writeShard(join(dir, 'damaged'), 0, 1);
    const header = join(path, 'shard.json');
    const text = readFileSync(header, 'utf8');
    writeFileSync(header, text.replace('"blockSize": 2', '"blockSize": "two"'));
    expect(() => readShardHeader(path)).toThrow(InputError);
    expect(() => readShardHeader(path)).toThrow(/shard\.json": not a tiercake ensemble shard header \(blockSize: /);
    writeFileSync(header, text.slice(0, 100));
    expect(() => readShardHeader(path)).toThrow(/cannot be read as JSON/);
    writeFileSync(header, text);
    const array = join(path, 'blocks', 'block-000001', 'density_m2.npy');
    writeFileSync(array, readFileSync(array).subarray(0, 90));
    const shard = readShardHeader(path);
    expect(() => readShardBlock(shard, shard.header.blocks[1])).toThrow(/density_m2\.npy": .*truncated.*the shard is damaged, run it again/);
  });
});

describe('checking a set of shards', () => {
  const k3 = join(dir, 'k3');
  const shards: LoadedShard[] = [0, 1, 2].map((k) => readShardHeader(writeShard(k3, k, 3)));

  it('a complete set gives the plan; a missing or a repeated block is named with the shard that holds it', () => {
    expect(checkShardSet(shards)).toEqual(plan);
    expect(() => checkShardSet([shards[0], shards[2]])).toThrow(/block 1 is missing .*block 1: shard 1 of 3 \(folder shard-1-of-3\)/);
    const k1 = readShardHeader(join(dir, 'k1', 'shard-0-of-1'));
    expect(() => checkShardSet([k1, shards[1]])).toThrow(/block 1 is held by more than one shard/);
    expect(() => checkShardSet([shards[0], shards[0], shards[1], shards[2]])).toThrow(/given twice/);
  });

  it('shards of different ensembles are refused, naming what differs', () => {
    const otherPlan = planBlocks(5, 5);
    const other = readShardHeader(writeShard(join(dir, 'other-plan'), 0, 1, { ...identity, plan: otherPlan }));
    expect(() => checkShardSet([shards[0], other])).toThrow(/block size is 2 in .* but 5 in/);
    const renamed = { ...shards[1], header: { ...shards[1].header, scenarioHash: 'f'.repeat(64) } };
    expect(() => checkShardSet([shards[0], renamed])).toThrow(/scenario \(SHA-256 of the scenario as run\)/);
    const newer = { ...shards[1], header: { ...shards[1].header, tool: { name: 'tiercake' as const, version: '9.9.9' } } };
    expect(() => checkShardSet([shards[0], newer])).toThrow(/tiercake version/);
  });
});

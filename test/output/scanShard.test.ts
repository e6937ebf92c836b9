// Scan shards on disk (src/output/scanShard.ts): a shard's rows survive shard.json bit for
// bit, kept point folders travel with it; a set of shards merges only when it is one scan
// holding every chain once (5 points in chains of 2 make chains {0,1}, {2,3}, {4}; shard k
// of 2 holds chains [floor(3k/2), floor(3(k+1)/2)): shard 0 chain 0, shard 1 chains 1-2),
// and every refusal names the shard; a mixture with ensemble shards is refused.
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { checkScanShardSet, copyShardKeptPoints, mergedScanOutcome, readScanShards, writeScanShard, type LoadedScanShard, type ScanShardIdentity } from '../../src/output/scanShard.js';
import { SHARD_FORMAT } from '../../src/output/ensembleShard.js';
import { OutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { planScan, shardChains, chainPoints } from '../../src/pipeline/scan/scanPlan.js';
import { madeUpRow, madeUpScanIdentity } from '../helpers/scanRows.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scanshard-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const plan = planScan([{ path: 'hubbard.hopping', values: [0.01, 0.02, 0.03, 0.04, 0.05], spacing: 'list' }], 2);
const id = (over: Partial<ScanShardIdentity> = {}): ScanShardIdentity => madeUpScanIdentity(plan, { keepPoints: true, ...over });
// one row with a double that needs all 17 digits, and NaN readings (null in JSON)
const rowOf = (p: number) => madeUpRow(plan, p, { chemicalPotential: 0.1 + 0.2 + p });

/** A committed shard k of K in `collect`, with a kept point folder per row made here. */
async function shard(collect: string, k: number, count: number, over: Partial<ScanShardIdentity> = {}, chainsOverride?: number[]): Promise<string> {
  const chains = chainsOverride ?? shardChains(plan, k, count);
  const rows = chains.flatMap((c) => chainPoints(plan, c)).map(rowOf);
  const kept = join(collect, `kept-${k}`);
  for (const r of rows) {
    mkdirSync(join(kept, String(r.point)), { recursive: true });
    writeFileSync(join(kept, String(r.point), 'summary.json'), `{"point": ${r.point}}`);
  }
  const path = join(collect, `shard-${k}-of-${count}`);
  await writeScanShard(checkOutputTarget(path, { option: '--out' }), id(over), { index: k, count }, chains, rows, { threads: 1, seconds: 2 + k, resumedPoints: 0 }, (p) => join(kept, String(p)));
  return path;
}

const load = (paths: string[]): LoadedScanShard[] => readScanShards(paths) ?? [];

describe('scan shards', () => {
  it('round trip: rows bit for bit, kept points inside the shard; two shards merge into every point once', async () => {
    const collect = join(dir, 'good');
    const paths = [await shard(collect, 0, 2), await shard(collect, 1, 2)];
    expect(readFileSync(join(paths[1], 'points', 'point-000004', 'summary.json'), 'utf8')).toBe('{"point": 4}');
    const shards = load(paths);
    expect(shards.map((s) => s.header.chains)).toEqual([[0], [1, 2]]);
    const { rows } = checkScanShardSet(shards);
    expect(rows.map((r) => r.point)).toEqual([0, 1, 2, 3, 4]);
    expect(rows[3].chemicalPotential).toBe(0.1 + 0.2 + 3);
    expect(Number.isNaN(rows[3].superfluidFraction)).toBe(true);
    const outcome = mergedScanOutcome(shards);
    expect(outcome.rows).toEqual([0, 1, 2, 3, 4].map(rowOf));
    expect(outcome.plan).toEqual(plan);
    expect(outcome.provenance).toMatchObject({ kind: 'merged shards', shards: [{ shard: '0/2', chains: [0], seconds: 2 }, { shard: '1/2', chains: [1, 2], seconds: 3 }] });
    // the kept points of every chain, staged into the merged folder
    const merged = new OutputFolder(checkOutputTarget(join(dir, 'merged'), { option: '--out' }), { command: 'merge', scenarioHash: '1'.repeat(64) });
    copyShardKeptPoints(merged, shards, plan);
    expect(merged.written().sort()).toEqual([0, 1, 2, 3, 4].map((p) => `points/point-00000${p}/summary.json`));
    merged.discard();
  });

  it('refuses a missing shard, a chain held twice, a folder given twice and another scan, naming the shard', async () => {
    const collect = join(dir, 'bad');
    const first = await shard(collect, 0, 2);
    expect(() => checkScanShardSet(load([first]))).toThrow(/shard 1 of 2 \(folder shard-1-of-2\) is missing: chains 1-2 of the scan's 3/);
    expect(() => checkScanShardSet(load([first, first]))).toThrow(/is given twice/);
    const twice = await shard(join(dir, 'twice'), 1, 2, {}, [0, 1, 2]);
    expect(() => checkScanShardSet(load([first, twice]))).toThrow(/chain 0 is in shard 0 of 2 .* and shard 1 of 2/);
    const other = await shard(join(dir, 'other'), 1, 2, { scanHash: '3'.repeat(64) });
    expect(() => checkScanShardSet(load([first, other]))).toThrow(/shard 1 of 2 .* belongs to a different scan than shard 0 of 2 .*: scan \(axes/);
  });

  it('ensemble shards are not scan shards; a mixture is refused', async () => {
    const ensemble = join(dir, 'ensemble-shard');
    mkdirSync(ensemble);
    writeFileSync(join(ensemble, 'shard.json'), JSON.stringify({ format: SHARD_FORMAT }));
    expect(readScanShards([ensemble])).toBeNull();
    const scan = await shard(join(dir, 'mixed'), 0, 2);
    expect(() => readScanShards([scan, ensemble])).toThrow(`merge: ${JSON.stringify(ensemble)} is not a scan shard but ${JSON.stringify(scan)} is`);
    expect(existsSync(join(scan, 'shard.json'))).toBe(true);
  });
});

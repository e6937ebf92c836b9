// Where the shards of a job array stand, read from the collecting folder alone
// (src/output/shardProgress.ts). Folders made by hand for K = 4 shards: a complete shard of
// the expected work (done, its not-converged realisations counted), one of other work
// (foreign, the reason named), a staging folder of a running ensemble shard and the
// partial results of a scan shard (started, with what they hold), and nothing (missing).
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { indexList, shardCountsIn, shardStates } from '../../src/output/shardProgress.js';
import { SHARD_FORMAT } from '../../src/output/ensembleShard.js';
import { SCAN_SHARD_FORMAT } from '../../src/output/scanShard.js';
import { SCAN_WORK_FILE } from '../../src/output/scanWork.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-shardprogress-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const hash = 'c'.repeat(64);
const other = 'd'.repeat(64);

function ensembleShard(folder: string, scenarioHash: string, converged: boolean[]): void {
  mkdirSync(folder, { recursive: true });
  const records = converged.map((c, index) => ({ index, converged: c }));
  writeFileSync(join(folder, 'shard.json'), JSON.stringify({ format: SHARD_FORMAT, scenarioHash, realisations: 8, blockSize: 2, blocks: [{ records }], run: { seconds: 3.5 } }));
}

describe('shardStates', () => {
  it('tells done, foreign, started and missing shards apart', () => {
    const shards = join(dir, 'ensemble');
    ensembleShard(join(shards, 'shard-0-of-4'), hash, [true, false, false]);
    ensembleShard(join(shards, 'shard-1-of-4'), other, [true]);
    const staging = join(shards, '.shard-2-of-4.tmp-123-abc');
    mkdirSync(join(staging, 'blocks', 'block-000004'), { recursive: true });
    mkdirSync(join(staging, 'blocks', 'block-000005'), { recursive: true });
    const states = shardStates(shards, 4, { scenarioHash: hash, scanHash: null, ensemble: { realisations: 8, blockSize: 2 } });
    expect(states.map((s) => s.kind)).toEqual(['done', 'foreign', 'started', 'missing']);
    expect(states[0]).toMatchObject({ notConverged: 2, seconds: 3.5 });
    expect(states[1]).toMatchObject({ reason: `scenario ${other.slice(0, 12)}, expected ${hash.slice(0, 12)}` });
    expect(states[2]).toMatchObject({ folder: staging, detail: '2 blocks staged' });
    expect(states[3]).toEqual({ index: 3, kind: 'missing' });
  });

  it('an ensemble shard of other settings, and a scan shard where an ensemble one is expected, are foreign', () => {
    const shards = join(dir, 'settings');
    ensembleShard(join(shards, 'shard-0-of-2'), hash, [true]);
    mkdirSync(join(shards, 'shard-1-of-2'));
    writeFileSync(join(shards, 'shard-1-of-2', 'shard.json'), JSON.stringify({ format: SCAN_SHARD_FORMAT, scenarioHash: hash, scanHash: 'e'.repeat(64), rows: [], run: { seconds: 1 } }));
    const states = shardStates(shards, 2, { scenarioHash: hash, scanHash: null, ensemble: { realisations: 8, blockSize: 4 } });
    expect(states[0]).toMatchObject({ kind: 'foreign', reason: '8 realisations in blocks of 2, expected 8 in blocks of 4' });
    expect(states[1]).toMatchObject({ kind: 'foreign', reason: 'a scan shard, expected an ensemble shard' });
  });

  it('a scan shard stopped half way is started, with its points counted', () => {
    const shards = join(dir, 'scan');
    const partial = join(shards, 'shard-1-of-2.partial');
    mkdirSync(join(partial, 'points'), { recursive: true });
    writeFileSync(join(partial, SCAN_WORK_FILE), '{}');
    for (const f of ['point-000004.json', 'point-000005.json', 'point-000005.phi.npy', 'point-000006.json.tmp-9']) writeFileSync(join(partial, 'points', f), '');
    const states = shardStates(shards, 2, { scenarioHash: null, scanHash: 'e'.repeat(64), ensemble: null });
    expect(states[0].kind).toBe('missing');
    expect(states[1]).toMatchObject({ kind: 'started', folder: partial, detail: '2 points done' });
  });
});

describe('shard counts and lists', () => {
  it('reads K from shard, staging and partial folder names only', () => {
    const shards = join(dir, 'names');
    for (const name of ['shard-0-of-4', '.shard-2-of-4.tmp-1-x', 'shard-1-of-3.partial', 'shard-x-of-9', 'notes']) mkdirSync(join(shards, name), { recursive: true });
    expect(shardCountsIn(shards)).toEqual([3, 4]);
    expect(shardCountsIn(join(dir, 'absent'))).toEqual([]);
  });

  it('writes index lists as sbatch --array takes them', () => {
    expect(indexList([0, 1, 2, 3, 7])).toBe('0-3,7');
    expect(indexList([5])).toBe('5');
  });
});

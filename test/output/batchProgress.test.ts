// What `tiercake progress` reads (src/output/batchProgress.ts), from folders made here: a
// submission folder (its record, job log, shard states, and the merged result only when
// its marker says `merge` of the same scenario), the same folder moved elsewhere (the
// shards found in its own shards/), a bare collecting folder (shards compared with the
// first complete one), and the refusals for a missing folder and one holding neither.
import { mkdirSync, mkdtempSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readBatchProgress } from '../../src/output/batchProgress.js';
import { appendJobRecord, planSubmission, writeSubmission } from '../../src/output/submission.js';
import { writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { SHARD_FORMAT } from '../../src/output/ensembleShard.js';
import { SCAN_SHARD_FORMAT } from '../../src/output/scanShard.js';
import { planBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import type { BatchWork } from '../../src/pipeline/batchWork.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-batchprogress-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const hash = 'a'.repeat(64);
const work: BatchWork = {
  kind: 'ensemble',
  scenarioName: 'box',
  scenarioHash: hash,
  ensemble: { realisations: 4, blockSize: 2, bins: '{}' },
  blocks: planBlocks(4, 2),
  scan: null,
  workArgs: ['--realisations', '4', '--block-size', '2'],
  submitWorkArgs: ['--ensemble', '4', '--block-size', '2'],
  units: 2,
  unitName: 'blocks',
};
function shard(folder: string, scenarioHash: string): void {
  mkdirSync(folder, { recursive: true });
  writeFileSync(join(folder, 'shard.json'), JSON.stringify({ format: SHARD_FORMAT, scenarioHash, realisations: 4, blockSize: 2, blocks: [], run: { seconds: 1 } }));
}

describe('readBatchProgress', () => {
  it('a submission folder: record, jobs, shard states, and the merge once its result is there', async () => {
    const d = join(dir, 'cluster');
    const plan = planSubmission(work, { dir: d, scenarioPath: '/data/box.json', shards: 2, tool: ['/n', '/m.js'], cpusPerTask: 1, sbatchOptions: [] });
    await writeSubmission(checkOutputTarget(d, { option: '--out' }), plan);
    appendJobRecord(d, { arrayJob: '7', mergeJob: '8', shards: [0, 1], submittedIso: '2026-01-01T00:00:00.000Z', held: false });
    shard(join(d, 'shards', 'shard-0-of-2'), hash);
    let p = readBatchProgress(d);
    if (p.kind !== 'submission') throw new Error('not read as a submission');
    expect(p.submission).toEqual(plan.record);
    expect(p.jobs.map((j) => j.arrayJob)).toEqual(['7']);
    expect(p.states.map((s) => s.kind)).toEqual(['done', 'missing']);
    expect(p.mergedIso).toBeNull();
    // a result folder written by another command is not the merge
    await writeOutputFolder(checkOutputTarget(plan.record.resultDir, { option: '--out' }), { command: 'ensemble', scenarioHash: hash }, (f) => f.write('a.txt', 'x'));
    expect((readBatchProgress(d) as { mergedIso: string | null }).mergedIso).toBeNull();
    await writeOutputFolder(checkOutputTarget(plan.record.resultDir, { option: '--out' }), { command: 'merge', scenarioHash: hash }, (f) => f.write('a.txt', 'x'));
    const marker = readMarker(plan.record.resultDir) as { createdIso: string };
    p = readBatchProgress(d);
    expect((p as { mergedIso: string | null }).mergedIso).toBe(marker.createdIso);
    // moved: the recorded shard folder is gone, its own shards/ is read
    const moved = join(dir, 'moved');
    renameSync(d, moved);
    p = readBatchProgress(moved);
    expect(p.kind === 'submission' && p.shardDir).toBe(join(moved, 'shards'));
    expect(p.kind === 'submission' && p.states[0].kind).toBe('done');
  });

  it('a collecting folder: every K its names show, compared with the first complete shard', () => {
    const d = join(dir, 'collect');
    shard(join(d, 'shard-0-of-3'), hash);
    shard(join(d, 'shard-1-of-3'), 'b'.repeat(64));
    mkdirSync(join(d, 'shard-0-of-2.partial'));
    const p = readBatchProgress(d);
    if (p.kind !== 'shards') throw new Error('not read as shards');
    expect(p.shardDir).toBe(d);
    expect(p.sets.map((s) => s.count)).toEqual([2, 3]);
    expect(p.sets[1].states.map((s) => s.kind)).toEqual(['done', 'foreign', 'missing']);
    expect(p.sets[0].states.map((s) => s.kind)).toEqual(['started', 'missing']);
    // given the folder above it, the shards/ inside is read
    const above = join(dir, 'above');
    shard(join(above, 'shards', 'shard-0-of-1'), hash);
    expect(readBatchProgress(above)).toMatchObject({ kind: 'shards', shardDir: join(above, 'shards') });
  });

  it('a collecting folder: a shard of the same scenario but other work (scan setup, realisations) is foreign, not done', () => {
    const d = join(dir, 'collect-mixed');
    const scanShard = (folder: string, scanHash: string): void => {
      mkdirSync(folder, { recursive: true });
      writeFileSync(join(folder, 'shard.json'), JSON.stringify({ format: SCAN_SHARD_FORMAT, scenarioHash: hash, scanHash, rows: [], run: { seconds: 1 } }));
    };
    scanShard(join(d, 'shard-0-of-3'), 'c'.repeat(64));
    scanShard(join(d, 'shard-1-of-3'), 'd'.repeat(64)); // other --vary of the same scenario
    shard(join(d, 'shard-2-of-3'), hash); // an ensemble shard of the same scenario
    const p = readBatchProgress(d);
    if (p.kind !== 'shards') throw new Error('not read as shards');
    expect(p.sets[0].states.map((s) => s.kind)).toEqual(['done', 'foreign', 'foreign']);
    const ensembles = join(dir, 'collect-ensembles');
    shard(join(ensembles, 'shard-0-of-2'), hash);
    mkdirSync(join(ensembles, 'shard-1-of-2'), { recursive: true });
    writeFileSync(join(ensembles, 'shard-1-of-2', 'shard.json'), JSON.stringify({ format: SHARD_FORMAT, scenarioHash: hash, realisations: 8, blockSize: 2, blocks: [], run: { seconds: 1 } }));
    const q = readBatchProgress(ensembles);
    if (q.kind !== 'shards') throw new Error('not read as shards');
    expect(q.sets[0].states.map((s) => s.kind)).toEqual(['done', 'foreign']);
  });

  it('refuses a missing folder and one with neither a submission nor shards', () => {
    expect(() => readBatchProgress(join(dir, 'nowhere'))).toThrow(/^progress .*nowhere: no such folder/);
    mkdirSync(join(dir, 'empty'));
    expect(() => readBatchProgress(join(dir, 'empty'))).toThrow(/holds no submission \(submit.json\) and no shard folders/);
  });
});

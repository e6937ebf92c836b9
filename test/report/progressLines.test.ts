// What `tiercake progress` prints (src/report/progressLines.ts), for states made up here:
// the done/started/missing/foreign lines, the time since a started shard last wrote, the
// resubmission of the missing shards (and of the started ones, if they no longer run), the
// merge hint when every shard is done, and the hint for a bare collecting folder. The tool
// is asked for only when the bare folder's shards are all done.
import { describe, expect, it } from 'vitest';
import { progressLines, shardStateLines } from '../../src/report/progressLines.js';
import type { BatchProgress } from '../../src/output/batchProgress.js';
import type { ShardState } from '../../src/output/shardProgress.js';
import { planSubmission } from '../../src/output/submission.js';
import { planBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import type { BatchWork } from '../../src/pipeline/batchWork.js';

const now = Date.parse('2026-01-01T12:00:00Z');
const states: ShardState[] = [
  { index: 0, kind: 'done', folder: '/s/shard-0-of-4', notConverged: 1, seconds: 3 },
  { index: 1, kind: 'started', folder: '/s/.shard-1-of-4.tmp-1-a', lastWrittenMs: now - 90_000, detail: '1 block staged' },
  { index: 2, kind: 'missing' },
  { index: 3, kind: 'foreign', folder: '/s/shard-3-of-4', reason: 'another scenario' },
];
const work = {
  kind: 'ensemble',
  scenarioName: 'box',
  scenarioHash: 'a'.repeat(64),
  ensemble: { realisations: 8, blockSize: 2, bins: '{}' },
  blocks: planBlocks(8, 2),
  scan: null,
  workArgs: ['--realisations', '8'],
  submitWorkArgs: ['--ensemble', '8'],
  units: 4,
  unitName: 'blocks',
} satisfies BatchWork;
const sub = planSubmission(work, { dir: '/c', scenarioPath: '/d/box.json', shards: 4, tool: ['/n', '/m.js'], cpusPerTask: 1, sbatchOptions: [] }).record;
const noTool = (): string[] => {
  throw new Error('tool asked for');
};

describe('progress lines', () => {
  it('the four kinds of shard', () => {
    expect(shardStateLines(states, now)).toEqual([
      '  done     0  (1 point or realisation NOT CONVERGED, flagged)',
      '  started  1',
      '  missing  2  (nothing in the folder yet: still queued, or cancelled or failed before they started)',
      '    shard 1: started, not finished (1 block staged, last written 90 s ago): running, or stopped',
      '  foreign  shard 3: /s/shard-3-of-4 is other work (another scenario); merge refuses it, run it again',
    ]);
  });

  it('a submission: resubmit the missing and foreign shards, and the started ones if they stopped', () => {
    const p: BatchProgress = { kind: 'submission', dir: '/c', submission: sub, shardDir: '/c/shards', jobs: [{ arrayJob: '7', mergeJob: null, shards: [0, 1, 2, 3], submittedIso: 'T0', held: false }], states, mergedIso: null };
    const lines = progressLines(p, now, noTool);
    expect(lines[0]).toBe(`disorder ensemble of 8 realisations of box in 4 blocks of 2: 4 shards (scenario ${'a'.repeat(12)})`);
    expect(lines[1]).toBe('  submitted T0: shards 0-3 as job array 7, merge job not submitted');
    expect(lines).toContain('  merged   not yet (/c/result)');
    expect(lines).toContain('once squeue -j 7 no longer lists them, resubmit the missing shards (2-3) with a new merge job:');
    expect(lines).toContain('  /n /m.js submit /d/box.json --ensemble 8 --shards 4 --cpus-per-task 1 --only-shards 2-3 --out /c');
    expect(lines).toContain('  /n /m.js submit /d/box.json --ensemble 8 --shards 4 --cpus-per-task 1 --only-shards 1-3 --out /c');
  });

  it('every shard done: the merge hint until the result is there', () => {
    const done: ShardState[] = [0, 1, 2, 3].map((index) => ({ index, kind: 'done', folder: `/s/${index}`, notConverged: 0, seconds: 1 }));
    const p: BatchProgress = { kind: 'submission', dir: '/c', submission: sub, shardDir: '/c/shards', jobs: [], states: done, mergedIso: null };
    expect(progressLines(p, now, noTool).slice(-2)).toEqual(['every shard is done; the merge job writes the result (if it did not run, merge by hand):', '  /n /m.js merge /c/shards --out /c/result']);
    const merged = progressLines({ ...p, mergedIso: 'T9' }, now, noTool);
    expect(merged[merged.length - 1]).toBe('  merged   yes: /c/result (T9)');
  });

  it('a bare collecting folder', () => {
    const p: BatchProgress = { kind: 'shards', shardDir: '/s', sets: [{ count: 4, states }] };
    expect(progressLines(p, now, noTool).slice(-1)).toEqual(['run the shards 1-3 again with the command that wrote the others and --shard k/4 (or in a job array: sbatch --array=1-3 ...)']);
    const done: ShardState[] = [{ index: 0, kind: 'done', folder: '/s/0', notConverged: 0, seconds: 1 }];
    expect(progressLines({ kind: 'shards', shardDir: '/s', sets: [{ count: 1, states: done }] }, now, () => ['/n', '/m.js']).slice(-1)).toEqual(['every shard is done; merge them: /n /m.js merge /s --out \'<folder>\'']);
  });
});

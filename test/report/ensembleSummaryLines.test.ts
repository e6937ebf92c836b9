// The terminal lines of `ensemble` and of the merge of ensemble shards
// (src/report/ensembleSummaryLines.ts), for statistics made up here: each line written out.
import { describe, expect, it } from 'vitest';
import { ensembleDoneLines, ensembleMergeLines, ensembleShardLines, ensembleThreadNote } from '../../src/report/ensembleSummaryLines.js';
import type { EnsembleStatistics } from '../../src/pipeline/ensemble/ensembleStatistics.js';
import { planBlocks } from '../../src/pipeline/ensemble/blockPlan.js';

const summary = (mean: number, spread: number) => ({ mean, spread, min: mean, max: mean });
const stats = {
  realisations: 8,
  spanningRealisations: 6,
  spanningFraction: 0.75,
  spanningFractionError: 0.153,
  atoms: summary(1234.5678, 12.345),
  condensateFraction: summary(0.41236, 0),
  notConverged: [3],
  superfluidFraction: null,
} as unknown as EnsembleStatistics;

describe('ensemble summary lines', () => {
  it('the thread note says why fewer threads ran', () => {
    expect(ensembleThreadNote(2, 2, 8, 'realisations')).toBe('2 threads, parallel over realisations');
    expect(ensembleThreadNote(1, 4, 1, 'realisations')).toBe('1 thread: only 1 realisation to run side by side, parallel over realisations');
  });

  it('a complete run, with and without the superfluid fraction', () => {
    expect(ensembleDoneLines('box', stats, 3.21, '1 thread, parallel over lattice', 1, '/r')).toEqual([
      'box: 8 realisations in 3.2 s (1 thread, parallel over lattice), 1 NOT CONVERGED',
      '  superfluid spans the cloud in 6 of 8 (fraction 0.750 ± 0.153)',
      '  atoms 1234.57 ± 12.3, condensate fraction 0.4124',
      '  results in /r',
    ]);
    const withFs = { ...stats, superfluidFraction: { mean: 0.123456, spread: 0.0345, standardError: 0.0122, noSuperflowRealisations: 2 } } as unknown as EnsembleStatistics;
    expect(ensembleDoneLines('box', withFs, 1, 'n', 0, '/r')[3]).toBe('  superfluid fraction 0.1235 ± 0.035 (spread; standard error 0.012), no superflow in 2 of 8');
  });

  it('a shard, and a merge', () => {
    const plan = planBlocks(8, 2);
    expect(ensembleShardLines('box', { index: 0, count: 2, source: '--shard' }, plan, [0, 1], 4, 2, 1.5, 'n', '/c/shard-0-of-2', '/c', 'tiercake')).toEqual([
      'box: shard 0 of 2 (index from --shard): blocks 0-1 of 4, 4 realisations in 1.5 s (n)',
      '  2 realisations NOT CONVERGED (flagged in the merged result)',
      '  partial result in /c/shard-0-of-2',
      '  merge when every shard is done: tiercake merge /c --out <folder>',
    ]);
    expect(ensembleShardLines('box', { index: 5, count: 6, source: 'T' }, plan, [], 0, 0, 0, 'n', '/s', '/c', 'node main.js')[0]).toBe('box: shard 5 of 6 (index from T): no blocks (only 4 blocks for 6 shards) in 0.0 s (n)');
    expect(ensembleMergeLines('box', 2, stats, plan, '/out')).toEqual(['box: merged 2 shards, 8 realisations in 4 blocks, 1 NOT CONVERGED', '  superfluid spans the cloud in 6 of 8', '  results in /out']);
  });
});

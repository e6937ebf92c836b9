// What `tiercake submit` prints (src/report/submitSummaryLines.ts), for a plan made by
// planSubmission: the dry run shows both scripts and the two sbatch commands exactly as
// they would run (the merge depends on the array with afterok); a submission names the
// jobs, what the merge waits for, how to follow them and the earlier merges to cancel.
import { describe, expect, it } from 'vitest';
import { dryRunLines, submittedLines } from '../../src/report/submitSummaryLines.js';
import { planSubmission } from '../../src/output/submission.js';
import { planBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import type { BatchWork } from '../../src/pipeline/batchWork.js';

const work: BatchWork = {
  kind: 'ensemble',
  scenarioName: 'box',
  scenarioHash: 'a'.repeat(64),
  ensemble: { realisations: 8, blockSize: 4, bins: '{}' },
  blocks: planBlocks(8, 4),
  scan: null,
  workArgs: ['--realisations', '8', '--block-size', '4'],
  submitWorkArgs: ['--ensemble', '8', '--block-size', '4'],
  units: 2,
  unitName: 'blocks',
};
const plan = planSubmission(work, { dir: '/c/run', scenarioPath: '/data/box.json', shards: 2, tool: ['/n', '/m.js'], cpusPerTask: 1, sbatchOptions: [] });

describe('submit lines', () => {
  it('a dry run: the scripts and the sbatch commands', () => {
    const lines = dryRunLines(plan, ['note: a note'], 'sbatch', ['--hold', '/c/run/jobs/shards.sbatch']);
    expect(lines[0]).toBe('# disorder ensemble of 8 realisations of box in 2 blocks of 4: 2 shard tasks and a merge (dry run: nothing written, nothing submitted)');
    expect(lines[1]).toBe('# note: a note');
    expect(lines).toContain(plan.arrayText);
    expect(lines).toContain(plan.mergeText);
    expect(lines.slice(-3)).toEqual(['sbatch --parsable --hold /c/run/jobs/shards.sbatch', 'sbatch --parsable --dependency=afterok:<array job id> /c/run/jobs/merge.sbatch', '']);
  });

  it('a submission: jobs, the merge, how to follow, earlier merges', () => {
    const lines = submittedLines(plan.record, { arrayJob: '11', mergeJob: '12', tasks: '0-1', held: true, earlierMerges: ['5', '9'] }, [], 1, '/c/run');
    expect(lines).toEqual([
      'disorder ensemble of 8 realisations of box in 2 blocks of 4',
      '  submitted shard tasks 0-1 of 2 as job array 11 (held: start them with scontrol release 11), 1 core each',
      '  merge job 12 runs when every task has succeeded (afterok:11) and writes /c/run/result',
      '  follow:  squeue -j 11,12',
      '           /n /m.js progress /c/run',
      '  logs:    /c/run/logs',
      '  the earlier merge jobs 5, 9 cannot run any more; if squeue still lists them: scancel 5 9',
    ]);
  });
});

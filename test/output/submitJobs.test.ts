// Submitting the jobs of a submission folder (src/output/submitJobs.ts) with a stand-in
// sbatch that logs its arguments and prints job ids as `sbatch --parsable` does (101, 102,
// ...): the array first, then the merge with afterok on the array's id; the job log
// (jobs.jsonl) records both, or the array alone when the merge is refused; the sbatch
// arguments of the array (--hold, --array for --only-shards in SLURM's list form, e.g.
// 0-2,7, as sbatch documents --array) are written out by hand.
// Mutation tried: appending the job record only after a successful merge submission (no
// finally): the refused-merge case finds no record and fails.
import { chmodSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { arrayJobArguments, submitJobs } from '../../src/output/submitJobs.js';
import { readJobRecords, type SubmissionPlan } from '../../src/output/submission.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-submitjobs-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const plan = { record: { arrayScript: '/x/jobs/shards.sbatch', mergeScript: '/x/jobs/merge.sbatch' } } as unknown as SubmissionPlan;

/** A stand-in sbatch in `folder`: logs its arguments, prints the next id; refuses its call number `refuse`. */
function standIn(folder: string, refuse = 0): string {
  const path = join(folder, 'sbatch');
  writeFileSync(
    path,
    `#!/bin/bash\nn=$(cat ${folder}/counter 2>/dev/null || echo 100); n=$((n + 1)); echo $n > ${folder}/counter\necho "$*" >> ${folder}/sbatch.log\n` +
      `if [ $n -eq $((100 + ${refuse})) ]; then echo "sbatch: error: no" >&2; exit 1; fi\necho "$n;cluster"\n`,
  );
  chmodSync(path, 0o755);
  return path;
}

describe('submit jobs', () => {
  it('array arguments: held, only some shards, then the array script', () => {
    expect(arrayJobArguments(plan, false, null)).toEqual(['/x/jobs/shards.sbatch']);
    expect(arrayJobArguments(plan, true, [0, 1, 2, 7])).toEqual(['--hold', '--array=0-2,7', '/x/jobs/shards.sbatch']);
  });

  it('submits the array, then the merge after it, and logs both', () => {
    const folder = mkdtempSync(join(dir, 'ok-'));
    const ids = submitJobs(standIn(folder), folder, plan, arrayJobArguments(plan, false, null), { count: 3, only: null, held: false }, () => '2026-01-02T03:04:05.000Z');
    expect(ids).toEqual({ arrayJob: '101', mergeJob: '102', tasks: '0-2' });
    expect(readFileSync(join(folder, 'sbatch.log'), 'utf8').trim().split('\n')).toEqual(['--parsable /x/jobs/shards.sbatch', '--parsable --dependency=afterok:101 /x/jobs/merge.sbatch']);
    expect(readJobRecords(folder)).toEqual([{ arrayJob: '101', mergeJob: '102', shards: [0, 1, 2], submittedIso: '2026-01-02T03:04:05.000Z', held: false }]);
  });

  it('a refused merge still leaves the array in the job log', () => {
    const folder = mkdtempSync(join(dir, 'refused-'));
    const only = [1, 2];
    expect(() => submitJobs(standIn(folder, 2), folder, plan, arrayJobArguments(plan, true, only), { count: 3, only, held: true }, () => 'then')).toThrow(InputError);
    expect(readJobRecords(folder)).toEqual([{ arrayJob: '101', mergeJob: null, shards: [1, 2], submittedIso: 'then', held: true }]);
  });
});

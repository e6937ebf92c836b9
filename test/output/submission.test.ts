// The record of a `tiercake submit` (src/output/submission.ts): the folder layout, the
// arguments of the shard tasks and of a resubmission, and the scripts follow from the work
// (checked against the layout the file header documents, written out here); the record
// survives the round trip through submit.json and is refused when damaged; a resubmission
// (--only-shards) is refused for a folder without a record, for different work and for a
// shard that is done, and otherwise names the earlier merge jobs; the job log skips a
// damaged line.
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { appendJobRecord, checkResubmission, planSubmission, readJobRecords, readSubmission, SubmissionSchema, SUBMISSION_FILE, writeSubmission, type SubmissionChoices } from '../../src/output/submission.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { SHARD_FORMAT } from '../../src/output/ensembleShard.js';
import { planBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import type { BatchWork } from '../../src/pipeline/batchWork.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-submission-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const hash = 'f'.repeat(64);
const work: BatchWork = {
  kind: 'ensemble',
  scenarioName: 'box',
  scenarioHash: hash,
  ensemble: { realisations: 8, blockSize: 2, bins: '{"binsPerAtom":20}' },
  blocks: planBlocks(8, 2),
  scan: null,
  workArgs: ['--realisations', '8', '--block-size', '2'],
  submitWorkArgs: ['--ensemble', '8', '--block-size', '2'],
  units: 4,
  unitName: 'blocks',
};
const choices = (sub: string, shards = 3): SubmissionChoices => ({
  dir: join(dir, sub),
  scenarioPath: '/data/box.json',
  shards,
  tool: ['/usr/bin/node', '/opt/tiercake/dist/main.js'],
  partition: 'short',
  cpusPerTask: 2,
  sbatchOptions: ['--account=lab42'],
});

describe('planSubmission', () => {
  it('lays out the folder and the arguments of tasks and resubmissions', () => {
    const { record, arrayText, mergeText } = planSubmission(work, choices('plan'));
    const d = join(dir, 'plan');
    expect(SubmissionSchema.safeParse(record).success).toBe(true);
    expect(record).toMatchObject({
      kind: 'ensemble',
      describes: 'disorder ensemble of 8 realisations of box in 4 blocks of 2',
      shardDir: join(d, 'shards'),
      resultDir: join(d, 'result'),
      logDir: join(d, 'logs'),
      arrayScript: join(d, 'jobs', 'shards.sbatch'),
      mergeScript: join(d, 'jobs', 'merge.sbatch'),
      scanHash: null,
      shards: 3,
    });
    expect(record.taskArgs).toEqual(['ensemble', '/data/box.json', '--realisations', '8', '--block-size', '2', '--out', join(d, 'shards')]);
    expect(record.submitArgs).toEqual(['/data/box.json', '--ensemble', '8', '--block-size', '2', '--shards', '3', '--partition', 'short', '--cpus-per-task', '2', '--sbatch-option=--account=lab42']);
    expect(record.tool.command).toEqual(['/usr/bin/node', '/opt/tiercake/dist/main.js']);
    expect(arrayText).toContain('#SBATCH --array=0-2');
    expect(arrayText).toContain('#SBATCH --partition=short');
    expect(arrayText).toContain(`/usr/bin/node /opt/tiercake/dist/main.js ensemble /data/box.json --realisations 8 --block-size 2 --out ${join(d, 'shards')} --shard-from-env SLURM_ARRAY_TASK_ID --shards 3 --threads 2`);
    expect(mergeText).toContain(`merge ${join(d, 'shards')} --out ${join(d, 'result')}`);
    expect(mergeText).toContain('#SBATCH --cpus-per-task=1');
  });
});

describe('the submission folder', () => {
  it('round trip through submit.json; the tasks get their log and shard folders', async () => {
    const c = choices('written');
    const plan = planSubmission(work, c);
    await writeSubmission(checkOutputTarget(c.dir, { option: '--out' }), plan);
    expect(readSubmission(c.dir, '--out')).toEqual(plan.record);
    expect(readFileSync(join(c.dir, 'jobs', 'shards.sbatch'), 'utf8')).toBe(plan.arrayText);
    expect(existsSync(join(c.dir, 'logs'))).toBe(true);
    expect(existsSync(join(c.dir, 'shards'))).toBe(true);
    expect(readSubmission(join(dir, 'nothing-here'), '--out')).toBeNull();
  });

  it('a damaged record is an input error naming the option and the folder', () => {
    const d = join(dir, 'damaged');
    mkdirSync(d);
    writeFileSync(join(d, SUBMISSION_FILE), '{"format": "tiercake-submission"}');
    expect(() => readSubmission(d, 'progress')).toThrow(`progress ${d}: ${SUBMISSION_FILE} is not a tiercake submission record`);
  });

  it('the job log keeps every submission and skips a damaged line', () => {
    const d = join(dir, 'jobs');
    mkdirSync(d);
    appendJobRecord(d, { arrayJob: '101', mergeJob: '102', shards: [0, 1, 2], submittedIso: '2026-01-01T00:00:00.000Z', held: false });
    writeFileSync(join(d, 'jobs.jsonl'), `${readFileSync(join(d, 'jobs.jsonl'), 'utf8')}{"arrayJob": \n`);
    appendJobRecord(d, { arrayJob: '103', mergeJob: null, shards: [1], submittedIso: '2026-01-02T00:00:00.000Z', held: true });
    expect(readJobRecords(d).map((r) => r.arrayJob)).toEqual(['101', '103']);
    expect(readJobRecords(join(dir, 'no-jobs'))).toEqual([]);
  });
});

describe('checkResubmission', () => {
  it('refuses without a record, for different work and for a shard that is done; else names the earlier merges', async () => {
    const c = choices('again');
    const plan = planSubmission(work, c);
    expect(() => checkResubmission(c.dir, plan.record, [1])).toThrow(/--only-shards: .* holds no submit.json; submit the whole array first/);
    await writeSubmission(checkOutputTarget(c.dir, { option: '--out' }), plan);
    const four = planSubmission(work, choices('again', 4)).record;
    expect(() => checkResubmission(c.dir, four, [1])).toThrow(/is different work: it has 3 shards, not 4; resubmit with the same arguments/);
    const otherScenario = { ...plan.record, scenarioHash: '0'.repeat(64) };
    expect(() => checkResubmission(c.dir, otherScenario, [1])).toThrow(`its scenario hash is ${hash.slice(0, 12)}, this one 000000000000`);
    // shard 1 of 3 finished with the expected work
    mkdirSync(join(plan.record.shardDir, 'shard-1-of-3'));
    writeFileSync(join(plan.record.shardDir, 'shard-1-of-3', 'shard.json'), JSON.stringify({ format: SHARD_FORMAT, scenarioHash: hash, realisations: 8, blockSize: 2, blocks: [], run: { seconds: 1 } }));
    expect(() => checkResubmission(c.dir, plan.record, [1, 2])).toThrow(InputError);
    expect(() => checkResubmission(c.dir, plan.record, [1, 2])).toThrow('--only-shards: shard 1 is done already');
    appendJobRecord(c.dir, { arrayJob: '201', mergeJob: '202', shards: [0, 1, 2], submittedIso: '2026-01-01T00:00:00.000Z', held: false });
    appendJobRecord(c.dir, { arrayJob: '203', mergeJob: null, shards: [2], submittedIso: '2026-01-01T01:00:00.000Z', held: false });
    expect(checkResubmission(c.dir, plan.record, [0, 2])).toEqual(['202']);
  });
});

// The record of a `tiercake submit` in its folder, so that `tiercake progress` can tell
// from the folder alone which shards are done and say how to resubmit the others, and a
// resubmission (--only-shards) can check that it continues the same work. planSubmission
// makes the record and the scripts from the work (src/pipeline/batchWork.ts).
//
// The submission folder holds
//   submit.json          this record (written with the folder's marker)
//   jobs/shards.sbatch   the job array (task k runs shard k of K)
//   jobs/merge.sbatch    the merge (submitted with --dependency=afterok:<array>)
//   jobs.jsonl           one line per sbatch submission: job ids, shards, time (appended)
//   logs/                the tasks' logs (shard-<k>.log, merge-<job>.log)
//   shards/              the shards' partial results (shard-k-of-K/)
//   result/              the merged result

import { appendFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as z from 'zod';
import { InputError } from '../scenario/inputError.js';
import type { BatchWork } from '../pipeline/batchWork.js';
import { mergeScript, shardArrayScript, shellWords, type BatchSettings } from './batchScripts.js';
import { writeOutputFolder, type CommitReport } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { describeScan, scanSetupHash } from './scanIdentity.js';
import { indexList, shardStates } from './shardProgress.js';
import { Sha256HexSchema, ToolStampSchema, toolStamp } from './recordFields.js';

export const SUBMISSION_FILE = 'submit.json';
export const SUBMISSION_FORMAT = 'tiercake-submission';
export const JOBS_LOG = 'jobs.jsonl';

export const SubmissionSchema = z.strictObject({
  format: z.literal(SUBMISSION_FORMAT),
  formatVersion: z.literal(1),
  tool: z.strictObject({ ...ToolStampSchema.shape, command: z.array(z.string()).min(1) }),
  kind: z.enum(['ensemble', 'scan']),
  describes: z.string(),
  scenarioName: z.string(),
  scenarioPath: z.string(),
  scenarioHash: Sha256HexSchema,
  /** ensemble: realisations and block size; scan: the scan's identity hash */
  ensemble: z.strictObject({ realisations: z.int().min(1), blockSize: z.int().min(1), bins: z.string() }).nullable(),
  scanHash: Sha256HexSchema.nullable(),
  shards: z.int().min(1),
  /** the submit arguments that describe the work (scenario first), for a resubmission */
  submitArgs: z.array(z.string()),
  /** arguments of every shard task (before the shard options) */
  taskArgs: z.array(z.string()),
  shardDir: z.string(),
  resultDir: z.string(),
  logDir: z.string(),
  arrayScript: z.string(),
  mergeScript: z.string(),
});

export type Submission = z.infer<typeof SubmissionSchema>;

/** The submission record of `dir`, or null when there is none; a damaged one is an InputError. */
export function readSubmission(dir: string, option: string): Submission | null {
  const file = join(dir, SUBMISSION_FILE);
  if (!existsSync(file)) return null;
  let parsed;
  try {
    parsed = SubmissionSchema.safeParse(JSON.parse(readFileSync(file, 'utf8')));
  } catch {
    parsed = null;
  }
  if (!parsed?.success) throw new InputError(`${option} ${dir}: ${SUBMISSION_FILE} is not a tiercake submission record (damaged or from another version)`);
  return parsed.data;
}

export interface JobRecord {
  arrayJob: string;
  mergeJob: string | null;
  shards: number[];
  submittedIso: string;
  held: boolean;
}

export function appendJobRecord(dir: string, record: JobRecord): void {
  appendFileSync(join(dir, JOBS_LOG), `${JSON.stringify(record)}\n`);
}

/** Every submission of the folder, oldest first (unreadable lines are skipped). */
export function readJobRecords(dir: string): JobRecord[] {
  const file = join(dir, JOBS_LOG);
  if (!existsSync(file)) return [];
  return readFileSync(file, 'utf8')
    .split('\n')
    .filter((l) => l.trim().length > 0)
    .flatMap((l) => {
      try {
        return [JSON.parse(l) as JobRecord];
      } catch {
        return [];
      }
    });
}

/** A submission before it is written: its record and its two scripts. */
export interface SubmissionPlan {
  record: Submission;
  arrayText: string;
  mergeText: string;
}

export interface SubmissionChoices {
  /** the submission folder (absolute) */
  dir: string;
  /** the scenario file (absolute) */
  scenarioPath: string;
  shards: number;
  /** the tool as the tasks start it: [absolute node, absolute main.js] */
  tool: string[];
  partition?: string;
  time?: string;
  cpusPerTask: number;
  sbatchOptions: readonly string[];
}

/**
 * The folder layout, the shard tasks' and the resubmission's arguments, and the scripts
 * of submitting `work`; the record says what the work is and how it is identified (the
 * scenario hash, the ensemble's settings or the scan's identity hash).
 */
export function planSubmission(work: BatchWork, c: SubmissionChoices): SubmissionPlan {
  const describes =
    work.scan !== null
      ? `scan of ${work.scenarioName}: ${describeScan(work.scan.plan)}`
      : `disorder ensemble of ${work.ensemble?.realisations} realisations of ${work.scenarioName} in ${work.blocks?.blockCount} blocks of ${work.ensemble?.blockSize}`;
  const shardDir = join(c.dir, 'shards');
  const resultDir = join(c.dir, 'result');
  const logDir = join(c.dir, 'logs');
  const taskArgs = [work.kind, c.scenarioPath, ...work.workArgs, '--out', shardDir];
  const settings: BatchSettings = {
    jobName: `tc-${work.scenarioName}`,
    ...(c.partition !== undefined ? { partition: c.partition } : {}),
    ...(c.time !== undefined ? { time: c.time } : {}),
    cpusPerTask: c.cpusPerTask,
    extra: c.sbatchOptions,
  };
  const submitArgs = [
    c.scenarioPath,
    ...work.submitWorkArgs,
    '--shards',
    String(c.shards),
    ...(c.partition !== undefined ? ['--partition', c.partition] : []),
    ...(c.time !== undefined ? ['--time', c.time] : []),
    '--cpus-per-task',
    String(c.cpusPerTask),
    ...c.sbatchOptions.map((s) => `--sbatch-option=${s}`),
  ];
  const record: Submission = {
    format: SUBMISSION_FORMAT,
    formatVersion: 1,
    tool: { ...toolStamp(), command: c.tool },
    kind: work.kind,
    describes,
    scenarioName: work.scenarioName,
    scenarioPath: c.scenarioPath,
    scenarioHash: work.scenarioHash,
    ensemble: work.ensemble,
    scanHash: work.scan !== null ? scanSetupHash(work.scan) : null,
    shards: c.shards,
    submitArgs,
    taskArgs,
    shardDir,
    resultDir,
    logDir,
    arrayScript: join(c.dir, 'jobs', 'shards.sbatch'),
    mergeScript: join(c.dir, 'jobs', 'merge.sbatch'),
  };
  return {
    record,
    arrayText: shardArrayScript({ ...settings, shards: c.shards, tool: c.tool, taskArgs, logDir, what: describes }),
    mergeText: mergeScript({ ...settings, cpusPerTask: 1, tool: c.tool, shardDir, resultDir, logDir, what: describes }),
  };
}

/** Write the submission folder at `target` (record and scripts) and the folders the tasks write into. */
export async function writeSubmission(target: OutputTarget, plan: SubmissionPlan): Promise<CommitReport | null> {
  const { commit } = await writeOutputFolder(target, { command: 'submit', scenarioHash: plan.record.scenarioHash }, (folder) => {
    folder.write(SUBMISSION_FILE, `${JSON.stringify(plan.record, null, 2)}\n`);
    folder.write('jobs/shards.sbatch', plan.arrayText);
    folder.write('jobs/merge.sbatch', plan.mergeText);
  });
  // SLURM does not create the folder of a job's output file: the tasks need it now.
  mkdirSync(plan.record.logDir, { recursive: true });
  mkdirSync(plan.record.shardDir, { recursive: true });
  return commit;
}

/**
 * Check that `--only-shards` continues the submission in `dir`: the same work (kind,
 * scenario hash, shard count, task arguments) and none of `only` done already. Returns
 * the merge jobs of the earlier submissions (they can no longer run).
 */
export function checkResubmission(dir: string, planned: Submission, only: readonly number[]): string[] {
  const sub = readSubmission(dir, '--out');
  if (sub === null) throw new InputError(`--only-shards: ${dir} holds no ${SUBMISSION_FILE}; submit the whole array first (without --only-shards)`);
  const count = planned.shards;
  const differs: string[] = [];
  if (sub.kind !== planned.kind) differs.push(`it is ${sub.kind === 'ensemble' ? 'an ensemble' : 'a scan'}`);
  if (sub.scenarioHash !== planned.scenarioHash) differs.push(`its scenario hash is ${sub.scenarioHash.slice(0, 12)}, this one ${planned.scenarioHash.slice(0, 12)} (the scenario file or --set changed)`);
  if (sub.shards !== count) differs.push(`it has ${sub.shards} shards, not ${count}`);
  if (JSON.stringify(sub.taskArgs) !== JSON.stringify(planned.taskArgs)) differs.push(`its tasks run ${shellWords(sub.taskArgs)}`);
  if (differs.length > 0) throw new InputError(`--only-shards: the submission in ${dir} is different work: ${differs.join('; ')}; resubmit with the same arguments (tiercake progress ${dir} prints them)`);
  const states = shardStates(sub.shardDir, count, { scenarioHash: sub.scenarioHash, scanHash: sub.scanHash, ensemble: sub.ensemble });
  const done = only.filter((k) => states[k].kind === 'done');
  if (done.length > 0) throw new InputError(`--only-shards: shard${done.length > 1 ? 's' : ''} ${indexList(done)} ${done.length > 1 ? 'are' : 'is'} done already (${sub.shardDir}); leave ${done.length > 1 ? 'them' : 'it'} out`);
  mkdirSync(planned.logDir, { recursive: true });
  return readJobRecords(dir).flatMap((r) => (r.mergeJob ? [r.mergeJob] : []));
}

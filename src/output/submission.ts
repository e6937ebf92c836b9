// The record of a `tiercake submit` in its folder, so that `tiercake progress` can tell
// from the folder alone which shards are done and say how to resubmit the others, and a
// resubmission (--only-shards) can check that it continues the same work.
//
// The submission folder holds
//   submit.json          this record (written with the folder's marker)
//   jobs/shards.sbatch   the job array (task k runs shard k of K)
//   jobs/merge.sbatch    the merge (submitted with --dependency=afterok:<array>)
//   jobs.jsonl           one line per sbatch submission: job ids, shards, time (appended)
//   logs/                the tasks' logs (shard-<k>.log, merge-<job>.log)
//   shards/              the shards' partial results (shard-k-of-K/)
//   result/              the merged result

import { appendFileSync, existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as z from 'zod';
import { InputError } from '../scenario/inputError.js';

export const SUBMISSION_FILE = 'submit.json';
export const SUBMISSION_FORMAT = 'tiercake-submission';
export const JOBS_LOG = 'jobs.jsonl';

export const SubmissionSchema = z.strictObject({
  format: z.literal(SUBMISSION_FORMAT),
  formatVersion: z.literal(1),
  tool: z.strictObject({ name: z.literal('tiercake'), version: z.string(), command: z.array(z.string()).min(1) }),
  kind: z.enum(['ensemble', 'scan']),
  describes: z.string(),
  scenarioName: z.string(),
  scenarioPath: z.string(),
  scenarioHash: z.string().regex(/^[0-9a-f]{64}$/),
  /** ensemble: realisations and block size; scan: the scan's identity hash */
  ensemble: z.strictObject({ realisations: z.int().min(1), blockSize: z.int().min(1), bins: z.string() }).nullable(),
  scanHash: z.string().regex(/^[0-9a-f]{64}$/).nullable(),
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

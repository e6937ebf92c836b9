// Submitting the jobs of a `tiercake submit` folder (submission.ts): the job array of the
// shard tasks first, then the merge job with --dependency=afterok on the whole array, each
// through sbatch (sbatchRun.ts). Every submission is appended to the folder's job log
// (jobs.jsonl), also when the merge job could not be submitted after the array was, so
// that the folder always says which jobs exist.

import { indexList } from './shardProgress.js';
import { runSbatch } from './sbatchRun.js';
import { appendJobRecord, type SubmissionPlan } from './submission.js';

/** The sbatch arguments of the job array: held (--hold), only some shards (--only-shards), the array script. */
export function arrayJobArguments(plan: SubmissionPlan, hold: boolean, only: readonly number[] | null): string[] {
  return [...(hold ? ['--hold'] : []), ...(only ? [`--array=${indexList(only)}`] : []), plan.record.arrayScript];
}

export interface SubmittedJobIds {
  arrayJob: string;
  mergeJob: string | null;
  /** the shard tasks submitted, e.g. "0-7" or "2,5" */
  tasks: string;
}

/** Submit the array (`arrayArgs`, arrayJobArguments) and the merge job of the submission folder `dir`. */
export function submitJobs(
  sbatchCommand: string,
  dir: string,
  plan: SubmissionPlan,
  arrayArgs: readonly string[],
  shards: { count: number; only: readonly number[] | null; held: boolean },
  nowIso: () => string = () => new Date().toISOString(),
): SubmittedJobIds {
  const { count, only, held } = shards;
  const arrayJob = runSbatch(sbatchCommand, arrayArgs);
  let mergeJob: string | null = null;
  try {
    mergeJob = runSbatch(sbatchCommand, [`--dependency=afterok:${arrayJob}`, plan.record.mergeScript]);
  } finally {
    appendJobRecord(dir, { arrayJob, mergeJob, shards: only ? [...only] : Array.from({ length: count }, (_, k) => k), submittedIso: nowIso(), held });
  }
  return { arrayJob, mergeJob, tasks: only ? indexList(only) : `0-${count - 1}` };
}

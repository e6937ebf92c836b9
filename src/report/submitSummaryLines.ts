// What `tiercake submit` prints, as plain lines (no I/O): the scripts and sbatch commands
// of a dry run, and the job ids of a submission with how to follow them.

import { shellWords } from '../output/batchScripts.js';
import type { SubmissionPlan } from '../output/submission.js';

/** The scripts and the sbatch commands that would submit them (`arrayArgs`: options and the array script). */
export function dryRunLines(plan: SubmissionPlan, notes: readonly string[], sbatch: string, arrayArgs: readonly string[]): string[] {
  const r = plan.record;
  return [
    `# ${r.describes}: ${r.shards} shard tasks and a merge (dry run: nothing written, nothing submitted)`,
    ...notes.map((n) => `# ${n}`),
    `# ---- ${r.arrayScript}`,
    plan.arrayText,
    `# ---- ${r.mergeScript}`,
    plan.mergeText,
    '# ---- submitted with',
    shellWords([sbatch, '--parsable', ...arrayArgs]),
    `${shellWords([sbatch, '--parsable'])} --dependency=afterok:<array job id> ${shellWords([r.mergeScript])}`,
    '',
  ];
}

export interface SubmittedJobs {
  arrayJob: string;
  mergeJob: string | null;
  /** the shard tasks submitted, e.g. "0-7" or "2,5" */
  tasks: string;
  held: boolean;
  /** merge jobs of earlier submissions, which cannot run any more */
  earlierMerges: readonly string[];
}

/** The job ids, what each job does, and how to follow them. */
export function submittedLines(r: SubmissionPlan['record'], jobs: SubmittedJobs, notes: readonly string[], cpus: number, dir: string): string[] {
  const { arrayJob, mergeJob, earlierMerges } = jobs;
  return [
    `${r.describes}`,
    `  submitted shard tasks ${jobs.tasks} of ${r.shards} as job array ${arrayJob}${jobs.held ? ' (held: start them with scontrol release ' + arrayJob + ')' : ''}, ${cpus} core${cpus === 1 ? '' : 's'} each`,
    `  merge job ${mergeJob} runs when every task has succeeded (afterok:${arrayJob}) and writes ${r.resultDir}`,
    ...notes.map((n) => `  ${n}`),
    `  follow:  squeue -j ${arrayJob},${mergeJob}`,
    `           ${shellWords([...r.tool.command, 'progress', dir])}`,
    `  logs:    ${r.logDir}`,
    ...(earlierMerges.length > 0 ? [`  the earlier merge job${earlierMerges.length > 1 ? 's' : ''} ${earlierMerges.join(', ')} cannot run any more; if squeue still lists ${earlierMerges.length > 1 ? 'them' : 'it'}: scancel ${earlierMerges.join(' ')}`] : []),
  ];
}

// The SLURM batch scripts of `tiercake submit`: a job array whose task k runs shard k of K
// (the index from SLURM_ARRAY_TASK_ID, through --shard-from-env), and a merge job that the
// submission makes depend on the whole array (--dependency=afterok:ARRAY). Plain text from
// plain data; every path and argument is single-quoted for bash, so spaces and quotes in
// folder names cannot break the script.
//
// Exit codes: a shard that did not converge exits 3 with its results written and flagged;
// the task script turns that into 0 so that afterok still lets the merge run (the merged
// result carries the flags). Any other failure fails the task, and the merge, which needs
// every task to succeed, does not run (with DependencyParameters=kill_invalid_depend SLURM
// cancels it; otherwise it waits, DependencyNeverSatisfied, until cancelled).

/** 'text' for bash: single quotes, an inner ' written as '\''. */
export function shellQuote(text: string): string {
  return /^[A-Za-z0-9_./=:,@%+-]+$/.test(text) ? text : `'${text.replace(/'/g, `'\\''`)}'`;
}

export const shellWords = (words: readonly string[]): string => words.map(shellQuote).join(' ');

export interface BatchSettings {
  /** job name stem, e.g. tc-layer-two-shells */
  jobName: string;
  partition?: string;
  time?: string;
  cpusPerTask: number;
  /** extra sbatch options, each one word such as --account=lab42 */
  extra: readonly string[];
}

export interface ArrayScriptSpec extends BatchSettings {
  shards: number;
  /** the tool: [absolute node, absolute main.js] */
  tool: readonly string[];
  /** the command and its arguments for every task, without the shard options */
  taskArgs: readonly string[];
  logDir: string;
  what: string;
}

export interface MergeScriptSpec extends BatchSettings {
  tool: readonly string[];
  shardDir: string;
  resultDir: string;
  logDir: string;
  what: string;
}

function header(s: BatchSettings, name: string, lines: readonly string[]): string[] {
  return [
    '#!/bin/bash',
    ...lines.map((l) => `# ${l}`),
    `#SBATCH --job-name=${shellQuote(name)}`,
    ...(s.partition ? [`#SBATCH --partition=${shellQuote(s.partition)}`] : []),
    ...(s.time ? [`#SBATCH --time=${s.time}`] : []),
    ...s.extra.map((e) => `#SBATCH ${e}`),
  ];
}

/** The job array: task k runs shard k of K. `#SBATCH --array` covers all shards; a resubmission overrides it on the sbatch command line. */
export function shardArrayScript(spec: ArrayScriptSpec): string {
  const lines = [
    ...header(spec, spec.jobName, [
      `Written by tiercake submit: ${spec.what}.`,
      `Array task k runs shard k of ${spec.shards} (k from SLURM_ARRAY_TASK_ID) with ${spec.cpusPerTask} thread${spec.cpusPerTask === 1 ? '' : 's'}.`,
      'Resubmit some shards with: sbatch --array=2,5 <this file> (then a new merge job; tiercake progress prints both).',
    ]),
    `#SBATCH --array=0-${spec.shards - 1}`,
    `#SBATCH --cpus-per-task=${spec.cpusPerTask}`,
    `#SBATCH --output=${shellQuote(`${spec.logDir}/shard-%a.log`)}`,
    '',
    'set -u',
    `${shellWords([...spec.tool, ...spec.taskArgs, '--shard-from-env', 'SLURM_ARRAY_TASK_ID', '--shards', String(spec.shards), '--threads', String(spec.cpusPerTask)])}`,
    'rc=$?',
    '# 3: not converged, results written and flagged (the merge flags them too): let the merge run',
    'if [ "$rc" -eq 3 ]; then exit 0; fi',
    'exit "$rc"',
    '',
  ];
  return lines.join('\n');
}

/** The merge job (submitted with --dependency=afterok on the array). */
export function mergeScript(spec: MergeScriptSpec): string {
  const lines = [
    ...header(spec, `${spec.jobName}-merge`, [
      `Written by tiercake submit: merges the shards of ${spec.what}.`,
      'Submitted with --dependency=afterok:<array job>: runs only when every shard task succeeded.',
    ]),
    '#SBATCH --cpus-per-task=1',
    `#SBATCH --output=${shellQuote(`${spec.logDir}/merge-%j.log`)}`,
    '',
    'set -u',
    `exec ${shellWords([...spec.tool, 'merge', spec.shardDir, '--out', spec.resultDir])}`,
    '',
  ];
  return lines.join('\n');
}

/** A SLURM time limit: minutes, m:s, h:m:s, d-h, d-h:m or d-h:m:s. */
export function isSlurmTime(text: string): boolean {
  return /^\d+(:\d{1,2}){0,2}$/.test(text) || /^\d+-\d+(:\d{1,2}){0,2}$/.test(text);
}

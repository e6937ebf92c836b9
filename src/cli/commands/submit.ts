// `tiercake submit SCENARIO (--ensemble N | --scan --vary ...) --shards K --out DIR`: writes
// the SLURM batch scripts of a sharded run into DIR (src/output/batchScripts.ts: a job
// array of K shard tasks, and a merge job), submits the array with sbatch and then the
// merge with --dependency=afterok on the whole array, and prints the job ids and how to
// follow them. Each task runs `tiercake ensemble|scan ... --shard-from-env
// SLURM_ARRAY_TASK_ID --shards K --threads C` through absolute paths of node and this
// tiercake (toolInvocation.ts), so it runs on any node that shares the file system.
//
// --dry-run prints the scripts and the sbatch commands and writes nothing. --hold submits
// the tasks held (scontrol release JOB starts them). --only-shards 2,5 submits those shards
// again into an earlier submission folder (the work must be the same: scenario hash, the
// ensemble's or scan's settings, K), with a new merge job; `tiercake progress DIR` prints
// that command for the shards that are missing.

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { checkSbatchChoices } from '../../output/sbatchChoices.js';
import { checkResubmission, planSubmission, writeSubmission } from '../../output/submission.js';
import { arrayJobArguments, submitJobs } from '../../output/submitJobs.js';
import { defaultOutputFolder } from '../../output/defaultOutputFolders.js';
import { toolInvocation } from '../../output/toolInvocation.js';
import { batchWork } from '../../pipeline/batchWork.js';
import { dryRunLines, submittedLines } from '../../report/submitSummaryLines.js';
import { submitNotes } from '../../report/submitNotes.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { readOptions, type RawOptions } from '../options.js';
import { registerScenarioCommand } from '../scenarioCommand.js';
import { memoryLimitBytes } from '../machine.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { parseInteger } from '../numberText.js';
import { parseVaryOptions } from '../varyOption.js';

const OPTIONS = [
  'ensemble', 'scan', 'vary', 'log', 'fixed', 'chainLength', 'realisations', 'keepPoints', 'blockSize', 'binsPerAtom', 'set', 'shards', 'partition',
  'time', 'cpusPerTask', 'sbatchOption', 'hold', 'dryRun', 'onlyShards', 'sbatch', 'out', 'force',
] as const;

export function registerSubmit(program: Command, context: CommandContext): void {
  registerScenarioCommand(program, context, {
    name: 'submit',
    description: 'submit a sharded ensemble or scan to SLURM: a job array of shard tasks and a merge job that waits for all of them',
    scenarioHelp: 'scenario file (JSON)',
    options: OPTIONS,
    overrides: {
      shards: { help: 'number of shard tasks in the job array (required)' },
      out: { help: 'submission folder: scripts, logs, shards and the merged result (default out/<name>-cluster)' },
      force: { help: 'if the submission folder exists and holds other files, move it aside to <name>.replaced-<time> (nothing is deleted)' },
    },
    run: runSubmitCommand,
  });
}

/** "2,5" or "0-3,7" -> indices, each below K. */
export function parseShardList(text: string, count: number): number[] {
  const out = new Set<number>();
  for (const part of text.split(',')) {
    const m = /^\s*(\d+)\s*(?:-\s*(\d+)\s*)?$/.exec(part);
    if (!m) throw new InputError(`--only-shards: expected shard numbers like 2,5 or 0-3,7 (counted from 0), got ${JSON.stringify(text)}`);
    const a = parseInteger(m[1], '--only-shards', { min: 0, max: count - 1 });
    const b = m[2] === undefined ? a : parseInteger(m[2], '--only-shards', { min: a, max: count - 1 });
    for (let k = a; k <= b; k++) out.add(k);
  }
  return [...out].sort((x, y) => x - y);
}

export async function runSubmitCommand(scenarioPath: string, raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  checkSbatchChoices({ time: o.time, partition: o.partition, sbatchOptions: o.sbatchOption });
  if (o.shards === undefined) throw new InputError('--shards: required; give the number of shard tasks of the job array, e.g. --shards 8');
  const count = o.shards;
  const cpus = o.cpusPerTask ?? 1;
  const scenarioAbs = resolve(scenarioPath);
  const work = batchWork(scenarioAbs, o, () => parseVaryOptions(o.vary, o.log ?? false), memoryLimitBytes());
  const dir = resolve(o.out ?? defaultOutputFolder('submission', work.scenarioName));
  const plan = planSubmission(work, { dir, scenarioPath: scenarioAbs, shards: count, tool: toolInvocation(), partition: o.partition, time: o.time, cpusPerTask: cpus, sbatchOptions: o.sbatchOption ?? [] });
  const sbatchCommand = o.sbatch ?? 'sbatch';
  const only = o.onlyShards !== undefined ? parseShardList(o.onlyShards, count) : null;
  const notes = submitNotes(count, work);
  const arrayArgs = arrayJobArguments(plan, o.hold ?? false, only);
  if (o.dryRun) {
    process.stdout.write(dryRunLines(plan, notes, sbatchCommand, arrayArgs).join('\n'));
    return ExitCode.done;
  }

  let earlierMerges: string[] = [];
  if (only !== null) earlierMerges = checkResubmission(dir, plan.record, only);
  else reportCommit(await writeSubmission(outputTarget(dir, { force: o.force ?? false, inputs: [scenarioPath] }), plan));
  const ids = submitJobs(sbatchCommand, dir, plan, arrayArgs, { count, only, held: o.hold ?? false });
  const jobs = { ...ids, held: o.hold ?? false, earlierMerges };
  process.stdout.write(`${submittedLines(plan.record, jobs, notes, cpus, dir).join('\n')}\n`);
  return ExitCode.done;
}

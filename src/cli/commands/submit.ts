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
import { spawnSync } from 'node:child_process';
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { isSlurmTime, mergeScript, shardArrayScript, shellWords, type BatchSettings } from '../../output/batchScripts.js';
import { appendJobRecord, readJobRecords, readSubmission, SUBMISSION_FILE, SUBMISSION_FORMAT, type Submission } from '../../output/submission.js';
import { indexList, shardStates } from '../../output/shardProgress.js';
import { toolVersion } from '../../output/toolVersion.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { planBlocks } from '../../pipeline/ensemble/blockPlan.js';
import { DEFAULT_BINS_PER_ATOM, histogramBins } from '../../pipeline/ensemble/histogramBins.js';
import { scenarioHash } from '../../scenario/scenarioHash.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type OptionValues, type RawOptions } from '../options.js';
import { memoryLimitBytes } from '../machine.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { toolInvocation } from '../toolInvocation.js';
import { parseInteger } from '../numberText.js';
import { DEFAULT_BLOCK_SIZE } from './ensemble.js';
import { scanSetup } from './scan.js';
import { describeScan } from '../../output/scanIdentity.js';

const OPTIONS = [
  'ensemble',
  'scan',
  'vary',
  'log',
  'fixed',
  'chainLength',
  'realisations',
  'keepPoints',
  'blockSize',
  'binsPerAtom',
  'set',
  'shards',
  'partition',
  'time',
  'cpusPerTask',
  'sbatchOption',
  'hold',
  'dryRun',
  'onlyShards',
  'sbatch',
  'out',
  'force',
] as const;

export function registerSubmit(program: Command, context: CommandContext): void {
  const command = program
    .command('submit')
    .description('submit a sharded ensemble or scan to SLURM: a job array of shard tasks and a merge job that waits for all of them')
    .argument('<scenario>', 'scenario file (JSON)');
  declare(command, OPTIONS, {
    shards: { help: 'number of shard tasks in the job array (required)' },
    out: { help: 'submission folder: scripts, logs, shards and the merged result (default out/<name>-cluster)' },
    force: { help: 'if the submission folder exists and holds other files, move it aside to <name>.replaced-<time> (nothing is deleted)' },
  }).action(async (scenarioPath: string, options: RawOptions) => {
    context.exitCode = await runSubmitCommand(scenarioPath, options);
  });
}

/** The work of one submission: what every task runs and what identifies it. */
interface Work {
  kind: 'ensemble' | 'scan';
  describes: string;
  scenarioName: string;
  scenarioHash: string;
  ensemble: Submission['ensemble'];
  scanHash: string | null;
  /** options of every shard task that describe the work */
  workArgs: string[];
  /** the same for the submit command line (a resubmission) */
  submitWorkArgs: string[];
  /** how many units (blocks or chains) the shards split */
  units: number;
  unitName: string;
}

function describeWork(scenarioPath: string, o: OptionValues<(typeof OPTIONS)[number]>): Work {
  const isScan = o.scan === true || (o.vary?.length ?? 0) > 0;
  if ((o.ensemble !== undefined) === isScan) {
    throw new InputError('submit: give either --ensemble N (a disorder ensemble of N realisations) or --scan with --vary PATH=FROM:TO:COUNT (a scan)');
  }
  const sets = (o.set ?? []).flatMap((s) => ['--set', s]);
  if (!isScan) {
    for (const name of ['log', 'fixed', 'chainLength', 'realisations', 'keepPoints'] as const) {
      if (o[name] !== undefined) throw new InputError(`--${name.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}: belongs to --scan, not to --ensemble; leave it out`);
    }
    const realisations = o.ensemble as number;
    const blockSize = o.blockSize ?? DEFAULT_BLOCK_SIZE;
    const { scenario } = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes: memoryLimitBytes() });
    if (!scenario.disorder) throw new InputError('--ensemble: the scenario has no disorder block, so every realisation would be the same; add one (see configs/speckle-layer-ensemble.json)');
    const bins = histogramBins(scenario.truncation.nmax, o.binsPerAtom ?? DEFAULT_BINS_PER_ATOM);
    const plan = planBlocks(realisations, blockSize);
    const ensembleArgs = ['--block-size', String(blockSize), ...(o.binsPerAtom !== undefined ? ['--bins-per-atom', String(o.binsPerAtom)] : []), ...sets];
    return {
      kind: 'ensemble',
      describes: `disorder ensemble of ${realisations} realisations of ${scenario.name} in ${plan.blockCount} blocks of ${blockSize}`,
      scenarioName: scenario.name,
      scenarioHash: scenarioHash(scenario),
      ensemble: { realisations, blockSize, bins: JSON.stringify(bins) },
      scanHash: null,
      workArgs: ['--realisations', String(realisations), ...ensembleArgs],
      submitWorkArgs: ['--ensemble', String(realisations), ...ensembleArgs],
      units: plan.blockCount,
      unitName: 'blocks',
    };
  }
  for (const name of ['blockSize', 'binsPerAtom'] as const) {
    if (o[name] !== undefined) throw new InputError(`--${name.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}: belongs to --ensemble, not to --scan; leave it out`);
  }
  const setup = scanSetup(scenarioPath, o);
  const scanArgs = [
    ...(o.vary ?? []).flatMap((v) => ['--vary', v]),
    ...(o.log ? ['--log'] : []),
    ...(o.fixed !== undefined ? ['--fixed', o.fixed] : []),
    '--chain-length',
    String(setup.plan.chainLength),
    ...(setup.plan.realisations > 1 ? ['--realisations', String(setup.plan.realisations)] : []),
    ...(o.keepPoints ? ['--keep-points'] : []),
    ...sets,
  ];
  return {
    kind: 'scan',
    describes: `scan of ${setup.base.scenario.name}: ${describeScan(setup.plan)}`,
    scenarioName: setup.base.scenario.name,
    scenarioHash: setup.scenarioHash,
    ensemble: null,
    scanHash: setup.scanHash,
    workArgs: scanArgs,
    submitWorkArgs: ['--scan', ...scanArgs],
    units: setup.plan.chainCount,
    unitName: 'chains',
  };
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

/** Runs sbatch and returns the job id it prints (--parsable: "id" or "id;cluster"). */
function sbatch(command: string, args: readonly string[]): string {
  const r = spawnSync(command, ['--parsable', ...args], { encoding: 'utf8' });
  if (r.error) {
    const code = (r.error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new InputError(`submit: ${command} not found; run on a machine with SLURM (the cluster's login node), give --sbatch PATH, or use --dry-run`);
    throw new InputError(`submit: could not run ${command} (${code ?? r.error.message})`);
  }
  if (r.status !== 0) {
    throw new InputError(`submit: ${command} refused the job (exit ${r.status}): ${(r.stderr || r.stdout).trim().split('\n').slice(0, 4).join(' / ')}; check --partition, --time and --sbatch-option`);
  }
  const id = r.stdout.trim().split('\n').pop()?.split(';')[0]?.trim() ?? '';
  if (!/^\d+$/.test(id)) throw new InputError(`submit: ${command} printed ${JSON.stringify(r.stdout.trim().slice(0, 100))}, not a job id`);
  return id;
}

function checkSettings(o: OptionValues<(typeof OPTIONS)[number]>): void {
  if (o.time !== undefined && !isSlurmTime(o.time)) throw new InputError(`--time: expected a SLURM time limit such as 30 (minutes), 02:00:00 or 1-00:00:00, got ${JSON.stringify(o.time)}`);
  if (o.partition !== undefined && !/^[A-Za-z0-9_.,-]+$/.test(o.partition)) throw new InputError(`--partition: expected a partition name (letters, digits, '_', '-', '.', ','), got ${JSON.stringify(o.partition)}`);
  for (const extra of o.sbatchOption ?? []) {
    if (!/^--?[A-Za-z][A-Za-z0-9-]*(=\S+)?$/.test(extra)) {
      throw new InputError(`--sbatch-option: expected one sbatch option such as --account=lab42 or --mem-per-cpu=2G, got ${JSON.stringify(extra)}`);
    }
    if (/^--(array|output|error|dependency|cpus-per-task|job-name|parsable|wrap)\b/.test(extra)) {
      throw new InputError(`--sbatch-option ${extra}: submit sets this one itself; use its own option (--cpus-per-task, --hold) or leave it out`);
    }
  }
}

export async function runSubmitCommand(scenarioPath: string, raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  checkSettings(o);
  if (o.shards === undefined) throw new InputError('--shards: required; give the number of shard tasks of the job array, e.g. --shards 8');
  const count = o.shards;
  const cpus = o.cpusPerTask ?? 1;
  const scenarioAbs = resolve(scenarioPath);
  const work = describeWork(scenarioAbs, o);
  const dir = resolve(o.out ?? `out/${work.scenarioName}-cluster`);
  const shardDir = join(dir, 'shards');
  const resultDir = join(dir, 'result');
  const logDir = join(dir, 'logs');
  const tool = toolInvocation();
  const taskArgs = [work.kind, scenarioAbs, ...work.workArgs, '--out', shardDir];
  const settings: BatchSettings = {
    jobName: `tc-${work.scenarioName}`,
    ...(o.partition !== undefined ? { partition: o.partition } : {}),
    ...(o.time !== undefined ? { time: o.time } : {}),
    cpusPerTask: cpus,
    extra: o.sbatchOption ?? [],
  };
  const arrayText = shardArrayScript({ ...settings, shards: count, tool, taskArgs, logDir, what: work.describes });
  const mergeText = mergeScript({ ...settings, cpusPerTask: 1, tool, shardDir, resultDir, logDir, what: work.describes });
  const arrayFile = join(dir, 'jobs', 'shards.sbatch');
  const mergeFile = join(dir, 'jobs', 'merge.sbatch');
  const submitArgs = [
    scenarioAbs,
    ...work.submitWorkArgs,
    '--shards',
    String(count),
    ...(o.partition !== undefined ? ['--partition', o.partition] : []),
    ...(o.time !== undefined ? ['--time', o.time] : []),
    '--cpus-per-task',
    String(cpus),
    ...(o.sbatchOption ?? []).map((s) => `--sbatch-option=${s}`),
  ];
  const sbatchCommand = o.sbatch ?? 'sbatch';
  const only = o.onlyShards !== undefined ? parseShardList(o.onlyShards, count) : null;
  const notes: string[] = [];
  if (count > work.units) notes.push(`note: ${count} shards for ${work.units} ${work.unitName}: shards ${work.units}-${count - 1} get no work (use fewer shards${work.kind === 'scan' ? ' or a shorter --chain-length' : ' or a smaller --block-size'})`);

  if (o.dryRun) {
    const arrayArgs = [...(o.hold ? ['--hold'] : []), ...(only ? [`--array=${indexList(only)}`] : []), arrayFile];
    process.stdout.write(
      [
        `# ${work.describes}: ${count} shard tasks and a merge (dry run: nothing written, nothing submitted)`,
        ...notes.map((n) => `# ${n}`),
        `# ---- ${arrayFile}`,
        arrayText,
        `# ---- ${mergeFile}`,
        mergeText,
        '# ---- submitted with',
        shellWords([sbatchCommand, '--parsable', ...arrayArgs]),
        `${shellWords([sbatchCommand, '--parsable'])} --dependency=afterok:<array job id> ${shellWords([mergeFile])}`,
        '',
      ].join('\n'),
    );
    return ExitCode.done;
  }

  let earlierMerges: string[] = [];
  if (only !== null) {
    const sub = readSubmission(dir, '--out');
    if (sub === null) throw new InputError(`--only-shards: ${dir} holds no ${SUBMISSION_FILE}; submit the whole array first (without --only-shards)`);
    const differs: string[] = [];
    if (sub.kind !== work.kind) differs.push(`it is ${sub.kind === 'ensemble' ? 'an ensemble' : 'a scan'}`);
    if (sub.scenarioHash !== work.scenarioHash) differs.push(`its scenario hash is ${sub.scenarioHash.slice(0, 12)}, this one ${work.scenarioHash.slice(0, 12)} (the scenario file or --set changed)`);
    if (sub.shards !== count) differs.push(`it has ${sub.shards} shards, not ${count}`);
    if (JSON.stringify(sub.taskArgs) !== JSON.stringify(taskArgs)) differs.push(`its tasks run ${shellWords(sub.taskArgs)}`);
    if (differs.length > 0) throw new InputError(`--only-shards: the submission in ${dir} is different work: ${differs.join('; ')}; resubmit with the same arguments (tiercake progress ${dir} prints them)`);
    const states = shardStates(sub.shardDir, count, { scenarioHash: sub.scenarioHash, scanHash: sub.scanHash, ensemble: sub.ensemble });
    const done = only.filter((k) => states[k].kind === 'done');
    if (done.length > 0) throw new InputError(`--only-shards: shard${done.length > 1 ? 's' : ''} ${indexList(done)} ${done.length > 1 ? 'are' : 'is'} done already (${sub.shardDir}); leave ${done.length > 1 ? 'them' : 'it'} out`);
    earlierMerges = readJobRecords(dir).flatMap((r) => (r.mergeJob ? [r.mergeJob] : []));
    mkdirSync(logDir, { recursive: true });
  } else {
    const target = outputTarget(dir, { force: o.force ?? false, inputs: [scenarioPath] });
    const record: Submission = {
      format: SUBMISSION_FORMAT,
      formatVersion: 1,
      tool: { name: 'tiercake', version: toolVersion(), command: tool },
      kind: work.kind,
      describes: work.describes,
      scenarioName: work.scenarioName,
      scenarioPath: scenarioAbs,
      scenarioHash: work.scenarioHash,
      ensemble: work.ensemble,
      scanHash: work.scanHash,
      shards: count,
      submitArgs,
      taskArgs,
      shardDir,
      resultDir,
      logDir,
      arrayScript: arrayFile,
      mergeScript: mergeFile,
    };
    const { commit } = await writeOutputFolder(target, { command: 'submit', scenarioHash: work.scenarioHash }, (folder) => {
      folder.write(SUBMISSION_FILE, `${JSON.stringify(record, null, 2)}\n`);
      folder.write('jobs/shards.sbatch', arrayText);
      folder.write('jobs/merge.sbatch', mergeText);
    });
    reportCommit(commit);
    // SLURM does not create the folder of a job's output file: the tasks need it now.
    mkdirSync(logDir, { recursive: true });
    mkdirSync(shardDir, { recursive: true });
  }

  const arrayJob = sbatch(sbatchCommand, [...(o.hold ? ['--hold'] : []), ...(only ? [`--array=${indexList(only)}`] : []), arrayFile]);
  let mergeJob: string | null = null;
  try {
    mergeJob = sbatch(sbatchCommand, [`--dependency=afterok:${arrayJob}`, mergeFile]);
  } finally {
    appendJobRecord(dir, { arrayJob, mergeJob, shards: only ?? Array.from({ length: count }, (_, k) => k), submittedIso: new Date().toISOString(), held: o.hold ?? false });
  }
  const tasks = only ? indexList(only) : `0-${count - 1}`;
  const lines = [
    `${work.describes}`,
    `  submitted shard tasks ${tasks} of ${count} as job array ${arrayJob}${o.hold ? ' (held: start them with scontrol release ' + arrayJob + ')' : ''}, ${cpus} core${cpus === 1 ? '' : 's'} each`,
    `  merge job ${mergeJob} runs when every task has succeeded (afterok:${arrayJob}) and writes ${resultDir}`,
    ...notes.map((n) => `  ${n}`),
    `  follow:  squeue -j ${arrayJob},${mergeJob}`,
    `           ${shellWords([...tool, 'progress', dir])}`,
    `  logs:    ${logDir}`,
    ...(earlierMerges.length > 0 ? [`  the earlier merge job${earlierMerges.length > 1 ? 's' : ''} ${earlierMerges.join(', ')} cannot run any more; if squeue still lists ${earlierMerges.length > 1 ? 'them' : 'it'}: scancel ${earlierMerges.join(' ')}`] : []),
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
  return ExitCode.done;
}

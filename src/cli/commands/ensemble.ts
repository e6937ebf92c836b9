// `tiercake ensemble SCENARIO --realisations N`: averages a disorder scenario over N
// realisations (seed of realisation r: "<disorder.seed>/r"). A complete run writes the
// final result; with --shard k/K or --shard-from-env it runs only shard k's blocks and
// writes a partial result for `tiercake merge`. Options -> runEnsembleBlocks
// (src/pipeline/ensemble) -> files -> exit code (0 done, 2 bad input, 3 some realisation
// did not converge, results written and flagged; 130 interrupted, nothing written).

import type { Command } from 'commander';
import { dirname, resolve } from 'node:path';
import { DEFAULT_BINS_PER_ATOM } from '../../pipeline/ensemble/histogramBins.js';
import { runEnsembleBlocks, type ParallelMode, type WorkerModule } from '../../pipeline/ensemble/runEnsemble.js';
import { blocksCompleted, DEFAULT_BLOCK_SIZE, ensembleSetup } from '../../pipeline/ensemble/ensembleSetup.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { PARALLEL_MIN_SITES } from '../../pipeline/solveScenario.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import { defaultOutputFolder, runOutputFolder } from '../../output/defaultOutputFolders.js';
import { ensembleRunSink } from '../../output/ensembleRunSink.js';
import { resolveShard } from '../../pipeline/shardChoice.js';
import { ensembleWarnings } from '../../output/ensembleOutputs.js';
import { ensembleDoneLines, ensembleShardLines, ensembleThreadNote } from '../../report/ensembleSummaryLines.js';
import type { CommandContext } from '../main.js';
import { readOptions, type RawOptions } from '../options.js';
import { registerScenarioCommand } from '../scenarioCommand.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { progressFor } from '../progress.js';
import { whileInterruptible } from '../signals.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { commandPrefix } from '../invocation.js';

const OPTIONS = ['realisations', 'blockSize', 'shard', 'shardFromEnv', 'shards', 'threads', 'parallelOver', 'binsPerAtom', 'set', 'out', 'force', 'quiet', 'jsonProgress'] as const;

/** Injection points for tests: worker modules (TypeScript sources) and the environment. */
export interface EnsembleHooks {
  realisationWorker?: WorkerModule;
  sweepWorker?: WorkerModule;
  env?: Readonly<Record<string, string | undefined>>;
}

export function registerEnsemble(program: Command, context: CommandContext): void {
  registerScenarioCommand(program, context, {
    name: 'ensemble',
    description: 'average a disorder scenario over many realisations (optionally one shard of a cluster job array)',
    scenarioHelp: 'scenario file (JSON) with a disorder block; example: configs/speckle-layer-ensemble.json',
    options: OPTIONS,
    overrides: {
      out: { help: 'output folder (default out/<name>-ensemble; for shards the folder that collects them, default out/<name>-shards)' },
      parallelOver: { help: `auto | realisations | lattice (auto: realisations side by side below ${PARALLEL_MIN_SITES} sites, else one at a time on all threads)` },
    },
    run: runEnsembleCommand,
  });
}

export async function runEnsembleCommand(scenarioPath: string, raw: RawOptions, hooks: EnsembleHooks = {}): Promise<number> {
  const started = performance.now();
  const o = readOptions(raw, OPTIONS);
  if (o.realisations === undefined) throw new InputError('--realisations: required; give a whole number of disorder realisations, e.g. --realisations 64');
  const shard = resolveShard(o.shard, o.shardFromEnv, o.shards, hooks.env ?? process.env);
  const threads = o.threads ?? defaultThreads();
  const prepared = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes: memoryLimitBytes() });
  for (const note of prepared.overrideNotes) process.stderr.write(`tiercake: note: ${note}\n`);
  const setup = ensembleSetup(prepared, {
    realisations: o.realisations,
    blockSize: o.blockSize ?? DEFAULT_BLOCK_SIZE,
    binsPerAtom: o.binsPerAtom ?? DEFAULT_BINS_PER_ATOM,
    shard,
    parallelOver: (o.parallelOver ?? 'auto') as 'auto' | ParallelMode,
  });
  const { identity, blocks, toRun } = setup;
  const { plan, scenario } = identity;
  const given = o.out ?? defaultOutputFolder(shard ? 'ensemble shards' : 'ensemble', scenario.name);
  const target = outputTarget(runOutputFolder(given, shard), { force: o.force ?? false, inputs: [scenarioPath] });

  const progress = progressFor(o);
  // Finished blocks go into the running total (complete run), or straight into the
  // shard's staging folder (shard), so that only one block is held in memory.
  const sink = ensembleRunSink(target, identity, setup.siteCount, shard);
  let sweeps = 0;
  let run;
  // Progress: realisations done of those this process runs, the blocks completed, and, while
  // a realisation is solved on this thread, its sweeps (workers report finished realisations).
  const blocksDone = (done: number): string => `blocks ${blocksCompleted(plan, blocks, done)} of ${blocks.length} done`;
  progress.update({ stage: `realisation 0/${toRun}`, sweep: 0, residual: NaN, fraction: 0, detail: `blocks 0 of ${blocks.length} done` });
  try {
    run = await whileInterruptible((interrupted) =>
      runEnsembleBlocks({
        onBlock: (partial) => sink.add(partial),
        raw: prepared.raw,
        baseSeed: identity.baseSeed,
        plan,
        blocks,
        bins: identity.bins,
        siteCount: setup.siteCount,
        threads,
        parallelOver: setup.parallelOver,
        scenarioDirectory: dirname(scenarioPath),
        ...(hooks.realisationWorker ? { realisationWorker: hooks.realisationWorker } : {}),
        ...(hooks.sweepWorker ? { sweepWorker: hooks.sweepWorker } : {}),
        shouldStop: interrupted,
        onSweep: ({ index, done, sweep, residual, stage }) => {
          const doing = `index ${index} in block ${Math.floor(index / plan.blockSize)}, ${stage === 'solve' ? 'solving' : stage}`;
          progress.update({ stage: `realisation ${done + 1}/${toRun}`, sweep: sweeps + sweep, residual, fraction: done / toRun, detail: `${doing}; ${blocksDone(done)}` });
        },
        onRealisation: ({ done, total: count, record }) => {
          sweeps += record.sweeps;
          const flag = record.converged ? '' : `; realisation ${record.index} NOT CONVERGED`;
          progress.update({ stage: `realisation ${done}/${count}`, sweep: sweeps, residual: NaN, fraction: done / count, detail: `${blocksDone(done)}${flag}` });
        },
      }),
    );
  } catch (err) {
    sink.discard();
    throw err;
  }
  progress.done();
  if (run.stopped) {
    sink.discard();
    process.stderr.write('tiercake: ensemble interrupted; nothing written\n');
    return ExitCode.interrupted;
  }
  const seconds = (performance.now() - started) / 1000;
  const records = sink.records();
  const notConverged = records.filter((r) => !r.converged).length;
  const exitCode = notConverged > 0 ? ExitCode.notConverged : ExitCode.done;
  const threadNote = ensembleThreadNote(run.threadsUsed, threads, toRun, run.parallelOver);
  const committed = await sink.commit({ threads: run.threadsUsed, parallelOver: run.parallelOver, seconds }, `one run, ${threadNote}, ${seconds.toFixed(1)} s`);
  reportCommit(committed.commit);

  if (committed.kind === 'shard') {
    const lines = ensembleShardLines(scenario.name, committed.shard, plan, blocks, records.length, notConverged, seconds, threadNote, committed.folder, resolve(given), commandPrefix());
    process.stdout.write(`${lines.join('\n')}\n`);
    return exitCode;
  }
  for (const w of ensembleWarnings(committed.outcome)) process.stderr.write(`tiercake: warning: ${w.code}: ${w.message}\n`);
  process.stdout.write(`${ensembleDoneLines(scenario.name, committed.outcome.stats, seconds, threadNote, notConverged, resolve(given)).join('\n')}\n`);
  return exitCode;
}

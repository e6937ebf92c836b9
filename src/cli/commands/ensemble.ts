// `tiercake ensemble SCENARIO --realisations N`: averages a disorder scenario over N
// realisations (seed of realisation r: "<disorder.seed>/r"). A complete run writes the
// final result; with --shard k/K or --shard-from-env it runs only shard k's blocks and
// writes a partial result for `tiercake merge`. Options -> runEnsembleBlocks
// (src/pipeline/ensemble) -> files -> exit code (0 done, 2 bad input, 3 some realisation
// did not converge, results written and flagged; 130 interrupted, nothing written).

import type { Command } from 'commander';
import { dirname, join, resolve } from 'node:path';
import { OutputFolder, writeOutputFolder } from '../../output/outputFolder.js';
import { renderReportHtml } from '../../report/renderReport.js';
import { formatBlockList, planBlocks, shardBlocks } from '../../pipeline/ensemble/blockPlan.js';
import { absorbBlock, createEnsembleTotal, type BlockPartial } from '../../pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../../pipeline/ensemble/ensembleStatistics.js';
import { DEFAULT_BINS_PER_ATOM, histogramBins } from '../../pipeline/ensemble/histogramBins.js';
import { runEnsembleBlocks, type ParallelMode, type WorkerModule } from '../../pipeline/ensemble/runEnsemble.js';
import { ensembleContextOf, realisationScenario } from '../../pipeline/ensemble/solveRealisation.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { PARALLEL_MIN_SITES } from '../../pipeline/solveScenario.js';
import { landscapeFileHashes, scenarioHash } from '../../scenario/scenarioHash.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import { writeShardBlock, writeShardHeader, type EnsembleIdentity, type ShardBlockEntry } from '../../output/ensembleShard.js';
import { shardFolderName } from '../../output/shardSet.js';
import { ensembleWarnings, writeEnsembleFiles, type EnsembleOutcome } from '../../output/ensembleOutputs.js';
import { buildEnsembleReport } from '../../report/ensembleReport.js';
import { toolVersion } from '../../output/toolVersion.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { progressFor } from '../progress.js';
import { whileInterruptible } from '../signals.js';
import { resolveShard } from '../shardOption.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { commandPrefix } from '../invocation.js';

const OPTIONS = ['realisations', 'blockSize', 'shard', 'shardFromEnv', 'shards', 'threads', 'parallelOver', 'binsPerAtom', 'set', 'out', 'force', 'quiet', 'jsonProgress'] as const;

/** Realisations per block unless --block-size says otherwise. */
export const DEFAULT_BLOCK_SIZE = 4;

/** Injection points for tests: worker modules (TypeScript sources) and the environment. */
export interface EnsembleHooks {
  realisationWorker?: WorkerModule;
  sweepWorker?: WorkerModule;
  env?: Readonly<Record<string, string | undefined>>;
}

export function registerEnsemble(program: Command, context: CommandContext): void {
  const command = program
    .command('ensemble')
    .description('average a disorder scenario over many realisations (optionally one shard of a cluster job array)')
    .argument('<scenario>', 'scenario file (JSON) with a disorder block; example: configs/speckle-layer-ensemble.json');
  declare(command, OPTIONS, {
    out: { help: 'output folder (default out/<name>-ensemble; for shards the folder that collects them, default out/<name>-shards)' },
    parallelOver: { help: `auto | realisations | lattice (auto: realisations side by side below ${PARALLEL_MIN_SITES} sites, else one at a time on all threads)` },
  }).action(async (scenarioPath: string, options: RawOptions) => {
    context.exitCode = await runEnsembleCommand(scenarioPath, options);
  });
}

export async function runEnsembleCommand(scenarioPath: string, raw: RawOptions, hooks: EnsembleHooks = {}): Promise<number> {
  const started = performance.now();
  const o = readOptions(raw, OPTIONS);
  if (o.realisations === undefined) throw new InputError('--realisations: required; give a whole number of disorder realisations, e.g. --realisations 64');
  const realisations = o.realisations;
  const blockSize = o.blockSize ?? DEFAULT_BLOCK_SIZE;
  const binsPerAtom = o.binsPerAtom ?? DEFAULT_BINS_PER_ATOM;
  const shards = raw.shards === undefined ? undefined : String(raw.shards);
  const shard = resolveShard(o.shard, o.shardFromEnv, shards, hooks.env ?? process.env);
  const threads = o.threads ?? defaultThreads();
  const parallelChoice = o.parallelOver ?? 'auto';

  const { scenario, raw: scenarioRaw, resolved, overrideNotes } = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes: memoryLimitBytes() });
  for (const note of overrideNotes) process.stderr.write(`tiercake: note: ${note}\n`);
  if (!scenario.disorder) {
    throw new InputError(
      'disorder: the scenario has no disorder block, so every realisation would be the same; add one, ' +
        'e.g. "disorder": {"kind": "box", "width": 0.5, "seed": "run1"} (configs/speckle-layer-ensemble.json has a speckle example)',
    );
  }
  const baseSeed = scenario.disorder.seed;
  // The longest seed is the last one; the schema bounds its length.
  realisationScenario(scenarioRaw, baseSeed, realisations - 1);

  const plan = planBlocks(realisations, blockSize);
  const bins = histogramBins(scenario.truncation.nmax, binsPerAtom);
  const identity: EnsembleIdentity = {
    scenario,
    scenarioHash: scenarioHash(scenario, 'whole', landscapeFileHashes(resolved)),
    baseSeed,
    plan,
    bins,
    context: ensembleContextOf(resolved),
  };
  const blocks = shard ? shardBlocks(plan, shard.index, shard.count) : Array.from({ length: plan.blockCount }, (_, b) => b);
  const siteCount = resolved.geometry.siteCount;
  const parallelOver: ParallelMode = parallelChoice === 'auto' ? (siteCount < PARALLEL_MIN_SITES ? 'realisations' : 'lattice') : (parallelChoice as ParallelMode);
  const given = o.out ?? `out/${scenario.name}-${shard ? 'shards' : 'ensemble'}`;
  const collect = resolve(given);
  const target = outputTarget(shard ? join(given, shardFolderName(shard)) : given, { force: o.force ?? false, inputs: [scenarioPath] });

  const progress = progressFor(o);
  // Where finished blocks go: into the running total (complete run), or straight into the
  // shard's staging folder (shard), so that only one block is held in memory.
  const total = shard ? null : createEnsembleTotal(siteCount, bins);
  const shardFolder = shard ? new OutputFolder(target, { command: 'ensemble shard', scenarioHash: identity.scenarioHash }) : null;
  const shardEntries: ShardBlockEntry[] = [];
  const onBlock = (partial: BlockPartial): void => {
    if (shardFolder) shardEntries.push(writeShardBlock(shardFolder, partial, identity.context.shape));
    else if (total) absorbBlock(total, partial);
  };
  let sweeps = 0;
  let run;
  // Progress: realisations done of those this process runs, the blocks completed, and, while
  // a realisation is solved on this thread, its sweeps (workers report finished realisations).
  const blockOf = (r: number): number => Math.floor(r / plan.blockSize);
  const blocksBefore = (done: number): number => {
    let complete = 0;
    let seen = 0;
    for (const b of blocks) {
      seen += Math.min(plan.blockSize, realisations - b * plan.blockSize);
      if (seen <= done) complete++;
    }
    return complete;
  };
  const toRun = blocks.reduce((n, b) => n + Math.min(plan.blockSize, realisations - b * plan.blockSize), 0);
  progress.update({ stage: `realisation 0/${toRun}`, sweep: 0, residual: NaN, fraction: 0, detail: `blocks 0 of ${blocks.length} done` });
  try {
    run = await whileInterruptible((interrupted) =>
      runEnsembleBlocks({
        onBlock,
        raw: scenarioRaw,
        baseSeed,
        plan,
        blocks,
        bins,
        siteCount,
        threads,
        parallelOver,
        scenarioDirectory: dirname(scenarioPath),
        ...(hooks.realisationWorker ? { realisationWorker: hooks.realisationWorker } : {}),
        ...(hooks.sweepWorker ? { sweepWorker: hooks.sweepWorker } : {}),
        shouldStop: interrupted,
        onSweep: ({ index, done, sweep, residual, stage }) => {
          progress.update({
            stage: `realisation ${done + 1}/${toRun}`,
            sweep: sweeps + sweep,
            residual,
            fraction: done / toRun,
            detail: `index ${index} in block ${blockOf(index)}, ${stage === 'solve' ? 'solving' : stage}; blocks ${blocksBefore(done)} of ${blocks.length} done`,
          });
        },
        onRealisation: ({ done, total: count, record }) => {
          sweeps += record.sweeps;
          progress.update({
            stage: `realisation ${done}/${count}`,
            sweep: sweeps,
            residual: NaN,
            fraction: done / count,
            detail: `blocks ${blocksBefore(done)} of ${blocks.length} done${record.converged ? '' : `; realisation ${record.index} NOT CONVERGED`}`,
          });
        },
      }),
    );
  } catch (err) {
    shardFolder?.discard();
    throw err;
  }
  progress.done();
  if (run.stopped) {
    shardFolder?.discard();
    process.stderr.write('tiercake: ensemble interrupted; nothing written\n');
    return ExitCode.interrupted;
  }
  const seconds = (performance.now() - started) / 1000;
  const runInfo = { threads: run.threadsUsed, parallelOver: run.parallelOver, seconds };
  const records = total ? total.records : shardEntries.flatMap((e) => e.records);
  const notConverged = records.filter((r) => !r.converged).length;
  const fewer = run.threadsUsed < threads ? `: only ${toRun} realisation${toRun === 1 ? '' : 's'} to run side by side` : '';
  const threadNote = `${run.threadsUsed} thread${run.threadsUsed > 1 ? 's' : ''}${fewer}, parallel over ${run.parallelOver}`;

  if (shard && shardFolder) {
    let commit;
    try {
      writeShardHeader(shardFolder, identity, { index: shard.index, count: shard.count }, shardEntries, runInfo, toolVersion());
      commit = shardFolder.commit();
    } catch (err) {
      shardFolder.discard();
      throw err;
    }
    reportCommit(commit);
    const lines = [
      `${scenario.name}: shard ${shard.index} of ${shard.count} (index from ${shard.source}): ` +
        (blocks.length > 0 ? `blocks ${formatBlockList(blocks)} of ${plan.blockCount}, ${records.length} realisations` : `no blocks (only ${plan.blockCount} blocks for ${shard.count} shards)`) +
        ` in ${seconds.toFixed(1)} s (${threadNote})`,
      ...(notConverged > 0 ? [`  ${notConverged} realisation${notConverged > 1 ? 's' : ''} NOT CONVERGED (flagged in the merged result)`] : []),
      `  partial result in ${shardFolder.finalPath}`,
      `  merge when every shard is done: ${commandPrefix()} merge ${collect} --out <folder>`,
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
    return notConverged > 0 ? ExitCode.notConverged : ExitCode.done;
  }

  if (!total) throw new Error('ensemble: no total for a complete run');
  const stats = ensembleStatistics(total);
  const outcome: EnsembleOutcome = {
    ...identity,
    total,
    stats,
    provenance: { kind: 'single run', threads: run.threadsUsed, parallelOver: run.parallelOver, seconds },
  };
  const createdIso = new Date().toISOString();
  const { commit } = await writeOutputFolder(target, { command: 'ensemble', scenarioHash: identity.scenarioHash }, (folder) =>
    writeEnsembleFiles(outcome, folder, (images) => renderReportHtml(buildEnsembleReport(outcome, images, createdIso, [`one run, ${threadNote}, ${seconds.toFixed(1)} s`]))),
  );
  reportCommit(commit);
  for (const w of ensembleWarnings(outcome)) process.stderr.write(`tiercake: warning: ${w.code}: ${w.message}\n`);
  const lines = [
    `${scenario.name}: ${stats.realisations} realisations in ${seconds.toFixed(1)} s (${threadNote})` + (notConverged > 0 ? `, ${notConverged} NOT CONVERGED` : ', all converged'),
    `  superfluid spans the cloud in ${stats.spanningRealisations} of ${stats.realisations} (fraction ${stats.spanningFraction.toFixed(3)} ± ${stats.spanningFractionError.toFixed(3)})`,
    `  atoms ${stats.atoms.mean.toPrecision(6)} ± ${stats.atoms.spread.toPrecision(3)}, condensate fraction ${stats.condensateFraction.mean.toFixed(4)}`,
    ...(stats.superfluidFraction !== null
      ? [`  superfluid fraction ${stats.superfluidFraction.mean.toPrecision(4)} ± ${stats.superfluidFraction.spread.toPrecision(2)} (spread; standard error ${stats.superfluidFraction.standardError.toPrecision(2)}), no superflow in ${stats.superfluidFraction.noSuperflowRealisations} of ${stats.realisations}`]
      : []),
    `  results in ${collect}`,
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
  return notConverged > 0 ? ExitCode.notConverged : ExitCode.done;
}

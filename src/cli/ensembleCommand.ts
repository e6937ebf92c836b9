// `tiercake ensemble SCENARIO --realisations N`: averages a disorder scenario over N
// realisations (seed of realisation r: "<disorder.seed>/r"). A complete run writes the
// final result; with --shard k/K or --shard-from-env it runs only shard k's blocks and
// writes a partial result for `tiercake merge`. Thin layer: options -> runEnsembleBlocks
// (src/ensemble) -> files -> exit code (0 done, 2 bad input, 3 some realisation did not
// converge, results written and flagged; 130 interrupted, nothing written).

import type { Command } from 'commander';
import { join, resolve } from 'node:path';
import { OutputFolder } from '../output/outputFolder.js';
import { renderReportHtml } from '../report/renderReport.js';
import { formatBlockList, MAX_REALISATIONS, planBlocks, shardBlocks } from '../pipeline/ensemble/blockPlan.js';
import { absorbBlock, createEnsembleTotal, type BlockPartial } from '../pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../pipeline/ensemble/ensembleStatistics.js';
import { DEFAULT_BINS_PER_ATOM, histogramBins } from '../pipeline/ensemble/histogramBins.js';
import { runEnsembleBlocks, type ParallelMode, type WorkerModule } from '../pipeline/ensemble/runEnsemble.js';
import { ensembleContextOf, realisationScenario } from '../pipeline/ensemble/solveRealisation.js';
import { ExitCode, InputError } from '../scenario/inputError.js';
import type { CommandContext } from './main.js';
import { createProgressReporter } from './progressReporter.js';
import { PARALLEL_MIN_SITES, parseThreads, prepareScenario } from '../pipeline/solveScenario.js';
import { collectRepeated } from './solveCommand.js';
import { DEFAULT_BLOCK_SIZE, parseParallelOver, parseWholeNumber, resolveShard, shardFolderName, DEFAULT_SHARD_VARIABLE } from './ensembleOptions.js';
import { scenarioHash, writeShardBlock, writeShardHeader, type EnsembleIdentity, type ShardBlockEntry } from '../output/ensembleShard.js';
import { writeEnsembleFiles, type EnsembleOutcome } from '../output/ensembleOutputs.js';
import { buildEnsembleReport } from '../report/ensembleReport.js';
import { toolVersion } from '../output/toolVersion.js';

export interface EnsembleCommandOptions {
  realisations?: string;
  blockSize?: string;
  shard?: string;
  shardFromEnv?: string | boolean;
  shards?: string;
  threads?: string;
  parallelOver?: string;
  binsPerAtom?: string;
  set: string[];
  out?: string;
  quiet?: boolean;
  jsonProgress?: boolean;
}

/** Injection points for tests: worker modules (TypeScript sources) and the environment. */
export interface EnsembleHooks {
  realisationWorker?: WorkerModule;
  sweepWorker?: WorkerModule;
  env?: Readonly<Record<string, string | undefined>>;
}

export function registerEnsemble(program: Command, context: CommandContext): void {
  program
    .command('ensemble')
    .description('average a disorder scenario over many realisations (optionally one shard of a cluster job array)')
    .argument('<scenario>', 'scenario file (JSON) with a disorder block; example: configs/speckle-layer-ensemble.json')
    .option('-n, --realisations <N>', 'number of disorder realisations (realisation r uses the seed "<disorder.seed>/r")')
    .option('--block-size <B>', `realisations per block, the fixed grouping of the sums (default ${DEFAULT_BLOCK_SIZE}); shards hold whole blocks`)
    .option('--shard <k/K>', 'run only shard k of K (k counted from 0) and write a partial result for `tiercake merge`')
    .option('--shard-from-env [variable]', `take the shard index k from an environment variable (default ${DEFAULT_SHARD_VARIABLE}); needs --shards`)
    .option('--shards <K>', 'number of shards, with --shard-from-env')
    .option('-t, --threads <n>', 'compute threads (default: all cores); results are the same for any number')
    .option('--parallel-over <mode>', `auto | realisations | lattice (auto: realisations side by side below ${PARALLEL_MIN_SITES} sites, else one at a time on all threads)`)
    .option('--bins-per-atom <b>', `histogram bins per atom per site (default ${DEFAULT_BINS_PER_ATOM})`)
    .option('-s, --set <path=value>', 'override a scenario field by its dotted path (repeatable)', collectRepeated, [])
    .option('-o, --out <dir>', 'output folder (default out/<name>-ensemble; for shards the folder that collects them, default out/<name>-shards)')
    .option('-q, --quiet', 'no progress output')
    .option('--json-progress', 'progress as one JSON object per line on stderr')
    .action(async (scenarioPath: string, options: EnsembleCommandOptions) => {
      context.exitCode = await runEnsembleCommand(scenarioPath, options);
    });
}

export async function runEnsembleCommand(scenarioPath: string, options: EnsembleCommandOptions, hooks: EnsembleHooks = {}): Promise<number> {
  const started = performance.now();
  const realisations = parseWholeNumber(options.realisations, '--realisations', 1, MAX_REALISATIONS);
  const blockSize = parseWholeNumber(options.blockSize, '--block-size', 1, MAX_REALISATIONS, DEFAULT_BLOCK_SIZE);
  const binsPerAtom = parseWholeNumber(options.binsPerAtom, '--bins-per-atom', 1, 10_000, DEFAULT_BINS_PER_ATOM);
  const shard = resolveShard(options.shard, options.shardFromEnv, options.shards, hooks.env ?? process.env);
  const threads = parseThreads(options.threads);
  const parallelChoice = parseParallelOver(options.parallelOver);

  const { scenario, raw, resolved } = prepareScenario(scenarioPath, options.set);
  if (!scenario.disorder) {
    throw new InputError(
      'disorder: the scenario has no disorder block, so every realisation would be the same; add one, ' +
        'e.g. "disorder": {"kind": "box", "width": 0.5, "seed": "run1"} (configs/speckle-layer-ensemble.json has a speckle example)',
    );
  }
  const baseSeed = scenario.disorder.seed;
  // The longest seed is the last one; the schema bounds its length.
  realisationScenario(raw, baseSeed, realisations - 1);

  const plan = planBlocks(realisations, blockSize);
  const bins = histogramBins(scenario.truncation.nmax, binsPerAtom);
  const identity: EnsembleIdentity = { scenario, scenarioHash: scenarioHash(scenario), baseSeed, plan, bins, context: ensembleContextOf(resolved) };
  const blocks = shard ? shardBlocks(plan, shard.index, shard.count) : Array.from({ length: plan.blockCount }, (_, b) => b);
  const siteCount = resolved.geometry.siteCount;
  const parallelOver: ParallelMode = parallelChoice === 'auto' ? (siteCount < PARALLEL_MIN_SITES ? 'realisations' : 'lattice') : parallelChoice;

  const progress = createProgressReporter(options.quiet ? 'quiet' : options.jsonProgress ? 'json' : 'auto');
  let interrupted = false;
  const onSignal = (): void => {
    interrupted = true;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  // Where finished blocks go: into the running total (complete run), or straight into the
  // shard's staging folder (shard), so that only one block is held in memory.
  const total = shard ? null : createEnsembleTotal(siteCount, bins);
  const shardFolder = shard ? new OutputFolder(join(resolve(options.out ?? `out/${scenario.name}-shards`), shardFolderName(shard))) : null;
  const shardEntries: ShardBlockEntry[] = [];
  const onBlock = (partial: BlockPartial): void => {
    if (shardFolder) shardEntries.push(writeShardBlock(shardFolder, partial, identity.context.shape));
    else if (total) absorbBlock(total, partial);
  };
  let run;
  let sweeps = 0;
  try {
    run = await runEnsembleBlocks({
      onBlock,
      raw,
      baseSeed,
      plan,
      blocks,
      bins,
      siteCount,
      threads,
      parallelOver,
      ...(hooks.realisationWorker ? { realisationWorker: hooks.realisationWorker } : {}),
      ...(hooks.sweepWorker ? { sweepWorker: hooks.sweepWorker } : {}),
      shouldStop: () => interrupted,
      onRealisation: ({ done, total: count, record }) => {
        sweeps += record.sweeps;
        progress.update({ stage: `realisation ${done}/${count}`, sweep: sweeps, residual: NaN, fraction: done / count, detail: record.converged ? '' : `realisation ${record.index} NOT CONVERGED` });
      },
    });
  } catch (err) {
    shardFolder?.discard();
    throw err;
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
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
  const threadNote = `${run.threadsUsed} thread${run.threadsUsed > 1 ? 's' : ''}, parallel over ${run.parallelOver}`;

  if (shard && shardFolder) {
    const collect = resolve(options.out ?? `out/${scenario.name}-shards`);
    const outDir = shardFolder.finalPath;
    try {
      writeShardHeader(shardFolder, identity, { index: shard.index, count: shard.count }, shardEntries, runInfo, toolVersion());
      shardFolder.commit();
    } catch (err) {
      shardFolder.discard();
      throw err;
    }
    const lines = [
      `${scenario.name}: shard ${shard.index} of ${shard.count} (index from ${shard.source}): ` +
        (blocks.length > 0 ? `blocks ${formatBlockList(blocks)} of ${plan.blockCount}, ${records.length} realisations` : `no blocks (only ${plan.blockCount} blocks for ${shard.count} shards)`) +
        ` in ${seconds.toFixed(1)} s (${threadNote})`,
      ...(notConverged > 0 ? [`  ${notConverged} realisation${notConverged > 1 ? 's' : ''} NOT CONVERGED (flagged in the merged result)`] : []),
      `  partial result in ${outDir}`,
      `  merge when every shard is done: tiercake merge ${collect} --out <folder>`,
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
  const outDir = resolve(options.out ?? `out/${scenario.name}-ensemble`);
  const folder = new OutputFolder(outDir);
  try {
    const createdIso = new Date().toISOString();
    writeEnsembleFiles(outcome, folder, (images) => renderReportHtml(buildEnsembleReport(outcome, images, createdIso, [`one run, ${threadNote}, ${seconds.toFixed(1)} s`])));
    folder.commit();
  } catch (err) {
    folder.discard();
    throw err;
  }
  const lines = [
    `${scenario.name}: ${stats.realisations} realisations in ${seconds.toFixed(1)} s (${threadNote})` +
      (notConverged > 0 ? `, ${notConverged} NOT CONVERGED` : ', all converged'),
    `  superfluid spans the cloud in ${stats.spanningRealisations} of ${stats.realisations} (fraction ${stats.spanningFraction.toFixed(3)} ± ${stats.spanningFractionError.toFixed(3)})`,
    `  atoms ${stats.atoms.mean.toPrecision(6)} ± ${stats.atoms.spread.toPrecision(3)}, condensate fraction ${stats.condensateFraction.mean.toFixed(4)}`,
    `  results in ${outDir}`,
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
  return notConverged > 0 ? ExitCode.notConverged : ExitCode.done;
}

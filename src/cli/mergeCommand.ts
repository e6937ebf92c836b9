// `tiercake merge SHARD_DIR... --out DIR`: combines the partial results of ensemble
// shards into exactly the files a single `tiercake ensemble` run writes. Refuses (exit
// code 2, nothing written) shards of different scenarios, realisation counts, block sizes,
// bins or tool versions, and sets of shards that do not hold every block exactly once,
// naming the missing and the duplicated blocks.

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { OutputFolder } from '../output/outputFolder.js';
import { renderReportHtml } from '../report/renderReport.js';
import { blockCoverage, formatBlockList, planBlocks, shardBlocks } from '../pipeline/ensemble/blockPlan.js';
import { absorbBlock, createEnsembleTotal } from '../pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../pipeline/ensemble/ensembleStatistics.js';
import type { EnsembleContext } from '../pipeline/ensemble/solveRealisation.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { ExitCode, InputError } from '../scenario/inputError.js';
import type { CommandContext } from './main.js';
import { findShardFolders, readShardBlock, readShardHeader, type LoadedShard } from '../output/ensembleShard.js';
import { writeEnsembleFiles, type EnsembleOutcome } from '../output/ensembleOutputs.js';
import { buildEnsembleReport } from '../report/ensembleReport.js';
import { shardFolderName } from './ensembleOptions.js';

export interface MergeCommandOptions {
  out?: string;
  quiet?: boolean;
}

export function registerMerge(program: Command, context: CommandContext): void {
  program
    .command('merge')
    .description('combine ensemble shards into the result a single run gives (bit for bit)')
    .argument('<shards...>', 'shard folders, or folders that collect them (e.g. the --out folder of the shards)')
    .option('-o, --out <dir>', 'output folder (default out/<name>-ensemble)')
    .option('-q, --quiet', 'no summary on stdout')
    .action(async (shards: string[], options: MergeCommandOptions) => {
      context.exitCode = await runMergeCommand(shards, options);
    });
}

/** The fields that must agree between shards, with how to describe them. */
const identityChecks: Array<{ what: string; of: (s: LoadedShard) => unknown; fix: string }> = [
  { what: 'tiercake version', of: (s) => s.header.tool.version, fix: 'run every shard with the same tiercake version' },
  { what: 'scenario (SHA-256 of the scenario as run)', of: (s) => s.header.scenarioHash, fix: 'merge only shards of the same scenario file with the same --set overrides' },
  { what: 'realisation count', of: (s) => s.header.realisations, fix: 'give every shard the same --realisations' },
  { what: 'block size', of: (s) => s.header.blockSize, fix: 'give every shard the same --block-size' },
  { what: 'histogram bins', of: (s) => JSON.stringify(s.header.bins), fix: 'give every shard the same --bins-per-atom' },
];

function describe(s: LoadedShard): string {
  return `${JSON.stringify(s.path)} (shard ${s.header.shard.index} of ${s.header.shard.count})`;
}

/** Which shard of which K-shard split would hold `block` (for the message about missing blocks). */
function ownerHint(block: number, shards: readonly LoadedShard[], plan: ReturnType<typeof planBlocks>): string {
  const counts = [...new Set(shards.map((s) => s.header.shard.count))];
  const hints = counts.map((k) => {
    for (let i = 0; i < k; i++) if (shardBlocks(plan, i, k).includes(block)) return `shard ${i} of ${k} (folder ${shardFolderName({ index: i, count: k })})`;
    return '';
  });
  return hints.filter((h) => h.length > 0).join(' or ');
}

/** "block 3 is" or "blocks 3-5, 8 are". */
function blocksAre(blocks: readonly number[]): string {
  return blocks.length === 1 ? `block ${blocks[0]} is` : `blocks ${formatBlockList(blocks)} are`;
}

export function checkShardSet(shards: readonly LoadedShard[]): ReturnType<typeof planBlocks> {
  const first = shards[0];
  for (const check of identityChecks) {
    const expected = check.of(first);
    const other = shards.find((s) => check.of(s) !== expected);
    if (other) {
      throw new InputError(
        `merge: the shards belong to different ensembles: ${check.what} is ${JSON.stringify(check.of(first))} in ${describe(first)} ` +
          `but ${JSON.stringify(check.of(other))} in ${describe(other)}; ${check.fix}`,
      );
    }
  }
  const plan = planBlocks(first.header.realisations, first.header.blockSize);
  if (plan.blockCount !== first.header.blockCount) {
    throw new InputError(`merge ${describe(first)}: header says ${first.header.blockCount} blocks, but ${plan.realisations} realisations in blocks of ${plan.blockSize} make ${plan.blockCount}`);
  }
  const seenFolders = new Map<string, string>();
  for (const s of shards) {
    const key = resolve(s.path);
    if (seenFolders.has(key)) throw new InputError(`merge: the shard folder ${JSON.stringify(s.path)} is given twice; give each shard once`);
    seenFolders.set(key, s.path);
  }
  const held = shards.flatMap((s) => s.header.blocks.map((b) => b.block));
  const coverage = blockCoverage(plan, held);
  const problems: string[] = [];
  if (coverage.outOfRange.length > 0) problems.push(`${blocksAre(coverage.outOfRange)} outside the ensemble (blocks are 0 to ${plan.blockCount - 1})`);
  if (coverage.duplicated.length > 0) {
    const lines = coverage.duplicated.slice(0, 8).map(({ block }) => {
      const holders = shards.filter((s) => s.header.blocks.some((b) => b.block === block)).map(describe);
      return `block ${block} is in ${holders.join(' and ')}`;
    });
    problems.push(
      `${blocksAre(coverage.duplicated.map((d) => d.block))} held by more than one shard (${lines.join('; ')}` +
        `${coverage.duplicated.length > 8 ? '; ...' : ''}); leave out the extra shards`,
    );
  }
  if (coverage.missing.length > 0) {
    const hints = coverage.missing.slice(0, 4).map((b) => `block ${b}: ${ownerHint(b, shards, plan) || 'no shard given'}`);
    problems.push(
      `${blocksAre(coverage.missing)} missing from blocks 0-${plan.blockCount - 1} (${hints.join('; ')}${coverage.missing.length > 4 ? '; ...' : ''}); ` +
        'run the missing shards (or wait for them to finish) and merge again',
    );
  }
  if (problems.length > 0) throw new InputError(`merge: the shards do not cover the ensemble exactly once: ${problems.join('; ')}`);
  for (const s of shards) {
    for (const b of s.header.blocks) {
      const ok =
        b.first === b.block * plan.blockSize &&
        b.count === Math.min(plan.blockSize, plan.realisations - b.first) &&
        b.records.length === b.count &&
        b.records.every((r, k) => r.index === b.first + k);
      if (!ok) throw new InputError(`merge ${describe(s)}: block ${b.block} does not hold realisations ${b.first} to ${b.first + b.count - 1} in order; the shard is damaged, run it again`);
    }
  }
  return plan;
}

export async function runMergeCommand(paths: readonly string[], options: MergeCommandOptions): Promise<number> {
  if (paths.length === 0) throw new InputError('merge: give at least one shard folder');
  const folders = findShardFolders(paths);
  const shards = folders.map(readShardHeader);
  const plan = checkShardSet(shards);
  const header = shards[0].header;
  const bins = header.bins;
  // One block in memory at a time, absorbed in block order: the same additions a single run makes.
  const entries = shards.flatMap((shard) => shard.header.blocks.map((entry) => ({ shard, entry }))).sort((a, b) => a.entry.block - b.entry.block);
  const total = createEnsembleTotal(header.context.shape.reduce((a, b) => a * b, 1), bins);
  for (const { shard, entry } of entries) absorbBlock(total, readShardBlock(shard, entry));
  const stats = ensembleStatistics(total);
  const used = shards.filter((s) => s.header.blocks.length > 0);
  const outcome: EnsembleOutcome = {
    scenario: header.scenario as unknown as Scenario,
    scenarioHash: header.scenarioHash,
    baseSeed: header.baseSeed,
    plan,
    bins,
    context: header.context as EnsembleContext,
    total,
    stats,
    provenance: {
      kind: 'merged shards',
      shards: shards.map((s) => ({
        folder: s.path,
        shard: `${s.header.shard.index}/${s.header.shard.count}`,
        blocks: formatBlockList(s.header.blocks.map((b) => b.block)),
        threads: s.header.run.threads,
        parallelOver: s.header.run.parallelOver,
        seconds: s.header.run.seconds,
      })),
    },
  };
  const outDir = resolve(options.out ?? `out/${header.scenarioName}-ensemble`);
  const folder = new OutputFolder(outDir);
  try {
    const createdIso = new Date().toISOString();
    const line = `merge of ${used.length} shard${used.length === 1 ? '' : 's'} (${shards.length} given); compute time ${used.reduce((t, s) => t + s.header.run.seconds, 0).toFixed(1)} s in total`;
    writeEnsembleFiles(outcome, folder, (images) => renderReportHtml(buildEnsembleReport(outcome, images, createdIso, [line])));
    folder.commit();
  } catch (err) {
    folder.discard();
    throw err;
  }
  if (!options.quiet) {
    process.stdout.write(
      `${header.scenarioName}: merged ${shards.length} shard${shards.length === 1 ? '' : 's'}, ${stats.realisations} realisations in ${plan.blockCount} blocks` +
        `${stats.notConverged.length > 0 ? `, ${stats.notConverged.length} NOT CONVERGED` : ''}\n` +
        `  superfluid spans the cloud in ${stats.spanningRealisations} of ${stats.realisations}\n  results in ${outDir}\n`,
    );
  }
  return stats.notConverged.length > 0 ? ExitCode.notConverged : ExitCode.done;
}

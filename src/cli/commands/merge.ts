// `tiercake merge SHARD_DIR... --out DIR`: combines the partial results of ensemble or
// scan shards into exactly the files a single `tiercake ensemble` or `tiercake scan` run
// writes (only `provenance` in summary.json and the report's time stamp differ). Refuses
// (exit code 2, nothing written) shards of different runs, and sets of shards that do not
// hold every block or chain exactly once (src/output/shardSet.ts, scanShard.ts).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import type { OutputFolder } from '../../output/outputFolder.js';
import { writeEnsembleResult, writeScanResult } from '../../output/batchResults.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { findShardFolders, readShardHeader } from '../../output/ensembleShard.js';
import { mergedEnsembleOutcome } from '../../output/ensembleMerge.js';
import { checkShardSet } from '../../output/shardSet.js';
import { ensembleWarnings } from '../../output/ensembleOutputs.js';
import { ensembleMergeLines } from '../../report/ensembleSummaryLines.js';
import { mergeProvenanceLine } from '../../report/mergeSummaryLine.js';
import { copyShardKeptPoints, mergedScanOutcome, readScanShards, type LoadedScanShard } from '../../output/scanShard.js';
import { scanDoneLines } from '../../report/scanSummaryLines.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['out', 'force', 'quiet'] as const;

export function registerMerge(program: Command, context: CommandContext): void {
  const command = program
    .command('merge')
    .description('combine ensemble or scan shards into the result a single run gives (bit for bit)')
    .argument('<shards...>', 'shard folders, or folders that collect them (e.g. the --out folder of the shards)');
  declare(command, OPTIONS, { out: { help: 'output folder (default out/<name>-ensemble for ensemble shards, out/<name>-scan for scan shards)' }, quiet: { help: 'no summary on stdout' } }).action(
    async (shards: string[], options: RawOptions) => {
      context.exitCode = await runMergeCommand(shards, options);
    },
  );
}

export async function runMergeCommand(paths: readonly string[], raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  if (paths.length === 0) throw new InputError('merge: give at least one shard folder');
  const folders = findShardFolders(paths);
  const scanShards = readScanShards(folders);
  if (scanShards !== null) return mergeScanShards(scanShards, paths, o);
  const shards = folders.map(readShardHeader);
  const plan = checkShardSet(shards);
  const name = shards[0].header.scenarioName;
  const outDir = resolve(o.out ?? `out/${name}-ensemble`);
  const target = outputTarget(o.out ?? outDir, { force: o.force ?? false, inputs: [...paths] });
  const outcome = mergedEnsembleOutcome(shards, plan);
  const stats = outcome.stats;
  const line = mergeProvenanceLine('', shards.map((s) => ({ units: s.header.blocks.length, seconds: s.header.run.seconds })));
  reportCommit(await writeEnsembleResult(target, 'merge', outcome, line));
  for (const w of ensembleWarnings(outcome)) process.stderr.write(`tiercake: warning: ${w.code}: ${w.message}\n`);
  if (!o.quiet) process.stdout.write(`${ensembleMergeLines(name, shards.length, stats, plan, outDir).join('\n')}\n`);
  return stats.notConverged.length > 0 ? ExitCode.notConverged : ExitCode.done;
}

/** The merge of scan shards (written by `tiercake scan --shard`) into the files of one scan run. */
async function mergeScanShards(shards: readonly LoadedScanShard[], paths: readonly string[], o: { out?: string; force?: boolean; quiet?: boolean }): Promise<number> {
  const outcome = mergedScanOutcome(shards);
  const outDir = resolve(o.out ?? `out/${shards[0].header.scenarioName}-scan`);
  const target = outputTarget(o.out ?? outDir, { force: o.force ?? false, inputs: [...paths] });
  const line = mergeProvenanceLine('scan ', shards.map((s) => ({ units: s.header.chains.length, seconds: s.header.run.seconds })));
  const points = outcome.keepPoints ? (folder: OutputFolder): void => copyShardKeptPoints(folder, shards, outcome.plan) : null;
  reportCommit(await writeScanResult(target, 'merge', outcome, line, points));
  if (!o.quiet) process.stdout.write(`${scanDoneLines(outcome, null).join('\n')} (merged ${shards.length} shards)\n  results in ${outDir}\n`);
  return outcome.rows.some((r) => !r.converged) ? ExitCode.notConverged : ExitCode.done;
}

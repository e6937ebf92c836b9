// `tiercake merge SHARD_DIR... --out DIR`: combines the partial results of ensemble or
// scan shards into exactly the files a single `tiercake ensemble` or `tiercake scan` run
// writes (only `provenance` in summary.json and the report's time stamp differ). Refuses
// (exit code 2, nothing written) shards of different runs, and sets of shards that do not
// hold every block or chain exactly once (src/output/shardSet.ts, scanShard.ts).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { mergeShards } from '../../output/shardMerge.js';
import { ensembleWarnings } from '../../output/ensembleOutputs.js';
import { ensembleMergeLines } from '../../report/ensembleSummaryLines.js';
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
  const merged = await mergeShards(paths, (defaultFolder) => outputTarget(o.out ?? resolve(defaultFolder), { force: o.force ?? false, inputs: [...paths] }));
  reportCommit(merged.commit);
  const outDir = merged.target.path;
  if (merged.kind === 'scan') {
    const { outcome } = merged;
    if (!o.quiet) process.stdout.write(`${scanDoneLines(outcome, null).join('\n')} (merged ${merged.shardCount} shards)\n  results in ${outDir}\n`);
    return outcome.rows.some((r) => !r.converged) ? ExitCode.notConverged : ExitCode.done;
  }
  const { stats } = merged.outcome;
  for (const w of ensembleWarnings(merged.outcome)) process.stderr.write(`tiercake: warning: ${w.code}: ${w.message}\n`);
  if (!o.quiet) process.stdout.write(`${ensembleMergeLines(merged.scenarioName, merged.shardCount, stats, merged.plan, outDir).join('\n')}\n`);
  return stats.notConverged.length > 0 ? ExitCode.notConverged : ExitCode.done;
}

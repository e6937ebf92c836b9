// `tiercake merge SHARD_DIR... --out DIR`: combines the partial results of ensemble
// shards into exactly the files a single `tiercake ensemble` run writes. Refuses (exit
// code 2, nothing written) shards of different ensembles, and sets of shards that do not
// hold every block exactly once (src/output/shardSet.ts). Blocks are read one at a time
// and absorbed in block order: the same additions a single run makes. Shards of a
// `tiercake scan` are merged by mergeScan.ts into the files of a single scan run.

import type { Command } from 'commander';
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { renderReportHtml } from '../../report/renderReport.js';
import { formatBlockList } from '../../pipeline/ensemble/blockPlan.js';
import { absorbBlock, createEnsembleTotal } from '../../pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../../pipeline/ensemble/ensembleStatistics.js';
import type { EnsembleContext } from '../../pipeline/ensemble/solveRealisation.js';
import type { Scenario } from '../../scenario/scenarioSchema.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { findShardFolders, readShardBlock, readShardHeader, SHARD_HEADER_FILE } from '../../output/ensembleShard.js';
import { checkShardSet } from '../../output/shardSet.js';
import { ensembleWarnings, writeEnsembleFiles, type EnsembleOutcome } from '../../output/ensembleOutputs.js';
import { buildEnsembleReport } from '../../report/ensembleReport.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { parseScanShardHeader, SCAN_SHARD_FORMAT, type LoadedScanShard } from '../../output/scanShard.js';
import { mergeScanShards } from './mergeScan.js';

const OPTIONS = ['out', 'force', 'quiet'] as const;

export function registerMerge(program: Command, context: CommandContext): void {
  const command = program
    .command('merge')
    .description('combine ensemble or scan shards into the result a single run gives (bit for bit)')
    .argument('<shards...>', 'shard folders, or folders that collect them (e.g. the --out folder of the shards)');
  declare(command, OPTIONS, { out: { help: 'output folder (default out/<name>-ensemble)' }, quiet: { help: 'no summary on stdout' } }).action(
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
  const header = shards[0].header;
  const outDir = resolve(o.out ?? `out/${header.scenarioName}-ensemble`);
  const target = outputTarget(o.out ?? outDir, { force: o.force ?? false, inputs: [...paths] });
  const bins = header.bins;
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
  const createdIso = new Date().toISOString();
  const line = `merge of ${used.length} shard${used.length === 1 ? '' : 's'} (${shards.length} given); compute time ${used.reduce((t, s) => t + s.header.run.seconds, 0).toFixed(1)} s in total`;
  const { commit } = await writeOutputFolder(target, { command: 'merge', scenarioHash: header.scenarioHash }, (folder) =>
    writeEnsembleFiles(outcome, folder, (images) => renderReportHtml(buildEnsembleReport(outcome, images, createdIso, [line]))),
  );
  reportCommit(commit);
  for (const w of ensembleWarnings(outcome)) process.stderr.write(`tiercake: warning: ${w.code}: ${w.message}\n`);
  if (!o.quiet) {
    process.stdout.write(
      `${header.scenarioName}: merged ${shards.length} shard${shards.length === 1 ? '' : 's'}, ${stats.realisations} realisations in ${plan.blockCount} blocks` +
        `${stats.notConverged.length > 0 ? `, ${stats.notConverged.length} NOT CONVERGED` : ''}\n` +
        `  superfluid spans the cloud in ${stats.spanningRealisations} of ${stats.realisations}\n  results in ${outDir}\n`,
    );
  }
  return stats.notConverged.length > 0 ? ExitCode.notConverged : ExitCode.done;
}

/**
 * The shards as scan shards when their headers say so (null when they are ensemble
 * shards); a mixture is refused naming the shard of the other kind.
 */
function readScanShards(folders: readonly string[]): LoadedScanShard[] | null {
  const formats = folders.map((f) => {
    try {
      const parsed: unknown = JSON.parse(readFileSync(join(f, SHARD_HEADER_FILE), 'utf8'));
      return { folder: f, parsed, scan: parsed !== null && typeof parsed === 'object' && (parsed as Record<string, unknown>).format === SCAN_SHARD_FORMAT };
    } catch {
      return { folder: f, parsed: null, scan: false };
    }
  });
  const scans = formats.filter((f) => f.scan);
  if (scans.length === 0) return null;
  const other = formats.find((f) => !f.scan);
  if (other) {
    throw new InputError(
      `merge: ${JSON.stringify(other.folder)} is not a scan shard but ${JSON.stringify(scans[0].folder)} is; merge the shards of one scan (or of one ensemble) at a time`,
    );
  }
  return scans.map((f) => parseScanShardHeader(f.folder, f.parsed));
}

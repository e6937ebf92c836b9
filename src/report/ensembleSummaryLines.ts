// What `ensemble` and `merge` of ensemble shards say on the terminal, as plain lines (no
// I/O): the summary of a finished run, of a finished shard, and of a merge.

import { formatBlockList, type BlockPlan } from '../pipeline/ensemble/blockPlan.js';
import type { EnsembleStatistics } from '../pipeline/ensemble/ensembleStatistics.js';

/** "2 threads, parallel over realisations", and why fewer threads ran than were given. */
export function ensembleThreadNote(used: number, given: number, toRun: number, parallelOver: string): string {
  const fewer = used < given ? `: only ${toRun} realisation${toRun === 1 ? '' : 's'} to run side by side` : '';
  return `${used} thread${used > 1 ? 's' : ''}${fewer}, parallel over ${parallelOver}`;
}

/** A finished complete run: realisations, spanning superfluid, atoms, condensate and superfluid fraction. */
export function ensembleDoneLines(name: string, stats: EnsembleStatistics, seconds: number, threadNote: string, notConverged: number, collect: string): string[] {
  const f = stats.superfluidFraction;
  return [
    `${name}: ${stats.realisations} realisations in ${seconds.toFixed(1)} s (${threadNote})` + (notConverged > 0 ? `, ${notConverged} NOT CONVERGED` : ', all converged'),
    `  superfluid spans the cloud in ${stats.spanningRealisations} of ${stats.realisations} (fraction ${stats.spanningFraction.toFixed(3)} ± ${stats.spanningFractionError.toFixed(3)})`,
    `  atoms ${stats.atoms.mean.toPrecision(6)} ± ${stats.atoms.spread.toPrecision(3)}, condensate fraction ${stats.condensateFraction.mean.toFixed(4)}`,
    ...(f !== null
      ? [`  superfluid fraction ${f.mean.toPrecision(4)} ± ${f.spread.toPrecision(2)} (spread; standard error ${f.standardError.toPrecision(2)}), no superflow in ${f.noSuperflowRealisations} of ${stats.realisations}`]
      : []),
    `  results in ${collect}`,
  ];
}

/** A finished shard: its blocks, where its partial result is, and how to merge (`prefix`: how tiercake was started). */
export function ensembleShardLines(
  name: string,
  shard: { index: number; count: number; source: string },
  plan: BlockPlan,
  blocks: readonly number[],
  realisations: number,
  notConverged: number,
  seconds: number,
  threadNote: string,
  folder: string,
  collect: string,
  prefix: string,
): string[] {
  return [
    `${name}: shard ${shard.index} of ${shard.count} (index from ${shard.source}): ` +
      (blocks.length > 0 ? `blocks ${formatBlockList(blocks)} of ${plan.blockCount}, ${realisations} realisations` : `no blocks (only ${plan.blockCount} blocks for ${shard.count} shards)`) +
      ` in ${seconds.toFixed(1)} s (${threadNote})`,
    ...(notConverged > 0 ? [`  ${notConverged} realisation${notConverged > 1 ? 's' : ''} NOT CONVERGED (flagged in the merged result)`] : []),
    `  partial result in ${folder}`,
    `  merge when every shard is done: ${prefix} merge ${collect} --out <folder>`,
  ];
}

/** A merge of ensemble shards. */
export function ensembleMergeLines(name: string, shards: number, stats: EnsembleStatistics, plan: BlockPlan, outDir: string): string[] {
  return [
    `${name}: merged ${shards} shard${shards === 1 ? '' : 's'}, ${stats.realisations} realisations in ${plan.blockCount} blocks` +
      `${stats.notConverged.length > 0 ? `, ${stats.notConverged.length} NOT CONVERGED` : ''}`,
    `  superfluid spans the cloud in ${stats.spanningRealisations} of ${stats.realisations}`,
    `  results in ${outDir}`,
  ];
}

// What `scan` and `merge` of scan shards say on the terminal, as plain lines (no I/O):
// one line per finished point (stderr), and the summary of a finished scan or shard.

import type { ScanPointResult } from '../pipeline/scan/runScan.js';
import type { ScanPlan } from '../pipeline/scan/scanPlan.js';
import type { ScanRow } from '../pipeline/scan/scanRow.js';
import type { ScanOutcome } from '../output/scanOutputs.js';

/** One finished point: where it is, whether it converged, its cost and its N and mu. */
export function scanPointLine(plan: ScanPlan, r: ScanPointResult, done: number, total: number, unit: string): string {
  const at = plan.axes.map((a, k) => `${a.path}=${r.row.values[k]}`).join(' ');
  return (
    `tiercake scan: point ${done}/${total} (#${r.point}, ${at}): ${r.row.converged ? 'converged' : 'NOT CONVERGED'}, ${r.row.sweeps} sweeps ` +
    `(${r.row.warmStart ? 'warm' : 'cold'} start), N ${r.row.atoms.toPrecision(6)}, mu ${r.row.chemicalPotential.toPrecision(5)} ${unit}`
  );
}

/** What a finished scan (or merge) says on stdout; `seconds` null leaves the time out. */
export function scanDoneLines(o: ScanOutcome, seconds: number | null): string[] {
  const bad = o.rows.filter((r) => !r.converged).length;
  const sweeps = o.rows.reduce((t, r) => t + r.sweeps, 0);
  return [
    `${o.scenario.name}: scan of ${o.plan.axes.map((a) => a.path).join(' x ')}, ${o.rows.length} points${seconds !== null ? ` in ${seconds.toFixed(1)} s` : ''}, ${sweeps} sweeps` +
      (bad > 0 ? `, ${bad} NOT CONVERGED` : ', all converged'),
  ];
}

/** What a finished scan shard says: its chains, where its partial result is, how to merge. */
export function scanShardLines(
  name: string,
  shard: { index: number; count: number; source: string },
  plan: ScanPlan,
  chains: readonly number[],
  rows: readonly ScanRow[],
  seconds: number,
  folder: string,
  collect: string,
  /** the command as the user can type it (cli/invocation.ts), e.g. 'tiercake' or 'node dist/main.js' */
  command: string,
): string[] {
  const notConverged = rows.filter((r) => !r.converged).length;
  return [
    `${name}: scan shard ${shard.index} of ${shard.count} (index from ${shard.source}): ` +
      (chains.length > 0 ? `${rows.length} points in chains ${chains[0]}-${chains[chains.length - 1]} of ${plan.chainCount}` : `no chains (only ${plan.chainCount} chains for ${shard.count} shards)`) +
      ` in ${seconds.toFixed(1)} s${notConverged > 0 ? `, ${notConverged} NOT CONVERGED` : ''}`,
    `  partial result in ${folder}`,
    `  merge when every shard is done: ${command} merge ${collect} --out <folder>`,
  ];
}

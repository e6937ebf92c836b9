// What `tiercake progress` prints, as plain lines (no I/O): the shards done, started,
// missing and of other work, the submissions and the merge, and the exact command that
// submits the missing shards again (`tiercake submit ... --only-shards 2,5`, or by hand
// with sbatch --array), or merges when every shard is done.

import { shellWords } from '../output/batchScripts.js';
import type { BatchProgress } from '../output/batchProgress.js';
import { indexList, type ShardState } from '../output/shardProgress.js';

function ago(ms: number, nowMs: number): string {
  const s = Math.max(0, (nowMs - ms) / 1000);
  return s < 120 ? `${s.toFixed(0)} s ago` : s < 7200 ? `${(s / 60).toFixed(0)} min ago` : `${(s / 3600).toFixed(1)} h ago`;
}

/** The states of one set of K shards. */
export function shardStateLines(states: readonly ShardState[], nowMs: number): string[] {
  const of = (kind: ShardState['kind']): ShardState[] => states.filter((s) => s.kind === kind);
  const list = (s: readonly ShardState[]): string => (s.length > 0 ? indexList(s.map((x) => x.index)) : '-');
  const done = of('done') as Extract<ShardState, { kind: 'done' }>[];
  const bad = done.reduce((n, s) => n + s.notConverged, 0);
  const lines = [
    `  done     ${list(done)}${bad > 0 ? `  (${bad} point${bad === 1 ? '' : 's'} or realisation${bad === 1 ? '' : 's'} NOT CONVERGED, flagged)` : ''}`,
    `  started  ${list(of('started'))}`,
    `  missing  ${list(of('missing'))}${of('missing').length > 0 ? '  (nothing in the folder yet: still queued, or cancelled or failed before they started)' : ''}`,
  ];
  for (const s of of('started') as Extract<ShardState, { kind: 'started' }>[]) {
    lines.push(`    shard ${s.index}: started, not finished (${s.detail ? `${s.detail}, ` : ''}last written ${ago(s.lastWrittenMs, nowMs)}): running, or stopped`);
  }
  for (const s of of('foreign') as Extract<ShardState, { kind: 'foreign' }>[]) {
    lines.push(`  foreign  shard ${s.index}: ${s.folder} is other work (${s.reason}); merge refuses it, run it again`);
  }
  return lines;
}

/** Every line of `tiercake progress`; `tool` (how tiercake is started) is asked only for the merge hint of bare shards. */
export function progressLines(p: BatchProgress, nowMs: number, tool: () => string[]): string[] {
  const out: string[] = [];
  if (p.kind === 'shards') {
    for (const { count, states } of p.sets) {
      out.push(`${p.shardDir}: ${count} shards`);
      out.push(...shardStateLines(states, nowMs));
      const redo = states.filter((s) => s.kind !== 'done').map((s) => s.index);
      if (redo.length > 0) {
        out.push(`run the shards ${indexList(redo)} again with the command that wrote the others and --shard k/${count} (or in a job array: sbatch --array=${indexList(redo)} ...)`);
      } else {
        out.push(`every shard is done; merge them: ${shellWords([...tool(), 'merge', p.shardDir, '--out', '<folder>'])}`);
      }
    }
    return out;
  }
  const { submission: sub, states, jobs, dir } = p;
  out.push(`${sub.describes}: ${sub.shards} shards (scenario ${sub.scenarioHash.slice(0, 12)})`);
  for (const j of jobs) out.push(`  submitted ${j.submittedIso}: shards ${indexList(j.shards)} as job array ${j.arrayJob}, merge job ${j.mergeJob ?? 'not submitted'}${j.held ? ' (tasks held at submission)' : ''}`);
  out.push(...shardStateLines(states, nowMs));
  out.push(`  merged   ${p.mergedIso !== null ? `yes: ${sub.resultDir} (${p.mergedIso})` : `not yet (${sub.resultDir})`}`);
  const redo = states.filter((s) => s.kind === 'missing' || s.kind === 'foreign').map((s) => s.index);
  const started = states.filter((s) => s.kind === 'started').map((s) => s.index);
  const resubmit = (list: number[]): string => shellWords([...sub.tool.command, 'submit', ...sub.submitArgs, '--only-shards', indexList(list), '--out', dir]);
  const arrays = jobs.map((j) => j.arrayJob).join(',');
  if (redo.length > 0) {
    out.push(`once squeue${arrays ? ` -j ${arrays}` : ''} no longer lists them, resubmit the missing shards (${indexList(redo)}) with a new merge job:`);
    out.push(`  ${resubmit(redo)}`);
    out.push(`  or by hand: sbatch --array=${indexList(redo)} ${shellWords([sub.arrayScript])}, then sbatch --dependency=afterok:<that job id> ${shellWords([sub.mergeScript])}`);
  }
  if (started.length > 0) {
    out.push(`if the jobs of shard${started.length > 1 ? 's' : ''} ${indexList(started)} no longer run (squeue), include ${started.length > 1 ? 'them' : 'it'} (a scan shard continues where it stopped):`);
    out.push(`  ${resubmit([...redo, ...started].sort((a, b) => a - b))}`);
  }
  if (redo.length === 0 && started.length === 0 && p.mergedIso === null) {
    out.push('every shard is done; the merge job writes the result (if it did not run, merge by hand):');
    out.push(`  ${shellWords([...sub.tool.command, 'merge', p.shardDir, '--out', sub.resultDir])}`);
  }
  return out;
}

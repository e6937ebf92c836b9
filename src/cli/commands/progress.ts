// `tiercake progress DIR`: which shards of a sharded run are done, started or missing,
// read from the folder alone (src/output/shardProgress.ts; no scheduler accounting), whether
// the merged result is there, and the exact command that submits only the missing shards
// again (`tiercake submit ... --only-shards 2,5`, or by hand with sbatch --array).
// DIR is a `tiercake submit` folder, or a folder that collects shards (the --out of
// `ensemble --shard` / `scan --shard`). Always exits 0 when DIR can be read.

import type { Command } from 'commander';
import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { readJobRecords, readSubmission } from '../../output/submission.js';
import { indexList, shardCountsIn, shardStates, type ShardState } from '../../output/shardProgress.js';
import { readMarker } from '../../output/outputMarker.js';
import { shardFolderName } from '../../output/shardSet.js';
import { SHARD_HEADER_FILE } from '../../output/ensembleShard.js';
import { shellWords } from '../../output/batchScripts.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { toolInvocation } from '../toolInvocation.js';

export function registerProgress(program: Command, context: CommandContext): void {
  program
    .command('progress')
    .description('which shards of a sharded run are done, started or missing (from the folder alone), and how to resubmit the missing ones')
    .argument('<dir>', 'a `tiercake submit` folder, or a folder that collects shards')
    .action(async (dir: string) => {
      context.exitCode = await runProgressCommand(dir, {});
    });
}

function ago(ms: number, nowMs: number): string {
  const s = Math.max(0, (nowMs - ms) / 1000);
  return s < 120 ? `${s.toFixed(0)} s ago` : s < 7200 ? `${(s / 60).toFixed(0)} min ago` : `${(s / 3600).toFixed(1)} h ago`;
}

function stateLines(states: readonly ShardState[], nowMs: number): string[] {
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

export async function runProgressCommand(dirGiven: string, _raw: Record<string, unknown>, nowMs = Date.now()): Promise<number> {
  const dir = resolve(dirGiven);
  if (!existsSync(dir)) throw new InputError(`progress ${dirGiven}: no such folder; give the --out folder of \`tiercake submit\` (or the folder that collects shards)`);
  const sub = readSubmission(dir, 'progress');
  const out: string[] = [];
  if (sub !== null) {
    const shardDir = existsSync(sub.shardDir) ? sub.shardDir : join(dir, 'shards');
    const states = shardStates(shardDir, sub.shards, { scenarioHash: sub.scenarioHash, scanHash: sub.scanHash, ensemble: sub.ensemble });
    const jobs = readJobRecords(dir);
    out.push(`${sub.describes}: ${sub.shards} shards (scenario ${sub.scenarioHash.slice(0, 12)})`);
    for (const j of jobs) out.push(`  submitted ${j.submittedIso}: shards ${indexList(j.shards)} as job array ${j.arrayJob}, merge job ${j.mergeJob ?? 'not submitted'}${j.held ? ' (tasks held at submission)' : ''}`);
    out.push(...stateLines(states, nowMs));
    const marker = existsSync(sub.resultDir) ? readMarker(sub.resultDir) : null;
    const merged = marker !== null && !('error' in marker) && marker.command === 'merge' && marker.scenarioHash === sub.scenarioHash;
    out.push(`  merged   ${merged ? `yes: ${sub.resultDir} (${marker.createdIso})` : `not yet (${sub.resultDir})`}`);
    const redo = states.filter((s) => s.kind === 'missing' || s.kind === 'foreign').map((s) => s.index);
    const started = states.filter((s) => s.kind === 'started').map((s) => s.index);
    const tool = sub.tool.command;
    const resubmit = (list: number[]): string => shellWords([...tool, 'submit', ...sub.submitArgs, '--only-shards', indexList(list), '--out', dir]);
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
    if (redo.length === 0 && started.length === 0 && !merged) {
      out.push('every shard is done; the merge job writes the result (if it did not run, merge by hand):');
      out.push(`  ${shellWords([...tool, 'merge', shardDir, '--out', sub.resultDir])}`);
    }
  } else {
    const shardDir = shardCountsIn(dir).length > 0 ? dir : join(dir, 'shards');
    const counts = shardCountsIn(shardDir);
    if (counts.length === 0) throw new InputError(`progress ${dirGiven}: holds no submission (submit.json) and no shard folders (shard-k-of-K); is this the right folder?`);
    for (const count of counts) {
      const states = shardStates(shardDir, count, { scenarioHash: firstHash(shardDir, count), scanHash: null, ensemble: null });
      out.push(`${shardDir}: ${count} shards`);
      out.push(...stateLines(states, nowMs));
      const redo = states.filter((s) => s.kind !== 'done').map((s) => s.index);
      if (redo.length > 0) {
        out.push(`run the shards ${indexList(redo)} again with the command that wrote the others and --shard k/${count} (or in a job array: sbatch --array=${indexList(redo)} ...)`);
      } else {
        out.push(`every shard is done; merge them: ${shellWords([...toolInvocation(), 'merge', shardDir, '--out', '<folder>'])}`);
      }
    }
  }
  process.stdout.write(`${out.join('\n')}\n`);
  return ExitCode.done;
}

/** Scenario hash of the first complete shard of K shards (what the others are compared with), or null. */
function firstHash(shardDir: string, count: number): string | null {
  for (let k = 0; k < count; k++) {
    const file = join(shardDir, shardFolderName({ index: k, count }), SHARD_HEADER_FILE);
    try {
      return String((JSON.parse(readFileSync(file, 'utf8')) as { scenarioHash: string }).scenarioHash);
    } catch {
      continue;
    }
  }
  return null;
}

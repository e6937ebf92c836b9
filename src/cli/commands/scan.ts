// `tiercake scan SCENARIO --vary PATH=FROM:TO:COUNT [--vary PATH2=...] --out DIR`: solves
// the scenario at every point of a one- or two-axis grid of scenario values, each point
// warm-started from its neighbours (src/pipeline/scan), and writes scan.csv, summary.json,
// figures and report.html. With --shard k/K (or --shard-from-env) it solves only shard k's
// chains and writes a partial result for `tiercake merge`. Finished points are kept in
// `<out>.partial` while it runs: run the same command again after an interruption and
// they are skipped. Exit code 0 done, 2 bad input, 3 some point did not converge (results
// written and flagged), 130 interrupted (the points done are kept).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { scanDoneLines, scanPointLine, scanShardLines } from '../../report/scanSummaryLines.js';
import { PARALLEL_MIN_SITES, type WorkerModule } from '../../pipeline/solveScenario.js';
import { chainPoints, shardChains } from '../../pipeline/scan/scanPlan.js';
import { runScan, type ScanPointResult } from '../../pipeline/scan/runScan.js';
import { scanSetup } from '../../pipeline/scan/scanSetup.js';
import { scanEnergyUnit } from '../../pipeline/scan/scanRow.js';
import { createSweepPool, type SweepPool } from '../../solver/sweepExecutor.js';
import { ExitCode } from '../../scenario/inputError.js';
import { defaultOutputFolder, runOutputFolder } from '../../output/defaultOutputFolders.js';
import { resolveShard } from '../../pipeline/shardChoice.js';
import { openScanWork, scanWorkPath } from '../../output/scanWork.js';
import { describeScan } from '../../output/scanIdentity.js';
import { commitScanRun, keepScanPoint, scanRunIdentity, scanRunRows } from '../../output/scanRunResult.js';
import type { CommandContext } from '../main.js';
import { readOptions, type RawOptions } from '../options.js';
import { registerScenarioCommand } from '../scenarioCommand.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { progressFor } from '../progress.js';
import { whileInterruptible } from '../signals.js';
import { parseVaryOptions } from '../varyOption.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { commandPrefix } from '../invocation.js';

const OPTIONS = ['vary', 'log', 'fixed', 'chainLength', 'realisations', 'keepPoints', 'shard', 'shardFromEnv', 'shards', 'threads', 'set', 'out', 'force', 'quiet', 'jsonProgress'] as const;

/** Injection points for tests: the sweep workers' module, the environment, an interruption. */
export interface ScanHooks {
  sweepWorker?: WorkerModule;
  env?: Readonly<Record<string, string | undefined>>;
  /** asked with the number of points finished so far; true interrupts as SIGINT would */
  interrupt?: (finished: number) => boolean;
}

export function registerScan(program: Command, context: CommandContext): void {
  registerScenarioCommand(program, context, {
    name: 'scan',
    description: 'solve a scenario over a range of one or two of its values (warm-started), with a table, figures and a report; shardable',
    scenarioHelp: 'scenario file (JSON); examples in configs/',
    options: OPTIONS,
    overrides: {
      out: { help: 'output folder (default out/<name>-scan; for shards the folder that collects them, default out/<name>-scan-shards)' },
      realisations: {
        help: 'disorder realisations per point (realisation r uses the seed "<disorder.seed>/r", solved cold): rows hold their means, the spread of the superfluid fraction and the share of each phase (default 1)',
      },
    },
    run: runScanCommand,
  });
}

export async function runScanCommand(scenarioPath: string, raw: RawOptions, hooks: ScanHooks = {}): Promise<number> {
  const started = performance.now();
  const o = readOptions(raw, OPTIONS);
  const setup = scanSetup(scenarioPath, parseVaryOptions(o.vary, o.log ?? false), o, memoryLimitBytes());
  const { plan, base } = setup;
  const unit = scanEnergyUnit(base.resolved).name;
  const id = scanRunIdentity(setup, unit);
  const shard = resolveShard(o.shard, o.shardFromEnv, o.shards, hooks.env ?? process.env);
  const threads = o.threads ?? defaultThreads();
  const given = o.out ?? defaultOutputFolder(shard ? 'scan shards' : 'scan', base.scenario.name);
  const target = outputTarget(runOutputFolder(given, shard), { force: o.force ?? false, inputs: [scenarioPath] });
  const chains = shard ? shardChains(plan, shard.index, shard.count) : Array.from({ length: plan.chainCount }, (_, c) => c);
  const work = openScanWork(scanWorkPath(target.path), id.scanHash, describeScan(plan), plan.pointCount);
  const total = chains.reduce((n, c) => n + chainPoints(plan, c).length, 0);
  const quiet = o.quiet ?? false;
  const progress = progressFor(o);
  if (work.resumedPoints > 0 && !quiet) process.stderr.write(`tiercake scan: continuing from ${work.path}: ${work.resumedPoints} points already done\n`);

  let pool: SweepPool | null = null;
  if (threads > 1 && base.resolved.geometry.siteCount >= PARALLEL_MIN_SITES) pool = createSweepPool({ workers: threads - 1, ...(hooks.sweepWorker ?? {}) });
  let finished = work.resumedPoints;
  const onPoint = async (r: ScanPointResult): Promise<void> => {
    await keepScanPoint(work, id, r);
    finished++;
    if (o.jsonProgress) process.stderr.write(`${JSON.stringify({ stage: 'point', done: finished, total, point: r.point, values: r.row.values, converged: r.row.converged, sweeps: r.row.sweeps, warmStart: r.row.warmStart })}\n`);
    else if (!quiet) process.stderr.write(`${process.stderr.isTTY ? '\r\x1b[K' : ''}${scanPointLine(plan, r, finished, total, unit)}\n`);
  };
  let run;
  try {
    run = await whileInterruptible((interrupted) =>
      runScan({
        plan,
        chains,
        hold: setup.hold,
        prepare: setup.prepare,
        threads,
        sweepPool: pool,
        done: (p) => work.done(p),
        onPoint,
        shouldStop: () => interrupted() || (hooks.interrupt?.(finished) ?? false),
        observer: (p) =>
          progress.update({ stage: `point ${finished + 1}/${total}`, sweep: p.solve.totalSweeps, residual: p.solve.change, errorEstimate: p.solve.errorEstimate, atoms: p.solve.atoms, mu: p.solve.mu, fraction: finished / total }),
      }),
    );
  } finally {
    if (pool) await pool.destroy();
  }
  progress.done();
  if (run.stopped) {
    process.stderr.write(`tiercake: scan interrupted; ${finished} of ${total} points are done and kept in ${work.path}\n  continue with the same command\n`);
    return ExitCode.interrupted;
  }
  const rows = scanRunRows(work, id, chains);
  const seconds = (performance.now() - started) / 1000;
  const exitCode = rows.some((r) => !r.converged) ? ExitCode.notConverged : ExitCode.done;
  const committed = await commitScanRun(target, work, id, { chains, rows, shard, threads, seconds }, `one run, ${seconds.toFixed(1)} s`);
  reportCommit(committed.commit);

  if (committed.kind === 'shard') {
    process.stdout.write(`${scanShardLines(base.scenario.name, committed.shard, plan, chains, rows, seconds, target.path, resolve(given), commandPrefix()).join('\n')}\n`);
    return exitCode;
  }
  process.stdout.write(`${scanDoneLines(committed.outcome, seconds).join('\n')}\n  results in ${resolve(given)}\n`);
  return exitCode;
}

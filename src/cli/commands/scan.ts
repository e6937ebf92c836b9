// `tiercake scan SCENARIO --vary PATH=FROM:TO:COUNT [--vary PATH2=...] --out DIR`: solves
// the scenario at every point of a one- or two-axis grid of scenario values, each point
// warm-started from its neighbours (src/pipeline/scan), and writes scan.csv, summary.json,
// figures and report.html. With --shard k/K (or --shard-from-env) it solves only shard k's
// chains and writes a partial result for `tiercake merge`. Finished points are kept in
// `<out>.partial` while it runs: run the same command again after an interruption and
// they are skipped. Exit code 0 done, 2 bad input, 3 some point did not converge (results
// written and flagged), 130 interrupted (the points done are kept).

import type { Command } from 'commander';
import { join, resolve } from 'node:path';
import { OutputFolder, writeOutputFolder } from '../../output/outputFolder.js';
import { renderReportHtml } from '../../report/renderReport.js';
import { buildScanReport } from '../../report/scanReport.js';
import { buildSolveReport } from '../../report/solveReport.js';
import { prepareScenario, type PreparedScenario } from '../../pipeline/prepareScenario.js';
import { PARALLEL_MIN_SITES, type WorkerModule } from '../../pipeline/solveScenario.js';
import { solvePictures } from '../../pipeline/solvePictures.js';
import { chainPoints, DEFAULT_CHAIN_LENGTH, MAX_REALISATIONS_PER_POINT, planScan, pointValues, shardChains, type ScanPlan } from '../../pipeline/scan/scanPlan.js';
import { runScan, type ScanPointResult } from '../../pipeline/scan/runScan.js';
import { CHARACTERISTIC_DENSITY, checkAxisCombination, checkNumericPath, directOverrides, scenarioOfPoint, valueAtPath } from '../../pipeline/scan/scanPoint.js';
import { loadScenario } from '../../scenario/loadScenario.js';
import { scanEnergyUnit, type ScanRow } from '../../pipeline/scan/scanRow.js';
import { createSweepPool, type SweepPool } from '../../solver/sweepExecutor.js';
import { scenarioHash } from '../../scenario/scenarioHash.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import { cameraPictureFiles } from '../../output/cameraOutputs.js';
import { writeSolveFiles } from '../../output/solveOutputs.js';
import { shardFolderName } from '../../output/shardSet.js';
import { copyFolderInto, openScanWork, scanWorkPath, type ScanWork } from '../../output/scanWork.js';
import { describeScan, effectiveHold, scanIdentityHash } from '../../output/scanIdentity.js';
import { writeScanShardHeader } from '../../output/scanShard.js';
import { writeScanFiles, type ScanOutcome } from '../../output/scanOutputs.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { progressFor } from '../progress.js';
import { whileInterruptible } from '../signals.js';
import { resolveShard, type ShardChoice } from '../shardOption.js';
import { parseVaryOptions } from '../varyOption.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['vary', 'log', 'fixed', 'chainLength', 'realisations', 'keepPoints', 'shard', 'shardFromEnv', 'shards', 'threads', 'set', 'out', 'force', 'quiet', 'jsonProgress'] as const;

/** Injection points for tests: the sweep workers' module, the environment, an interruption. */
export interface ScanHooks {
  sweepWorker?: WorkerModule;
  env?: Readonly<Record<string, string | undefined>>;
  /** asked with the number of points finished so far; true interrupts as SIGINT would */
  interrupt?: (finished: number) => boolean;
}

export function registerScan(program: Command, context: CommandContext): void {
  const command = program
    .command('scan')
    .description('solve a scenario over a range of one or two of its values (warm-started), with a table, figures and a report; shardable')
    .argument('<scenario>', 'scenario file (JSON); examples in configs/');
  declare(command, OPTIONS, {
    out: { help: 'output folder (default out/<name>-scan; for shards the folder that collects them, default out/<name>-scan-shards)' },
    realisations: {
      help: 'disorder realisations per point (realisation r uses the seed "<disorder.seed>/r", solved cold): rows hold their means, the spread of the superfluid fraction and the share of each phase (default 1)',
    },
  }).action(async (scenarioPath: string, options: RawOptions) => {
    context.exitCode = await runScanCommand(scenarioPath, options);
  });
}

/** The scan the options describe, checked against the scenario before any work. */
export interface ScanSetup {
  plan: ScanPlan;
  hold: 'trap' | 'atoms';
  base: PreparedScenario;
  prepare: (extra: readonly string[]) => PreparedScenario;
  scenarioHash: string;
  scanHash: string;
  keepPoints: boolean;
}

/** Reads --vary, --log, --fixed, --chain-length, --keep-points and --set; shared with `submit --scan`. */
export function scanSetup(scenarioPath: string, o: { vary?: string[]; log?: boolean; fixed?: string; chainLength?: number; realisations?: number; keepPoints?: boolean; set?: string[] }): ScanSetup {
  const axes = parseVaryOptions(o.vary, o.log ?? false);
  const hold = (o.fixed ?? 'trap') as 'trap' | 'atoms';
  if (o.fixed !== undefined && !axes.some((a) => a.path === CHARACTERISTIC_DENSITY)) {
    throw new InputError(`--fixed: only used with --vary ${CHARACTERISTIC_DENSITY}=...; leave it out`);
  }
  checkAxisCombination(
    axes.map((a) => a.path),
    hold,
  );
  if (o.realisations !== undefined && o.realisations > MAX_REALISATIONS_PER_POINT) {
    throw new InputError(`--realisations: at most ${MAX_REALISATIONS_PER_POINT} disorder realisations per scan point; give fewer, or run an ensemble per point`);
  }
  const plan = planScan(axes, o.chainLength ?? DEFAULT_CHAIN_LENGTH, o.realisations ?? 1);
  const overrides = o.set ?? [];
  const memory = memoryLimitBytes();
  const prepare = (extra: readonly string[]): PreparedScenario => prepareScenario(scenarioPath, [...overrides, ...extra], { memoryLimitBytes: memory });
  const base = prepare([]);
  if (plan.realisations > 1 && !base.scenario.disorder) {
    throw new InputError(
      '--realisations: the scenario has no disorder block, so every realisation would be the same; add one, e.g. "disorder": {"kind": "box", "width": 0.5, "seed": "run1"}, or leave --realisations out',
    );
  }
  // A path that holds a text, a list or a group in the scenario is named now, before the
  // schema refuses a number there with a message about the value.
  for (const a of plan.axes) if (a.path !== CHARACTERISTIC_DENSITY && valueAtPath(base.scenario, a.path) !== undefined) checkNumericPath(base, a.path);
  // Every point's scenario must be valid before the first solve: a value the schema refuses
  // at point 17 is reported now, naming the point. The first point is resolved in full
  // (paths, the characteristic density); the others are validated (cheap).
  for (const p of plan.order) {
    try {
      if (p === plan.order[0]) scenarioOfPoint(plan, p, hold, prepare);
      else loadScenario(scenarioPath, [...overrides, ...directOverrides(plan, p)]);
    } catch (err) {
      if (err instanceof InputError && plan.pointCount > 1) {
        const at = plan.axes.map((a, k) => `${a.path}=${pointValues(plan, p)[k]}`).join(', ');
        throw new InputError(`scan point ${p} (${at}): ${err.message}`);
      }
      throw err;
    }
  }
  const keepPoints = o.keepPoints ?? false;
  const baseHash = scenarioHash(base.scenario);
  return {
    plan,
    hold,
    base,
    prepare,
    scenarioHash: baseHash,
    scanHash: scanIdentityHash({ scenarioHash: baseHash, plan, hold: effectiveHold(plan, hold), keepPoints }),
    keepPoints,
  };
}

/** One line per finished point on stderr (and nothing with --quiet). */
function pointLine(plan: ScanPlan, r: ScanPointResult, done: number, total: number, unit: string): string {
  const at = plan.axes.map((a, k) => `${a.path}=${r.row.values[k]}`).join(' ');
  return (
    `tiercake scan: point ${done}/${total} (#${r.point}, ${at}): ${r.row.converged ? 'converged' : 'NOT CONVERGED'}, ${r.row.sweeps} sweeps ` +
    `(${r.row.warmStart ? 'warm' : 'cold'} start), N ${r.row.atoms.toPrecision(6)}, mu ${r.row.chemicalPotential.toPrecision(5)} ${unit}`
  );
}

export async function runScanCommand(scenarioPath: string, raw: RawOptions, hooks: ScanHooks = {}): Promise<number> {
  const started = performance.now();
  const o = readOptions(raw, OPTIONS);
  const setup = scanSetup(scenarioPath, o);
  const { plan, base } = setup;
  const shard: ShardChoice | null = resolveShard(o.shard, o.shardFromEnv, raw.shards === undefined ? undefined : String(raw.shards), hooks.env ?? process.env);
  const threads = o.threads ?? defaultThreads();
  const given = o.out ?? `out/${base.scenario.name}-${shard ? 'scan-shards' : 'scan'}`;
  const collect = resolve(given);
  const target = outputTarget(shard ? join(given, shardFolderName(shard)) : given, { force: o.force ?? false, inputs: [scenarioPath] });
  const chains = shard ? shardChains(plan, shard.index, shard.count) : Array.from({ length: plan.chainCount }, (_, c) => c);
  const work = openScanWork(scanWorkPath(target.path), setup.scanHash, describeScan(plan), plan.pointCount);
  const unit = scanEnergyUnit(base.resolved).name;
  const total = chains.reduce((n, c) => n + chainPoints(plan, c).length, 0);
  const quiet = o.quiet ?? false;
  const json = o.jsonProgress ?? false;
  const progress = progressFor(o);
  if (work.resumedPoints > 0 && !quiet) process.stderr.write(`tiercake scan: continuing from ${work.path}: ${work.resumedPoints} points already done\n`);

  const sites = base.resolved.geometry.siteCount;
  let pool: SweepPool | null = null;
  if (threads > 1 && sites >= PARALLEL_MIN_SITES) pool = createSweepPool({ workers: threads - 1, ...(hooks.sweepWorker ?? {}) });
  let finished = work.resumedPoints;
  const onPoint = async (r: ScanPointResult): Promise<void> => {
    if (setup.keepPoints) await writePointFolder(work, r);
    const points = chainPoints(plan, r.chain);
    // Keep this point's solution while the chain's next points may need it (two back).
    const release = r.lastOfChain ? points.slice(Math.max(0, r.position - 2), r.position) : r.position >= 2 ? [points[r.position - 2]] : [];
    work.record(r.row, r.warm, r.artifacts.resolved.geometry.shape, !r.lastOfChain, release);
    finished++;
    if (json) process.stderr.write(`${JSON.stringify({ stage: 'point', done: finished, total, point: r.point, values: r.row.values, converged: r.row.converged, sweeps: r.row.sweeps, warmStart: r.row.warmStart })}\n`);
    else if (!quiet) process.stderr.write(`${process.stderr.isTTY ? '\r\x1b[K' : ''}${pointLine(plan, r, finished, total, unit)}\n`);
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
  const wanted = new Set(chains.flatMap((c) => chainPoints(plan, c)));
  const rows = work.rows().filter((r) => wanted.has(r.point));
  if (rows.length !== wanted.size) throw new Error(`scan: ${rows.length} rows for ${wanted.size} points`);
  const seconds = (performance.now() - started) / 1000;
  const notConverged = rows.filter((r) => !r.converged).length;
  const pointFolders = (folder: OutputFolder): void => {
    if (setup.keepPoints) for (const r of rows) copyFolderInto(folder, work.pointFolder(r.point), `points/${pointFolderName(r.point)}`);
  };
  const id = { scenario: base.scenario, scenarioHash: setup.scenarioHash, scanHash: setup.scanHash, plan, hold: effectiveHold(plan, setup.hold), energyUnit: unit, keepPoints: setup.keepPoints };

  if (shard) {
    const folder = new OutputFolder(target, { command: 'scan shard', scenarioHash: setup.scenarioHash });
    let commit;
    try {
      pointFolders(folder);
      writeScanShardHeader(folder, id, { index: shard.index, count: shard.count }, chains, rows, { threads, seconds, resumedPoints: work.resumedPoints });
      commit = folder.commit();
    } catch (err) {
      folder.discard();
      throw err;
    }
    work.remove();
    reportCommit(commit);
    process.stdout.write(
      `${base.scenario.name}: scan shard ${shard.index} of ${shard.count} (index from ${shard.source}): ` +
        (chains.length > 0 ? `${rows.length} points in chains ${chains[0]}-${chains[chains.length - 1]} of ${plan.chainCount}` : `no chains (only ${plan.chainCount} chains for ${shard.count} shards)`) +
        ` in ${seconds.toFixed(1)} s${notConverged > 0 ? `, ${notConverged} NOT CONVERGED` : ''}\n  partial result in ${folder.finalPath}\n  merge when every shard is done: tiercake merge ${collect} --out <folder>\n`,
    );
    return notConverged > 0 ? ExitCode.notConverged : ExitCode.done;
  }

  const outcome: ScanOutcome = { ...id, rows, provenance: { kind: 'single run', threads, seconds, resumedPoints: work.resumedPoints } };
  const createdIso = new Date().toISOString();
  const { commit } = await writeOutputFolder(target, { command: 'scan', scenarioHash: setup.scenarioHash }, (folder) => {
    pointFolders(folder);
    writeScanFiles(outcome, folder, (images) => renderReportHtml(buildScanReport(outcome, images, createdIso, [`one run, ${seconds.toFixed(1)} s`])));
  });
  work.remove();
  reportCommit(commit);
  process.stdout.write(`${scanDoneLines(outcome, seconds).join('\n')}\n  results in ${collect}\n`);
  return notConverged > 0 ? ExitCode.notConverged : ExitCode.done;
}

export function pointFolderName(point: number): string {
  return `point-${String(point).padStart(6, '0')}`;
}

/** What a finished scan (or merge) says on stdout. */
export function scanDoneLines(o: ScanOutcome, seconds: number | null): string[] {
  const bad = o.rows.filter((r) => !r.converged).length;
  const sweeps = o.rows.reduce((t, r) => t + r.sweeps, 0);
  return [
    `${o.scenario.name}: scan of ${o.plan.axes.map((a) => a.path).join(' x ')}, ${o.rows.length} points${seconds !== null ? ` in ${seconds.toFixed(1)} s` : ''}, ${sweeps} sweeps` +
      (bad > 0 ? `, ${bad} NOT CONVERGED` : ', all converged'),
  ];
}

/** A kept point: its own folder as `tiercake solve` writes it (camera pictures and report included). */
async function writePointFolder(work: ScanWork, r: ScanPointResult): Promise<void> {
  const a = r.artifacts;
  const target = outputTarget(work.pointFolder(r.point), { option: '--keep-points' });
  const pictures = cameraPictureFiles(solvePictures(a));
  await writeOutputFolder(target, { command: 'scan point', scenarioHash: scenarioHash(a.scenario) }, (folder) => {
    const createdIso = new Date().toISOString();
    writeSolveFiles(a, pictures, folder, (images, imaging) => renderReportHtml(buildSolveReport(a, images, createdIso, imaging)));
  });
}

export type { ScanRow };

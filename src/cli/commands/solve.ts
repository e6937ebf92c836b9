// `tiercake solve SCENARIO`: the main job. Options -> prepareScenario -> solveScenario ->
// camera pictures -> files in an output folder that appears complete or not at all ->
// exit code (0 converged, 3 not converged, 130 interrupted with a checkpoint written).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { checkpointPath, readCheckpoint, removeCheckpoint } from '../../output/checkpoint.js';
import { writeSolveCheckpoint } from '../../output/solveCheckpoint.js';
import { writeSolveFolder } from '../../output/solveFolder.js';
import { solveSummaryLines } from '../../report/solveSummaryLines.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { warningLine } from '../../pipeline/runWarnings.js';
import { solveScenario } from '../../pipeline/solveScenario.js';
import { landscapeFileHashes } from '../../scenario/scenarioHash.js';
import { commandPrefix } from '../invocation.js';
import { ExitCode } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { readOptions, type RawOptions } from '../options.js';
import { registerScenarioCommand } from '../scenarioCommand.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { progressFor, solveObserver } from '../progress.js';
import { whileInterruptible } from '../signals.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['out', 'force', 'set', 'threads', 'quiet', 'jsonProgress', 'resume'] as const;

export function registerSolve(program: Command, context: CommandContext): void {
  registerScenarioCommand(program, context, {
    name: 'solve',
    description: 'solve a scenario and write fields, images, profiles, summary.json and report.html',
    scenarioHelp: 'scenario file (JSON); examples in configs/',
    options: OPTIONS,
    overrides: { out: { help: 'output folder (default: out/<scenario name>)' } },
    run: runSolveCommand,
  });
}

export async function runSolveCommand(scenarioPath: string, raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  const threads = o.threads ?? defaultThreads();
  const t0 = performance.now();
  const prepared = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes: memoryLimitBytes() });
  const prepareSeconds = (performance.now() - t0) / 1000;
  for (const note of prepared.overrideNotes) process.stderr.write(`tiercake: note: ${note}\n`);
  const outDir = resolve(o.out ?? `out/${prepared.scenario.name}`);
  const target = outputTarget(o.out ?? outDir, { force: o.force ?? false, inputs: [scenarioPath] });
  const checkpointDir = typeof o.resume === 'string' ? resolve(o.resume) : checkpointPath(outDir);
  const resumeFrom = o.resume ? readCheckpoint(checkpointDir, prepared.scenario, landscapeFileHashes(prepared.resolved)) : null;
  const progress = progressFor(o);

  const artifacts = await whileInterruptible((interrupted) =>
    solveScenario(prepared, {
      threads,
      prepareSeconds,
      clock: () => performance.now(),
      observer: solveObserver(progress, prepared.scenario.solver.tolerance, interrupted),
      ...(resumeFrom ? { resume: { phi: resumeFrom.phi, mu: resumeFrom.mu, nmax: resumeFrom.nmax } } : {}),
    }),
  );
  const outcome = artifacts.outcome;
  if (outcome.stopped) {
    // Interrupted: keep the work, write nothing else.
    await writeSolveCheckpoint(checkpointDir, artifacts, resumeFrom?.sweepsDone ?? 0, [scenarioPath]);
    progress.done();
    const again = `${commandPrefix()} solve ${scenarioPath} --resume${typeof o.resume === 'string' ? ` ${checkpointDir}` : ''}${o.out ? ` --out ${o.out}` : ''}`;
    process.stderr.write(`tiercake: interrupted after ${outcome.totalSweeps} sweeps; checkpoint written to ${checkpointDir}\n  continue with: ${again}\n`);
    return ExitCode.interrupted;
  }
  const { commit, warnings } = await writeSolveFolder(target, artifacts);
  if (resumeFrom) removeCheckpoint(checkpointDir);
  progress.done();
  reportCommit(commit);
  for (const w of warnings) process.stderr.write(`${warningLine(w)}\n`);
  process.stdout.write(`${solveSummaryLines(artifacts, outDir).join('\n')}\n`);
  return outcome.converged ? ExitCode.done : ExitCode.notConverged;
}

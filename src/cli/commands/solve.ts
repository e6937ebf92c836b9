// `tiercake solve SCENARIO`: the main job. Options -> prepareScenario -> solveScenario ->
// camera pictures -> files in an output folder that appears complete or not at all ->
// exit code (0 converged, 3 not converged, 130 interrupted with a checkpoint written).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { checkpointHash, checkpointPath, readCheckpoint, removeCheckpoint, writeCheckpoint } from '../../output/checkpoint.js';
import { writeSolveFiles } from '../../output/solveOutputs.js';
import { clusterThreadsNote } from '../../output/solveSummary.js';
import { cameraPictureFiles } from '../../output/cameraOutputs.js';
import { renderReportHtml } from '../../report/renderReport.js';
import { buildSolveReport } from '../../report/solveReport.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { solvePictures } from '../../pipeline/solvePictures.js';
import { solveWarnings, warningLine } from '../../pipeline/runWarnings.js';
import { PARALLEL_MIN_SITES, solveScenario } from '../../pipeline/solveScenario.js';
import { fractionOfAtoms } from '../../observables/readingWarnings.js';
import { landscapeFileHashes } from '../../scenario/scenarioHash.js';
import { commandPrefix } from '../invocation.js';
import { scenarioHash } from '../../scenario/scenarioHash.js';
import { ExitCode } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { progressFor, solveObserver } from '../progress.js';
import { whileInterruptible } from '../signals.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['out', 'force', 'set', 'threads', 'quiet', 'jsonProgress', 'resume'] as const;

export function registerSolve(program: Command, context: CommandContext): void {
  const command = program
    .command('solve')
    .description('solve a scenario and write fields, images, profiles, summary.json and report.html')
    .argument('<scenario>', 'scenario file (JSON); examples in configs/');
  declare(command, OPTIONS, { out: { help: 'output folder (default: out/<scenario name>)' } }).action(async (scenarioPath: string, options: RawOptions) => {
    context.exitCode = await runSolveCommand(scenarioPath, options);
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
    await writeCheckpoint(
      checkpointDir,
      {
        scenarioHash: checkpointHash(artifacts.scenario, landscapeFileHashes(artifacts.resolved)),
        mu: outcome.solve.mu,
        temperature: outcome.temperature,
        nmax: outcome.model.nmax,
        sweepsDone: outcome.totalSweeps + (resumeFrom?.sweepsDone ?? 0),
        phi: Float64Array.from(outcome.state.fields.phi),
        shape: [...artifacts.resolved.geometry.shape],
      },
      [scenarioPath],
    );
    progress.done();
    const again = `${commandPrefix()} solve ${scenarioPath} --resume${typeof o.resume === 'string' ? ` ${checkpointDir}` : ''}${o.out ? ` --out ${o.out}` : ''}`;
    process.stderr.write(`tiercake: interrupted after ${outcome.totalSweeps} sweeps; checkpoint written to ${checkpointDir}\n  continue with: ${again}\n`);
    return ExitCode.interrupted;
  }
  const pictureSet = solvePictures(artifacts);
  const pictures = cameraPictureFiles(pictureSet);
  const warnings = solveWarnings(artifacts, pictureSet.notices);
  const { commit } = await writeOutputFolder(target, { command: 'solve', scenarioHash: scenarioHash(artifacts.scenario, 'whole', landscapeFileHashes(artifacts.resolved)) }, (folder) => {
    const createdIso = new Date().toISOString();
    writeSolveFiles(artifacts, pictures, folder, (images, imaging) => renderReportHtml(buildSolveReport(artifacts, images, createdIso, imaging, warnings)), warnings);
  });
  if (resumeFrom) removeCheckpoint(checkpointDir);
  progress.done();
  reportCommit(commit);
  for (const w of warnings) process.stderr.write(`${warningLine(w)}\n`);
  const t = outcome.solve.totals;
  const fraction = fractionOfAtoms(t.condensedAtoms, t.atoms);
  const threadText =
    artifacts.threadsUsed < artifacts.threadsRequested && artifacts.cluster !== null
      ? clusterThreadsNote(artifacts.threadsUsed, artifacts.threadsRequested)
      : artifacts.threadsUsed < artifacts.threadsRequested
      ? `1 thread: ${artifacts.resolved.geometry.siteCount} sites are below the parallel threshold of ${PARALLEL_MIN_SITES} sites`
      : `${artifacts.threadsUsed} thread${artifacts.threadsUsed > 1 ? 's' : ''}`;
  const lines = [
    `${artifacts.scenario.name}: ${outcome.converged ? 'converged' : 'NOT CONVERGED'} after ${outcome.totalSweeps} sweeps (${artifacts.timings.solveSeconds.toFixed(2)} s, ${threadText})`,
    `  atoms ${t.atoms.toPrecision(8)}, condensate fraction ${fraction === null ? 'undefined (no atoms)' : fraction.toFixed(4)}, mu = ${(outcome.solve.mu / artifacts.resolved.units.interaction).toPrecision(6)} U`,
    `  shells: ${artifacts.shells.shells.map((s) => `n=${s.filling} (${s.sites} sites)`).join(', ') || 'none'}`,
    ...(artifacts.stiffness !== null
      ? [
          `  superfluid fraction (twist): ${artifacts.stiffness.axes
            .map((x) => `${'xyz'[x.axis]} ${x.value === null ? 'none (open axis)' : `${x.value.toFixed(4)} ± ${(x.error ?? NaN).toExponential(1)}${x.converged ? '' : ' NOT CONVERGED'}`}`)
            .join(', ')}`,
        ]
      : []),
    `  results in ${outDir}`,
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
  return outcome.converged ? ExitCode.done : ExitCode.notConverged;
}

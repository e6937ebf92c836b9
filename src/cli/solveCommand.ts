// `tiercake solve SCENARIO`: the main job. Thin layer: options -> solveScenario ->
// files in an output folder that appears complete or not at all -> exit code.

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { OutputFolder } from '../output/outputFolder.js';
import { renderReportHtml } from '../report/renderReport.js';
import { ExitCode } from '../scenario/inputError.js';
import type { CommandContext } from './main.js';
import { createProgressReporter } from './progressReporter.js';
import { parseThreads, prepareScenario, solveScenario } from '../pipeline/solveScenario.js';
import { checkpointPath, readCheckpoint, removeCheckpoint, scenarioFingerprint, writeCheckpoint } from '../output/checkpoint.js';
import { writeSolveFiles } from '../output/solveOutputs.js';
import { buildSolveReport } from '../report/solveReport.js';

export interface SolveCommandOptions {
  out?: string;
  set: string[];
  threads?: string;
  quiet?: boolean;
  jsonProgress?: boolean;
  resume?: string | boolean;
}

export const collectRepeated = (value: string, previous: string[]): string[] => [...previous, value];

export function registerSolve(program: Command, context: CommandContext): void {
  program
    .command('solve')
    .description('solve a scenario and write fields, images, profiles, summary.json and report.html')
    .argument('<scenario>', 'scenario file (JSON); examples in configs/')
    .option('-o, --out <dir>', 'output folder (default: out/<scenario name>)')
    .option('-s, --set <path=value>', 'override a scenario field by its dotted path, e.g. particles.atoms=5000 (repeatable)', collectRepeated, [])
    .option('-t, --threads <n>', 'compute threads, the main thread included (default: all cores)')
    .option('-q, --quiet', 'no progress output')
    .option('--json-progress', 'progress as one JSON object per line on stderr')
    .option('--resume [checkpoint]', 'continue an interrupted run from its checkpoint (default: <out>.checkpoint)')
    .action(async (scenarioPath: string, options: SolveCommandOptions) => {
      context.exitCode = await runSolveCommand(scenarioPath, options);
    });
}

export async function runSolveCommand(scenarioPath: string, options: SolveCommandOptions): Promise<number> {
  const threads = parseThreads(options.threads);
  const prepared = prepareScenario(scenarioPath, options.set);
  const outDir = resolve(options.out ?? `out/${prepared.scenario.name}`);
  const checkpointDir = typeof options.resume === 'string' ? resolve(options.resume) : checkpointPath(outDir);
  const resumeFrom = options.resume ? readCheckpoint(checkpointDir, prepared.scenario) : null;
  const progress = createProgressReporter(options.quiet ? 'quiet' : options.jsonProgress ? 'json' : 'auto');
  // Validity warnings of the laboratory model (shallow lattice, pseudo-potential, ...).
  for (const w of prepared.resolved.laboratory?.warnings ?? []) process.stderr.write(`tiercake: warning: ${w}\n`);
  let interrupted = false;
  let lastTick = Date.now();
  let lastSweeps = 0;
  const onSignal = (): void => {
    interrupted = true;
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  let artifacts;
  try {
    artifacts = await solveScenario({
      scenarioPath,
      overrides: options.set,
      threads,
      prepared,
      ...(resumeFrom ? { resume: { phi: resumeFrom.phi, mu: resumeFrom.mu, nmax: resumeFrom.nmax } } : {}),
      observer: (p) => {
        // Remaining time of this relaxation from the contraction rate: the error shrinks by r
        // per sweep, so about ln(tol/err)/ln(r) sweeps remain.
        const now = Date.now();
        const sweepSeconds = (now - lastTick) / 1000 / Math.max(1, p.totalSweeps - lastSweeps);
        lastTick = now;
        lastSweeps = p.totalSweeps;
        const tol = prepared.scenario.solver.tolerance;
        let eta = '';
        if (p.rate > 0 && p.rate < 1 && p.errorEstimate > tol && Number.isFinite(p.errorEstimate)) {
          const remaining = Math.log(tol / p.errorEstimate) / Math.log(p.rate);
          eta = `, ~${Math.ceil(remaining * sweepSeconds)} s to converge at this mu`;
        }
        progress.update({
          stage: p.stage === 'solve' ? 'solving' : p.stage === 'temperature' ? 'finding T' : 'dn/dmu',
          sweep: p.totalSweeps,
          residual: p.change,
          errorEstimate: p.errorEstimate,
          atoms: p.atoms,
          mu: p.mu,
          detail: `nmax ${p.nmax}${eta}`,
        });
        return interrupted ? 'stop' : undefined;
      },
    });
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
  }
  const o = artifacts.outcome;
  if (o.stopped) {
    // Interrupted: keep the work, write nothing else.
    writeCheckpoint(checkpointDir, {
      scenarioFingerprint: scenarioFingerprint(artifacts.scenario),
      mu: o.solve.mu,
      temperature: o.temperature,
      nmax: o.model.nmax,
      sweepsDone: o.totalSweeps + (resumeFrom?.sweepsDone ?? 0),
      phi: Float64Array.from(o.state.fields.phi),
      shape: [...artifacts.resolved.geometry.shape],
    });
    progress.done();
    process.stderr.write(`tiercake: interrupted after ${o.totalSweeps} sweeps; checkpoint written to ${checkpointDir}\n  continue with: tiercake solve ${scenarioPath} --resume${typeof options.resume === 'string' ? ` ${checkpointDir}` : ''}${options.out ? ` --out ${options.out}` : ''}\n`);
    return ExitCode.interrupted;
  }
  const folder = new OutputFolder(outDir);
  try {
    const createdIso = new Date().toISOString();
    writeSolveFiles(artifacts, folder, (images, imaging) => renderReportHtml(buildSolveReport(artifacts, images, createdIso, imaging)));
    folder.commit();
  } catch (err) {
    folder.discard();
    throw err;
  }
  if (resumeFrom) removeCheckpoint(checkpointDir);
  progress.done();
  const t = o.solve.totals;
  const lines = [
    `${artifacts.scenario.name}: ${o.converged ? 'converged' : 'NOT CONVERGED'} after ${o.totalSweeps} sweeps (${artifacts.timings.solveSeconds.toFixed(2)} s, ${artifacts.threadsUsed} thread${artifacts.threadsUsed > 1 ? 's' : ''})`,
    `  atoms ${t.atoms.toPrecision(8)}, condensate fraction ${(t.condensedAtoms / Math.max(t.atoms, 1e-300)).toFixed(4)}, mu = ${(o.solve.mu / artifacts.resolved.units.interaction).toPrecision(6)} U`,
    `  shells: ${artifacts.shells.shells.map((s) => `n=${s.filling} (${s.sites} sites)`).join(', ') || 'none'}`,
    `  results in ${outDir}`,
  ];
  process.stdout.write(`${lines.join('\n')}\n`);
  return o.converged ? ExitCode.done : ExitCode.notConverged;
}

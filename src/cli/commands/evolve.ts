// `tiercake evolve SCENARIO`: time evolution of the scenario's ground state under the ramps,
// modulation and spectrum of its `evolution` section. Options -> prepareScenario ->
// evolveScenario (src/pipeline) -> files in an output folder that appears complete or not at
// all -> exit code (0 done, 3 the integrator failed or the start did not converge: results
// written and flagged, 130 interrupted: nothing written).

import type { Command } from 'commander';
import { dirname, resolve } from 'node:path';
import { writeEvolveFolder } from '../../output/evolveFolder.js';
import { defaultOutputFolder } from '../../output/defaultOutputFolders.js';
import { evolveSummaryLines } from '../../report/evolveSummaryLines.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { evolveScenario, requireEvolutionSection, type EvolveProgress } from '../../pipeline/evolveScenario.js';
import { modulationFrequencyGrid } from '../../pipeline/evolutionPlan.js';
import { EvolutionInterrupted } from '../../pipeline/interruptibleRunner.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { readOptions, type RawOptions } from '../options.js';
import { registerScenarioCommand } from '../scenarioCommand.js';
import { parseInteger, parseReal } from '../numberText.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { progressFor, type ProgressReporter } from '../progress.js';
import { whileInterruptible } from '../signals.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['out', 'force', 'set', 'threads', 'quiet', 'jsonProgress', 'modulationFrequencies'] as const;

export function registerEvolve(program: Command, context: CommandContext): void {
  registerScenarioCommand(program, context, {
    name: 'evolve',
    description: 'evolve the ground state under the ramps and modulation of the scenario\'s "evolution" section; write evolution.csv, snapshots, a verdict and report.html',
    scenarioHelp: 'scenario file (JSON) with an "evolution" section',
    options: OPTIONS,
    overrides: { out: { help: 'output folder (default: out/<scenario name>-evolve)' } },
    run: runEvolveCommand,
  });
}

const frequencyRange = { min: 0, minOpen: true, what: 'a modulation frequency h f in the energy unit' } as const;

/** '--modulation-frequencies 0.5:1.5:21' or a single value. */
export function parseModulationFrequencies(text: string): number[] {
  const parts = text.split(':');
  if (parts.length === 1) return [parseReal(parts[0], '--modulation-frequencies', frequencyRange)];
  if (parts.length !== 3) throw new InputError(`--modulation-frequencies: expected from:to:count or one frequency, got ${JSON.stringify(text)}`);
  const from = parseReal(parts[0], '--modulation-frequencies (from)', frequencyRange);
  const to = parseReal(parts[1], '--modulation-frequencies (to)', frequencyRange);
  return modulationFrequencyGrid(from, to, parseInteger(parts[2], '--modulation-frequencies (count)', { min: 1, max: 2000 }));
}

function evolveObserver(progress: ProgressReporter): (p: EvolveProgress) => void {
  let last = 0;
  return (p) => {
    // the evolution reports often (between output times too): at most five lines a second
    const now = Date.now();
    if (p.stage === 'evolve' && now - last < 200) return;
    if (p.stage === 'evolve') last = now;
    if (p.solver) {
      progress.update({ stage: p.stage === 'start' ? 'start state' : 'reference state', sweep: p.solver.totalSweeps, residual: p.solver.change, atoms: p.solver.atoms, mu: p.solver.mu });
    } else if (p.stage === 'evolve') {
      progress.update({ stage: 'evolving', sweep: 0, residual: NaN, fraction: p.total > 0 ? p.done / p.total : 1, detail: `t = ${p.done.toPrecision(4)} of ${p.total.toPrecision(4)}, ${p.detail ?? ''}` });
    } else {
      progress.update({ stage: 'spectrum', sweep: 0, residual: NaN, fraction: p.done / p.total, detail: `${p.done} of ${p.total} frequencies` });
    }
  };
}

export async function runEvolveCommand(scenarioPath: string, raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  const threads = o.threads ?? defaultThreads();
  const modulationFrequencies = o.modulationFrequencies !== undefined ? parseModulationFrequencies(o.modulationFrequencies) : undefined;
  const prepared = prepareScenario(scenarioPath, o.set ?? [], { memoryLimitBytes: memoryLimitBytes() });
  requireEvolutionSection(prepared, scenarioPath);
  const outDir = resolve(o.out ?? defaultOutputFolder('evolve', prepared.scenario.name));
  const target = outputTarget(o.out ?? outDir, { force: o.force ?? false, inputs: [scenarioPath] });
  const progress = progressFor(o);
  for (const w of prepared.resolved.laboratory?.warnings ?? []) process.stderr.write(`tiercake: warning: ${w}\n`);
  let artifacts;
  try {
    artifacts = await whileInterruptible((interrupted) =>
      evolveScenario(prepared, {
        threads,
        ...(modulationFrequencies ? { modulationFrequencies } : {}),
        observer: evolveObserver(progress),
        shouldStop: interrupted,
        pause: () => new Promise<void>((done) => setImmediate(done)),
        clock: () => performance.now(),
        memoryLimitBytes: memoryLimitBytes(),
        scenarioDirectory: dirname(scenarioPath),
      }),
    );
  } catch (err) {
    if (err instanceof EvolutionInterrupted) {
      progress.done();
      process.stderr.write('tiercake: interrupted; nothing was written (an evolution is not checkpointed: run it again)\n');
      return ExitCode.interrupted;
    }
    throw err;
  }
  for (const w of artifacts.warnings) process.stderr.write(`tiercake: warning: [${w.code}] ${w.message}\n`);
  const { commit } = await writeEvolveFolder(target, artifacts);
  progress.done();
  reportCommit(commit);
  process.stdout.write(`${evolveSummaryLines(artifacts, outDir).join('\n')}\n`);
  return artifacts.trustworthy ? ExitCode.done : ExitCode.notConverged;
}

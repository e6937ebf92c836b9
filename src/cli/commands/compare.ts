// `tiercake compare SCENARIO --image FILE --out DIR`: lay a measured camera image beside
// the prediction and fit the atom number (and temperature) to it (DESIGN.md section 4).
// Options -> measured image (measuredImageFile.ts) -> prepareScenario -> runCompareFit
// (src/pipeline/compareFit.ts, in memory) -> files (src/output/compareOutputs.ts) and the
// report (src/report/compareReport.ts). Exit codes: 0 done; 2 bad input; 3 the solve at the
// best values did not converge.

import { fitAtBoundWarnings } from '../../pipeline/fitAtBound.js';
import { warningLine } from '../../pipeline/runWarnings.js';
import type { Command } from 'commander';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { writeCompareFiles, type CompareProvenance } from '../../output/compareOutputs.js';
import { toolVersion } from '../../output/toolVersion.js';
import { renderReportHtml } from '../../report/renderReport.js';
import { buildCompareReport } from '../../report/compareReport.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { runCompareFit, type FitParameterName } from '../../pipeline/compareFit.js';
import { scenarioHash } from '../../scenario/scenarioHash.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { readMeasuredImage } from '../measuredImageFile.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['image', 'out', 'force', 'countsPerAtom', 'pixelUm', 'rotate', 'flipX', 'fit', 'maxIterations', 'binUm', 'set', 'threads', 'quiet'] as const;

export function registerCompare(program: Command, context: CommandContext): void {
  const command = program
    .command('compare')
    .description('compare a measured camera image with the scenario: centre, radial profiles, residual map, fit of N (and T)')
    .argument('<scenario>', 'scenario file (JSON)');
  declare(command, OPTIONS, { image: { required: true }, out: { required: true }, fit: { default: 'atoms' } }).action(
    async (scenarioPath: string, options: RawOptions) => {
      context.exitCode = await runCompareCommand(scenarioPath, options);
    },
  );
}

/** --fit: a comma-separated list of atoms and temperature. */
export function parseFitList(text: string): FitParameterName[] {
  const fit: FitParameterName[] = [];
  for (const name of text.split(',').map((s) => s.trim()).filter((s) => s.length > 0)) {
    if (name !== 'atoms' && name !== 'temperature') throw new InputError(`--fit: "${name}" cannot be fitted; use atoms or atoms,temperature`);
    if (!fit.includes(name)) fit.push(name);
  }
  if (fit.length === 0) throw new InputError('--fit: name at least one parameter: atoms or atoms,temperature');
  return fit;
}

export async function runCompareCommand(scenarioPath: string, raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  if (o.image === undefined) throw new InputError('--image: give the measured image (.npy, or greyscale PNG with --counts-per-atom)');
  if (o.out === undefined) throw new InputError('--out: give the folder for the comparison results');
  const rotateDeg = o.rotate ?? 0;
  if (rotateDeg % 90 !== 0) throw new InputError(`--rotate: expected 0, 90, 180 or 270 (degrees counter-clockwise), got "${rotateDeg}"`);
  const fit = parseFitList(o.fit ?? 'atoms');
  const target = outputTarget(o.out, { force: o.force ?? false, inputs: [scenarioPath, o.image] });
  const { image, sidecar } = readMeasuredImage({
    path: o.image,
    rotateDeg,
    flipX: o.flipX ?? false,
    ...(o.countsPerAtom !== undefined ? { countsPerAtom: o.countsPerAtom } : {}),
    ...(o.pixelUm !== undefined ? { pixelUm: o.pixelUm } : {}),
  });
  const overrides = o.set ?? [];
  const prepared = prepareScenario(scenarioPath, overrides, { memoryLimitBytes: memoryLimitBytes() });
  const quiet = o.quiet ?? false;
  const result = await runCompareFit({
    prepared,
    measured: image,
    fit,
    maxIterations: o.maxIterations ?? 30,
    threads: o.threads ?? defaultThreads(),
    ...(o.binUm !== undefined ? { binUm: o.binUm } : {}),
    onSolve: ({ evaluation, atoms, kT, converged }) => {
      if (quiet) return;
      const shown = [`atoms = ${atoms.toPrecision(6)}`, ...(kT !== null ? [`kT = ${kT.toPrecision(6)}`] : [])].join(', ');
      process.stderr.write(`compare: solve ${evaluation}: ${shown}${converged ? '' : ' (not converged)'}\n`);
    },
  });
  for (const w of fitAtBoundWarnings(result.parameters)) process.stderr.write(`${warningLine(w)}\n`);
  const provenance: CompareProvenance = {
    scenarioPath,
    overrides,
    imagePath: o.image,
    scaleFrom: sidecar !== null ? `missing options taken from ${sidecar.file}` : 'command-line options',
  };
  const createdIso = new Date().toISOString();
  const { commit } = await writeOutputFolder(target, { command: 'compare', scenarioHash: scenarioHash(prepared.scenario) }, (folder) =>
    writeCompareFiles(result, provenance, folder, (images) => renderReportHtml(buildCompareReport(result, { imagePath: o.image as string, images, createdIso, toolVersion: toolVersion() }))),
  );
  reportCommit(commit);
  if (!quiet) {
    const lines = [
      `${prepared.scenario.name}: compared with ${o.image.split('/').pop()} (${result.fit.converged ? 'fit converged' : 'fit NOT converged'}, ${result.fit.solves} solves)`,
      ...result.parameters.map((r) => `  ${r.name} = ${r.best.toPrecision(6)} ± ${r.uncertainty.toPrecision(2)}${r.name === 'atoms' ? '' : ` ${r.unit}`}`),
      `  reduced chi-square ${result.fit.reducedChiSquare.toPrecision(4)} (${result.fit.degreesOfFreedom} degrees of freedom)`,
      `  results in ${target.path}`,
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
  }
  return result.best.converged ? ExitCode.done : ExitCode.notConverged;
}

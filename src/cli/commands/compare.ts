// `tiercake compare SCENARIO (--image SOURCE | --absorption-frames A,P[,D]) --out DIR`: lay
// measured camera data beside the prediction, fit the scenario to it and read the physics
// off the pictures (DESIGN.md section 4; issue 15).
// Options -> prepareScenario -> the unit and pixel size (src/pipeline/compareMeasurement.ts) ->
// frames and shots in atoms per pixel (compareShotFiles.ts, measuredShots.ts) -> runCompareFit
// (compareFit.ts) -> equation of state and fluctuation thermometry (compareEquationOfState.ts,
// compareThermometry.ts) -> files (src/output/compareOutputs.ts), the report
// (src/report/compareReport.ts) and the summary lines (src/report/compareSummaryLines.ts).
// A measured picture must come with its unit: counts per atom (option or tiercake's own
// sidecar) or absorption frames with the species' cross-section; otherwise exit 2.
// Exit codes: 0 done; 2 bad input; 3 the solve at the best values did not converge.

import type { Command } from 'commander';
import type { CompareProvenance } from '../../output/compareOutputs.js';
import { writeCompareFolder } from '../../output/compareFolder.js';
import { compareSummaryLines } from '../../report/compareSummaryLines.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { runCompareFit } from '../../pipeline/compareFit.js';
import { FIT_PARAMETER_NAMES, type FitParameterName, type FitParameterRequest } from '../../pipeline/compareFitParameters.js';
import { checkCompareInputs, resolveCompareMeasurement } from '../../pipeline/compareMeasurement.js';
import { compareInputFiles } from '../../pipeline/compareInputFiles.js';
import { readCompareShots } from '../../pipeline/compareShotFiles.js';
import { compareReadings, fixedCentreInGrid, isShotStack } from '../../pipeline/compareReadings.js';
import { readSidecar } from '../../imaging/camera/pictureSidecar.js';
import type { PixelRectangle } from '../../imaging/camera/regionOfInterest.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { readOptions, type RawOptions } from '../options.js';
import { registerScenarioCommand } from '../scenarioCommand.js';
import { parseInteger, parseReal } from '../numberText.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = [
  'image', 'countsPerAtom', 'backgroundFrame', 'absorptionFrames', 'saturationCounts', 'alpha', 'odLimit', 'minProbeCounts', 'crossSection', 'shots', 'pixelUm',
  'pixelSites', 'region', 'regionMask', 'hotPixels', 'backgroundBorder', 'transpose', 'flipX', 'flipY', 'rotate', 'fit', 'centrePixels', 'maxIterations', 'binUm',
  'binSites', 'chiSquarePixels', 'bootstrap', 'eosBinSites', 'thermometryBinSites', 'out', 'force', 'set', 'threads', 'quiet',
] as const;

export function registerCompare(program: Command, context: CommandContext): void {
  registerScenarioCommand(program, context, {
    name: 'compare',
    description:
      'compare measured camera data (a picture with its counts per atom, or raw absorption frames) with the scenario: fit N, T, centre and more, ' +
      'residuals, profiles, equation of state, fluctuation thermometry of a stack',
    scenarioHelp: 'scenario file (JSON)',
    options: OPTIONS,
    overrides: { out: { required: true }, fit: { default: 'atoms' } },
    run: runCompareCommand,
  });
}

/** --fit: names (FIT_PARAMETER_NAMES), each optionally name=lower:upper (either bound may be left out). */
export function parseFitList(text: string): FitParameterRequest[] {
  const list: FitParameterRequest[] = [];
  for (const item of text.split(',').map((s) => s.trim()).filter((s) => s.length > 0)) {
    const [name, range] = item.split('=', 2) as [string, string | undefined];
    if (!(FIT_PARAMETER_NAMES as readonly string[]).includes(name)) throw new InputError(`--fit: "${name}" cannot be fitted; use ${FIT_PARAMETER_NAMES.join(', ')}`);
    const request: FitParameterRequest = { name: name as FitParameterName };
    if (range !== undefined) {
      const parts = range.split(':');
      if (parts.length !== 2) throw new InputError(`--fit: bounds are written ${name}=lower:upper (either may be left out), got "${item}"`);
      if (parts[0] !== '') request.lower = parseReal(parts[0], `--fit ${name} (lower bound)`);
      if (parts[1] !== '') request.upper = parseReal(parts[1], `--fit ${name} (upper bound)`);
    }
    list.push(request);
  }
  if (list.length === 0) throw new InputError('--fit: name at least one parameter, e.g. atoms or atoms,temperature');
  return list;
}

/** --region x0,y0,width,height in whole pixels. */
export function parseRegion(text: string): PixelRectangle {
  const parts = text.split(',');
  if (parts.length !== 4) throw new InputError(`--region: expected x0,y0,width,height in whole pixels (first column, first row from the top, width, height), got "${text}"`);
  const [x0, y0] = parts.slice(0, 2).map((t) => parseInteger(t, '--region', { min: 0, max: 1_000_000 }));
  const [width, height] = parts.slice(2).map((t) => parseInteger(t, '--region', { min: 1, max: 1_000_000 }));
  return { x0, y0, width, height };
}

/** --centre-pixels x,y (pixels of the given frame). */
function parseCentre(text: string): { x: number; y: number } {
  const parts = text.split(',');
  if (parts.length !== 2) throw new InputError(`--centre-pixels: expected x,y in pixels of the given frame (column, row from the top), got "${text}"`);
  const [x, y] = parts.map((t) => parseReal(t, '--centre-pixels'));
  return { x, y };
}

export async function runCompareCommand(scenarioPath: string, raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  checkCompareInputs(o);
  const fit = parseFitList(o.fit ?? 'atoms');
  const region = o.region !== undefined ? parseRegion(o.region) : undefined;
  const centreGiven = o.centrePixels !== undefined ? parseCentre(o.centrePixels) : undefined;
  const target = outputTarget(o.out as string, { force: o.force ?? false, inputs: compareInputFiles(scenarioPath, o) });
  const overrides = o.set ?? [];
  const prepared = prepareScenario(scenarioPath, overrides, { memoryLimitBytes: memoryLimitBytes() });
  const quiet = o.quiet ?? false;
  const say = (text: string) => {
    if (!quiet) process.stderr.write(`compare: ${text}\n`);
  };
  // The unit of the measurement and the pixel size, before any frame is read.
  const scenario = { dimensionless: prepared.resolved.mode === 'hubbard', species: prepared.scenario.laboratory?.species };
  const { measurement, pixelSize, binWidth, scaleFrom } = resolveCompareMeasurement(o, scenario, readSidecar);
  say('reading the frames');
  const orientation = { transpose: o.transpose ?? false, flipColumns: o.flipX ?? false, flipRows: o.flipY ?? false, rotateDeg: o.rotate ?? 0 };
  const { prepared: shots, preparation, format, inputs: frameInputs } = await readCompareShots(o, measurement, {
    pixelUm: pixelSize,
    hotPixels: o.hotPixels ?? false,
    ...(region !== undefined ? { region } : {}),
    ...(o.backgroundBorder !== undefined ? { backgroundBorderPixels: o.backgroundBorder } : {}),
    orientation,
  });
  say(`${shots.perShot.length} shot(s), ${shots.measured.nx} x ${shots.measured.ny} pixels after orientation, ${shots.measured.usedPixels} used; ${shots.method}`);
  const fixedCentre = centreGiven !== undefined ? fixedCentreInGrid(shots, centreGiven) : undefined;
  const stack = isShotStack(shots);
  const result = await runCompareFit({
    prepared,
    measured: shots.measured,
    fit,
    maxIterations: o.maxIterations ?? 30,
    threads: o.threads ?? defaultThreads(),
    frameMap: shots.map,
    chiSquarePixels: (o.chiSquarePixels as 'signal' | 'all' | undefined) ?? 'signal',
    ...(fixedCentre !== undefined ? { fixedCentre } : {}),
    ...(binWidth !== undefined ? { binUm: binWidth } : {}),
    ...(stack ? { shots: shots.shots, bootstrapReplicates: o.bootstrap ?? 200 } : {}),
    onStage: say,
    onSolve: ({ evaluation, atoms, kT, converged }) => {
      const shown = [`atoms = ${atoms.toPrecision(6)}`, ...(kT !== null ? [`kT = ${kT.toPrecision(6)}`] : [])].join(', ');
      say(`solve ${evaluation}: ${shown}${converged ? '' : ' (not converged)'}`);
    },
  });
  say('equation of state and thermometry');
  const { eos, thermometry, warnings } = compareReadings(result, shots, o);
  const imagePath = o.shots ?? o.image ?? (o.absorptionFrames as string);
  const provenance: CompareProvenance = { scenarioPath, overrides, imagePath, inputs: frameInputs, format, scaleFrom, measurement, preparation, shots, warnings };
  const commit = await writeCompareFolder(target, result, provenance, { eos, thermometry });
  reportCommit(commit);
  for (const w of warnings) process.stderr.write(`tiercake: warning: ${w.code}: ${w.message}\n`);
  if (!quiet) {
    const lines = compareSummaryLines({ scenarioName: prepared.scenario.name, imagePath, result, measurement, thermometry, outPath: target.path });
    process.stdout.write(`${lines.join('\n')}\n`);
  }
  return result.best.converged ? ExitCode.done : ExitCode.notConverged;
}

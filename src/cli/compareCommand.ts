// `tiercake compare SCENARIO --image FILE --out DIR`: lay a measured camera image beside
// the prediction and fit the atom number (and temperature) to it (DESIGN.md section 4).
//
// 1. The measured image is read in atoms per pixel (measuredImage.ts), turned upright
//    (--rotate, --flip-x) and its background (median of the border pixels) subtracted.
// 2. Its cloud centre is found by the iterated windowed centroid (cloudCentre.ts); the
//    model picture is rendered on exactly the measured pixel grid with the trap centre on
//    that point, through the camera model (column, area-weighted resampling, PSF) with
//    the scenario's camera section (defaults: cameraOutputs.ts) and the measured pixel size.
// 3. Weighted least squares (Levenberg-Marquardt, leastSquaresFit.ts) over all pixels:
//    every model evaluation is a full solve of the scenario with particles.atoms = N (and
//    temperature.kT = kT) overridden. Weights: pixelNoiseModel in compareFit.ts.
// 4. Written together or not at all (OutputFolder): comparison.json (best values,
//    uncertainties, reduced chi-square), profiles.csv, images (measured, model, residual,
//    side by side, overlaid radial profiles) and report.html.
// Exit codes: 0 done; 2 bad input; 3 the solve at the best values did not converge.

import type { Command } from 'commander';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join, resolve } from 'node:path';
import * as z from 'zod';
import { OutputFolder } from '../output/outputFolder.js';
import { encodeNpy } from '../formats/npy.js';
import { toCsv } from '../formats/csv.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { sideBySideSvg } from '../figures/composeSvg.js';
import { figureImage } from '../output/solveOutputs.js';
import { decodeMeasuredImage, MeasuredImageError, type MeasuredImage } from '../imaging/measuredImage.js';
import { findCloudCentre } from '../observables/cloudCentre.js';
import { radialProfile } from '../observables/radialProfile.js';
import { renderReportHtml } from '../report/renderReport.js';
import type { KeyValueRow, ReportDocument, StatusLine } from '../report/reportModel.js';
import { CameraSchema, type CameraSettings } from '../scenario/imagingSchema.js';
import { energyParser, inAllUnits } from '../scenario/resolveScenario.js';
import { ExitCode, InputError } from '../scenario/inputError.js';
import type { CommandContext } from './main.js';
import { collectRepeated } from './solveCommand.js';
import { parseThreads, prepareScenario, solveScenario } from '../pipeline/solveScenario.js';
import { jsonReplacer } from '../output/solveOutputs.js';
import { cameraOptics, cameraPicture, cloudForImaging, type CameraOptics } from '../output/cameraOutputs.js';
import { modelNoiseSigma, pixelNoiseModel, replayLeastSquaresFit, type ReplayedFit } from '../pipeline/compareFit.js';
import { colourPictureFigure, pictureFiles, type PixelPicture } from '../output/pictureFiles.js';
import { toolVersion } from '../output/toolVersion.js';

export interface CompareCommandOptions {
  image?: string;
  countsPerAtom?: string;
  pixelUm?: string;
  rotate?: string;
  flipX?: boolean;
  fit?: string;
  set: string[];
  threads?: string;
  out?: string;
  maxIterations?: string;
  binUm?: string;
  quiet?: boolean;
}

export type FitParameterName = 'atoms' | 'temperature';

/** The options checked and converted; every message names the option. */
export interface CompareSettings {
  imagePath: string;
  countsPerAtom: number | undefined;
  pixelUm: number | undefined;
  rotateDeg: number;
  flipX: boolean;
  fit: FitParameterName[];
  overrides: string[];
  threads: number;
  outDir: string;
  maxIterations: number;
  binUm: number | undefined;
  quiet: boolean;
}

function positiveNumber(text: string | undefined, option: string, what: string): number | undefined {
  if (text === undefined) return undefined;
  const x = Number(text);
  if (text.trim() === '' || !(x > 0) || !Number.isFinite(x)) throw new InputError(`${option}: expected ${what} (a positive number), got "${text}"`);
  return x;
}

/** Pure parser of the command-line options of `compare`. */
export function parseCompareOptions(options: CompareCommandOptions): CompareSettings {
  if (options.image === undefined) throw new InputError('--image: give the measured image (.npy, or greyscale PNG with --counts-per-atom)');
  if (options.out === undefined) throw new InputError('--out: give the folder for the comparison results');
  const rotate = options.rotate === undefined ? 0 : Number(options.rotate);
  if (!Number.isInteger(rotate) || rotate % 90 !== 0) {
    throw new InputError(`--rotate: expected 0, 90, 180 or 270 (degrees counter-clockwise), got "${options.rotate}"`);
  }
  const fitText = options.fit ?? 'atoms';
  const names = fitText.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
  const fit: FitParameterName[] = [];
  for (const name of names) {
    if (name !== 'atoms' && name !== 'temperature') {
      throw new InputError(`--fit: "${name}" cannot be fitted; use atoms or atoms,temperature`);
    }
    if (!fit.includes(name)) fit.push(name);
  }
  if (fit.length === 0) throw new InputError('--fit: name at least one parameter: atoms or atoms,temperature');
  let maxIterations = 30;
  if (options.maxIterations !== undefined) {
    maxIterations = Number(options.maxIterations);
    if (!Number.isInteger(maxIterations) || maxIterations < 1 || maxIterations > 1000) {
      throw new InputError(`--max-iterations: expected a whole number from 1 to 1000, got "${options.maxIterations}"`);
    }
  }
  return {
    imagePath: options.image,
    countsPerAtom: positiveNumber(options.countsPerAtom, '--counts-per-atom', 'the detected counts per atom'),
    pixelUm: positiveNumber(options.pixelUm, '--pixel-um', 'the object-plane pixel size in µm'),
    rotateDeg: rotate,
    flipX: options.flipX ?? false,
    fit,
    overrides: options.set ?? [],
    threads: parseThreads(options.threads),
    outDir: resolve(options.out),
    maxIterations,
    binUm: positiveNumber(options.binUm, '--bin-um', 'the radial bin width in µm'),
    quiet: options.quiet ?? false,
  };
}

export function registerCompare(program: Command, context: CommandContext): void {
  program
    .command('compare')
    .description('compare a measured camera image with the scenario: centre, radial profiles, residual map, fit of N (and T)')
    .argument('<scenario>', 'scenario file (JSON)')
    .requiredOption('-i, --image <file>', 'measured image: .npy (atoms per pixel, axis 0 = x) or greyscale PNG (grey levels = counts)')
    .requiredOption('-o, --out <dir>', 'output folder')
    .option('--counts-per-atom <x>', 'detected counts per atom (required for PNG; for .npy: values are counts)')
    .option('--pixel-um <x>', 'pixel size in the object plane, µm (camera pixel / magnification; lattice spacings in dimensionless mode)')
    .option('--rotate <deg>', 'rotate the measured image counter-clockwise by 0, 90, 180 or 270 degrees')
    .option('--flip-x', 'mirror the measured image left-right (before rotating)')
    .option('--fit <list>', 'parameters to fit: atoms or atoms,temperature', 'atoms')
    .option('--max-iterations <n>', 'Levenberg-Marquardt steps at most (default 30)')
    .option('--bin-um <x>', 'radial bin width, µm (default: one pixel)')
    .option('-s, --set <path=value>', 'override a scenario field by its dotted path (repeatable)', collectRepeated, [])
    .option('-t, --threads <n>', 'compute threads, the main thread included (default: all cores)')
    .option('-q, --quiet', 'no progress output')
    .action(async (scenarioPath: string, options: CompareCommandOptions) => {
      context.exitCode = await runCompareCommand(scenarioPath, options);
    });
}

interface SidecarScale {
  countsPerAtom?: number;
  pixelUm?: number;
  file: string;
}

/** tiercake's own pictures carry their scale in a JSON sidecar: use it when options are missing. */
function readSidecar(imagePath: string): SidecarScale | null {
  const candidates = [imagePath.replace(/\.gray16\.png$/i, '.json'), imagePath.replace(/\.(npy|png)$/i, '.json')];
  for (const file of candidates) {
    if (file === imagePath || !existsSync(file)) continue;
    try {
      const data = JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>;
      const perLevel = data.atomsPerGreyLevel;
      const pixel = data.pixelUm;
      return {
        file,
        ...(typeof perLevel === 'number' && perLevel > 0 && /\.png$/i.test(imagePath) ? { countsPerAtom: 1 / perLevel } : {}),
        ...(typeof pixel === 'number' && pixel > 0 ? { pixelUm: pixel } : {}),
      };
    } catch {
      return null;
    }
  }
  return null;
}

function readMeasured(settings: CompareSettings): { image: MeasuredImage; sidecar: SidecarScale | null } {
  const path = settings.imagePath;
  let bytes: Uint8Array;
  try {
    if (!statSync(path).isFile()) throw new Error('not a file');
    bytes = readFileSync(path);
  } catch {
    throw new InputError(`--image: ${path} was not found or is not a file; check the path`);
  }
  const sidecar = settings.countsPerAtom === undefined || settings.pixelUm === undefined ? readSidecar(path) : null;
  const pixelUm = settings.pixelUm ?? sidecar?.pixelUm;
  if (pixelUm === undefined) {
    throw new InputError('--pixel-um: give the pixel size in the object plane (camera pixel / magnification), in µm (lattice spacings in dimensionless mode)');
  }
  const countsPerAtom = settings.countsPerAtom ?? sidecar?.countsPerAtom;
  try {
    const image = decodeMeasuredImage(bytes, basename(path), {
      pixelUm,
      rotateDeg: settings.rotateDeg,
      flipX: settings.flipX,
      ...(countsPerAtom !== undefined ? { countsPerAtom } : {}),
    });
    return { image, sidecar };
  } catch (err) {
    if (err instanceof MeasuredImageError) throw new InputError(err.message);
    throw err;
  }
}

function cameraSettingsOf(raw: Record<string, unknown>): { camera: CameraSettings; given: boolean } {
  if (raw.camera === undefined) return { camera: CameraSchema.parse({}), given: false };
  const parsed = CameraSchema.safeParse(raw.camera);
  if (!parsed.success) throw new InputError(`camera: ${z.prettifyError(parsed.error).replace(/\n/g, '; ')}`);
  return { camera: parsed.data, given: true };
}

/** Weighted fits at most: one with data weights, then reweighting from the model. */
const maxWeightPasses = 4;

interface SolveRun {
  density: Float64Array;
  converged: boolean;
  atoms: number;
  condensedAtoms: number;
  muInternal: number;
  kTInternal: number;
}

export async function runCompareCommand(scenarioPath: string, options: CompareCommandOptions): Promise<number> {
  const settings = parseCompareOptions(options);
  const { image: measured, sidecar } = readMeasured(settings);
  const { scenario, raw, resolved } = prepareScenario(scenarioPath, settings.overrides);
  const { camera, given: cameraGiven } = cameraSettingsOf(raw);
  const fitAtoms = settings.fit.includes('atoms');
  const fitTemperature = settings.fit.includes('temperature');

  // Optics with the measured pixel size; the PSF and the imaging axis from the scenario.
  const probeCloud = {
    name: scenario.name,
    shape: resolved.geometry.shape,
    latticeSpacingUm: resolved.latticeSpacingUm,
    massKg: null,
    density: new Float64Array(0),
    parityOdd: new Float64Array(0),
    orderParameter: new Float64Array(0),
    trapCentre: resolved.trapCentre,
    wannierWidthSites: null,
  };
  const optics: CameraOptics = { ...cameraOptics(probeCloud, camera), pixelUm: measured.pixelUm };
  const unit = optics.lengthUnit;

  // Background, centre and weights of the measured picture.
  const centreFit = findCloudCentre(measured.values, [measured.nx, measured.ny]);
  const background = centreFit.background;
  const data = new Float64Array(measured.values.length);
  for (let i = 0; i < data.length; i++) data[i] = measured.values[i] - background;
  const dataField = { values: data, nx: measured.nx, ny: measured.ny };
  const noise = pixelNoiseModel(dataField, 0, measured.countsPerAtom);
  noise.background = background;
  const p = measured.pixelUm;
  /** Pixel grid of the measured image with the trap centre at pixel-index (x0, y0). */
  const gridAt = (x0: number, y0: number) => ({ nx: measured.nx, ny: measured.ny, firstXUm: -x0 * p, firstYUm: -y0 * p });

  // Energies of kT in the scenario's unit (what --set temperature.kT reads).
  const internalPerScenarioUnit = energyParser(scenario, resolved.units)(1, 'temperature.kT');
  const uInScenarioUnit = resolved.units.interaction / internalPerScenarioUnit;
  const kTStart =
    resolved.thermal.kind === 'temperature' && resolved.thermal.kT > 0 ? resolved.thermal.kT / internalPerScenarioUnit : 0.1 * uInScenarioUnit;
  const capacity = resolved.geometry.siteCount * scenario.truncation.nmax;
  let atomsStart = measured.totalAtoms - background * data.length;
  if (!(atomsStart > 0)) atomsStart = scenario.particles.atoms ?? 1;
  atomsStart = Math.min(atomsStart, 0.99 * capacity);

  // The scenario as every fit evaluation solves it: atom number and temperature set by
  // overrides, no compressibility map (not needed for the picture), a tight atom number
  // so that finite differences in N are not lost in the root finder's tolerance.
  const fitRaw = structuredClone(raw) as Record<string, unknown>;
  const particles = { ...((fitRaw.particles as Record<string, unknown>) ?? {}) };
  if (fitAtoms) {
    delete particles.chemicalPotential;
    particles.atoms = atomsStart;
  }
  fitRaw.particles = particles;
  if (fitTemperature) fitRaw.temperature = { kT: kTStart };
  fitRaw.solver = { ...((fitRaw.solver as Record<string, unknown>) ?? {}), compressibility: false, atomTolerance: 1e-10 };
  const workDir = mkdtempSync(join(tmpdir(), 'tiercake-compare-'));
  const fitScenarioPath = join(workDir, `${scenario.name}.json`);
  writeFileSync(fitScenarioPath, JSON.stringify(fitRaw));

  // Fit parameters: the physics ones (each change is a new solve), then the position of
  // the trap centre on the measured pixel grid (a change only re-renders the picture),
  // started at the measured cloud centre. Fitting the centre lets its uncertainty reach
  // the other parameters through the covariance.
  const names: string[] = [];
  const initial: number[] = [];
  const lower: number[] = [];
  const upper: number[] = [];
  if (fitAtoms) {
    names.push('atoms');
    initial.push(atomsStart);
    lower.push(Math.min(1e-3, atomsStart / 10));
    upper.push(0.995 * capacity);
  }
  if (fitTemperature) {
    names.push('kT');
    initial.push(kTStart);
    lower.push(1e-4 * uInScenarioUnit);
    upper.push(20 * uInScenarioUnit);
  }
  const physicsCount = names.length;
  names.push('centreXPixels', 'centreYPixels');
  initial.push(centreFit.centre[0], centreFit.centre[1]);
  lower.push(0, 0);
  upper.push(measured.nx - 1, measured.ny - 1);

  const solves = new Map<string, SolveRun>();
  const keyOf = (params: ArrayLike<number>) => Array.from(params, (v) => String(v)).join(',');
  let evaluations = 0;
  const solveAt = async (physics: Float64Array): Promise<SolveRun> => {
    const key = keyOf(physics);
    const known = solves.get(key);
    if (known !== undefined) return known;
    const overrides: string[] = [];
    let j = 0;
    if (fitAtoms) overrides.push(`particles.atoms=${String(physics[j++])}`);
    if (fitTemperature) overrides.push(`temperature.kT=${String(physics[j++])}`);
    let artifacts;
    try {
      artifacts = await solveScenario({ scenarioPath: fitScenarioPath, overrides, threads: settings.threads });
    } catch (err) {
      if (err instanceof InputError) throw new InputError(err.message.split(fitScenarioPath).join(scenarioPath));
      throw err;
    }
    const totals = artifacts.outcome.solve.totals;
    const run: SolveRun = {
      density: cloudForImaging(artifacts).density,
      converged: artifacts.outcome.converged,
      atoms: totals.atoms,
      condensedAtoms: totals.condensedAtoms,
      muInternal: artifacts.outcome.solve.mu,
      kTInternal: artifacts.outcome.temperature,
    };
    solves.set(key, run);
    evaluations++;
    if (!settings.quiet) {
      const shown = names.slice(0, physicsCount).map((n, i) => `${n} = ${physics[i].toPrecision(6)}`).join(', ');
      process.stderr.write(`compare: solve ${evaluations}: ${shown}${run.converged ? '' : ' (not converged)'}\n`);
    }
    return run;
  };
  const shape = resolved.geometry.shape;
  const render = (run: SolveRun, x0: number, y0: number): Float64Array => cameraPicture(run.density, shape, optics, gridAt(x0, y0)).values;
  const evaluate = async (params: Float64Array): Promise<Float64Array> => {
    const run = await solveAt(params.subarray(0, physicsCount));
    return render(run, params[physicsCount], params[physicsCount + 1]);
  };

  // Each solve is expensive: stop once chi-square settles to 1e-5 relative (for a good
  // fit of ~1000 pixels that is a change of 0.01 in chi-square, a parameter shift of a
  // tenth of its uncertainty) rather than chase rounding with many tiny steps, each a new
  // solve; finite-difference steps of 1e-4 relative stay well above the solver's noise
  // (tolerance 1e-8 in phi, 1e-10 in N).
  const lmOptions = { maxIterations: settings.maxIterations, chiSquareTolerance: 1e-5, stepTolerance: 1e-5, relativeStep: 1e-4 };
  let fit: ReplayedFit | undefined;
  let best: SolveRun | undefined;
  let model: Float64Array = new Float64Array(0);
  const passes: Array<{ weights: string; best: number[]; reducedChiSquare: number; solvesSoFar: number }> = [];
  try {
    // Pass 1 weights from the smoothed data, then reweighting from the previous best
    // model until the parameters move by less than a tenth of their uncertainty
    // (compareFit.ts: iteratively reweighted least squares).
    let sigma = noise.sigma;
    let start = initial;
    for (let pass = 1; ; pass++) {
      const current = await replayLeastSquaresFit({ model: evaluate, data, sigma, initial: start, lower, upper }, lmOptions);
      fit = current;
      best = await solveAt(current.best.subarray(0, physicsCount));
      model = render(best, current.best[physicsCount], current.best[physicsCount + 1]);
      passes.push({
        weights: pass === 1 ? 'smoothed data' : 'previous best model',
        best: Array.from(current.best),
        reducedChiSquare: current.reducedChiSquare,
        solvesSoFar: evaluations,
      });
      const moved = current.best.some((v, j) => Math.abs(v - start[j]) > 0.1 * (Number.isFinite(current.uncertaintyFromSigma[j]) ? current.uncertaintyFromSigma[j] : 0));
      if (pass >= maxWeightPasses || (pass > 1 && !moved)) break;
      sigma = modelNoiseSigma(model, noise.backgroundSigma, noise.countsPerAtom);
      start = Array.from(current.best);
    }
  } finally {
    rmSync(workDir, { recursive: true, force: true });
  }
  if (fit === undefined || best === undefined) throw new Error('compare: no fit was run (internal error)');
  const cx = fit.best[physicsCount];
  const cy = fit.best[physicsCount + 1];
  const grid = gridAt(cx, cy);
  const xCentresUm = Float64Array.from({ length: measured.nx }, (_, i) => grid.firstXUm + i * p);
  const yCentresUm = Float64Array.from({ length: measured.ny }, (_, i) => grid.firstYUm + i * p);
  const onGrid = (values: Float64Array): PixelPicture => ({ values, nx: measured.nx, ny: measured.ny, pixelUm: p, xCentresUm, yCentresUm });
  // Uncertainties from the noise model, enlarged by sqrt(chi2_nu) only when the scatter
  // exceeds the noise model (chi2_nu > 1), the scale-factor convention of the Particle
  // Data Group (PDG Review, "Introduction: averaging and fitting"). Pixels far outside
  // the cloud hold (almost) no counts and add degrees of freedom without chi-square, so
  // chi2_nu < 1 there says nothing about the noise model and must not shrink the errors.
  const errorScale = Math.max(1, Math.sqrt(fit.reducedChiSquare));
  const residual = new Float64Array(data.length);
  let modelTotal = 0;
  for (let i = 0; i < data.length; i++) {
    residual[i] = data[i] - model[i];
    modelTotal += model[i];
  }
  const modelCentre = findCloudCentre(model, [measured.nx, measured.ny]);

  // Radial profiles of both on the same bins about the measured centre, trap-scaled.
  const kept = optics.keptAxes;
  const k = resolved.trapCoefficient;
  const kRef = k[kept[0]] ?? 0;
  const scaleOf = (d: number) => (kRef > 0 && (k[d] ?? 0) > 0 ? Math.sqrt((k[d] as number) / kRef) : 1);
  const binUm = settings.binUm ?? p;
  const profile = radialProfile(
    { measured: data, model },
    { shape: [measured.nx, measured.ny], binWidth: binUm, centre: [cx, cy], axisScale: [p * scaleOf(kept[0]), p * scaleOf(kept[1])] },
  );
  const measuredSem = Float64Array.from(profile.fields.measured.std, (s, b) => (profile.count[b] >= 2 ? s / Math.sqrt(profile.count[b]) : NaN));

  // Parameters in the report's terms.
  const energyUnitName = scenario.energyUnit ?? (resolved.mode === 'hubbard' ? 'J' : 'Hz');
  const parameterRows = names.map((name, j) => ({
    name,
    unit: name === 'atoms' ? 'atoms' : name === 'kT' ? energyUnitName : 'pixels',
    start: initial[j],
    best: fit.best[j],
    uncertainty: fit.uncertaintyFromSigma[j] * errorScale,
    uncertaintyFromSigma: fit.uncertaintyFromSigma[j],
    uncertaintyScaledByReducedChiSquare: fit.uncertainty[j],
    atBound: fit.atBound[j],
    ...(name === 'kT' ? { bestInAllUnits: inAllUnits(fit.best[j] * internalPerScenarioUnit, resolved.units) } : {}),
  }));

  // Files.
  const axisNames: [string, string] = [['x', 'y', 'z'][kept[0]], ['x', 'y', 'z'][kept[1]]];
  const measuredPicture = onGrid(data);
  const modelPicture = onGrid(model);
  let maxValue = 0;
  for (let i = 0; i < data.length; i++) maxValue = Math.max(maxValue, data[i], model[i]);
  let minValue = 0;
  for (let i = 0; i < data.length; i++) minValue = Math.min(minValue, data[i]);
  const sharedRange = { min: minValue, max: maxValue > minValue ? maxValue : minValue + 1 };
  const common = { axisNames, lengthUnit: unit, quantity: 'atoms per pixel', valueRange: sharedRange } as const;
  // The pair is shown side by side: smaller images keep it about one report page wide, so
  // its labels stay at their size instead of being scaled down with the picture.
  const measuredFigure = colourPictureFigure(measuredPicture, { ...common, title: 'measured (background subtracted)', minImagePx: 300, maxImagePx: 350 });
  const modelFigure = colourPictureFigure(modelPicture, { ...common, title: `model at the best fit`, minImagePx: 300, maxImagePx: 350 });
  const pair = sideBySideSvg([measuredFigure, modelFigure], 'Measured and model pictures on the same colour scale');
  const residualFigure = colourPictureFigure(onGrid(residual), {
    axisNames,
    lengthUnit: unit,
    quantity: 'measured − model, atoms per pixel',
    title: `${scenario.name}: residual`,
    colorMap: 'rift',
    symmetricRange: true,
  });
  const radius = Array.from(profile.meanRadius);
  const profileSvg = renderLinePlotSvg({
    title: `${scenario.name}: radial profiles`,
    xAxis: { label: 'trap-scaled radius', unit: unit.short },
    yAxis: { label: 'atoms per pixel' },
    series: [
      { label: 'measured (mean ± standard error)', x: radius, y: profile.fields.measured.mean, yErr: measuredSem, style: { line: 'none', marker: 'circle' } },
      { label: 'model (best fit)', x: radius, y: profile.fields.model.mean },
    ],
  });
  const images = [
    figureImage('images/side_by_side.png', 'Measured (left) and model at the best fit (right), same colour scale', pair),
    figureImage('images/residual.png', 'Residual: measured minus model', residualFigure),
    figureImage('images/profiles.png', 'Radial profiles on the same bins (measured: mean ± standard error per bin)', profileSvg),
  ];
  const measuredFiles = pictureFiles(measuredPicture, {
    name: 'measured',
    title: 'measured image (background subtracted)',
    description: `${basename(settings.imagePath)} in atoms per pixel after orientation and background subtraction; coordinates from the cloud centre`,
    axisNames,
    lengthUnit: unit,
  });
  const modelFiles = pictureFiles(modelPicture, {
    name: 'model',
    title: 'model at the best fit',
    description: 'the scenario solved at the best-fit parameters, through the camera model on the measured pixel grid; atoms per pixel',
    axisNames,
    lengthUnit: unit,
  });
  const profilesText = toCsv(
    [
      { name: `radius_${unit.short === 'µm' ? 'um' : 'sites'}`, values: profile.meanRadius },
      { name: 'bin_inner', values: profile.binInner },
      { name: 'pixels', values: profile.count },
      { name: 'measured_mean', values: profile.fields.measured.mean },
      { name: 'measured_standard_error', values: measuredSem },
      { name: 'model_mean', values: profile.fields.model.mean },
    ],
    [
      `tiercake ${toolVersion()} compare: radial profiles of ${basename(settings.imagePath)} and of scenario ${scenario.name} at the best fit`,
      `atoms per pixel, averaged over annular bins of ${binUm} ${unit.short} about the measured cloud centre (trap-scaled radius)`,
    ],
  );

  const status: StatusLine[] = [];
  if (!best.converged) status.push({ level: 'error', text: 'The solve at the best-fit values did NOT converge; the fit must not be trusted.' });
  status.push(
    fit.converged
      ? { level: 'ok', text: `Fit converged (${fit.message}) after ${fit.iterations} steps and ${evaluations} solves.` }
      : { level: 'warning', text: `Fit stopped before convergence (${fit.message}); raise --max-iterations.` },
  );
  fit.atBound.forEach((b, j) => {
    if (b) status.push({ level: 'warning', text: `${names[j]} ended on its bound; its uncertainty is not meaningful.` });
  });

  const files = [
    'comparison.json',
    'report.html',
    'profiles.csv',
    ...images.map((i) => i.file),
    ...measuredFiles.arrays.map((a) => a.file),
    ...measuredFiles.texts.map((t) => t.file),
    measuredFiles.image.file,
    ...modelFiles.arrays.map((a) => a.file),
    ...modelFiles.texts.map((t) => t.file),
    modelFiles.image.file,
    'images/residual.npy',
  ];
  const comparison = {
    tool: { name: 'tiercake', version: toolVersion() },
    scenario: { file: scenarioPath, name: scenario.name, overrides: settings.overrides },
    image: {
      file: settings.imagePath,
      format: measured.format,
      sourceShape: measured.sourceShape,
      shape: [measured.nx, measured.ny],
      rotateDeg: measured.rotateDeg,
      flipX: measured.flipX,
      pixelUm: measured.pixelUm,
      countsPerAtom: measured.countsPerAtom,
      scaleFrom: sidecar !== null ? `missing options taken from ${sidecar.file}` : 'command-line options',
      totalAtoms: measured.totalAtoms,
      background,
      backgroundSigma: noise.backgroundSigma,
      atomsAfterBackground: measured.totalAtoms - background * data.length,
    },
    lengthUnit: unit.note,
    camera: {
      settings: cameraGiven ? 'from the scenario' : 'defaults (no camera section in the scenario)',
      imagingAxis: ['x', 'y', 'z'][optics.axis],
      objectPlanePixelUm: p,
      psfSigmaUm: optics.psfSigmaUm,
      psf: optics.psfSource,
    },
    centre: {
      measuredCloudPixels: Array.from(centreFit.centre),
      fittedTrapCentrePixels: [cx, cy],
      modelCloudPixels: Array.from(modelCentre.centre),
      note: 'pixel-index units, axis 0 = x: cloud centres by the iterated windowed centroid; the trap centre is a fit parameter started at the measured cloud centre',
    },
    fit: {
      parameters: parameterRows,
      chiSquare: fit.chiSquare,
      reducedChiSquare: fit.reducedChiSquare,
      degreesOfFreedom: fit.degreesOfFreedom,
      iterations: fit.iterations,
      solves: evaluations,
      weightPasses: passes,
      converged: fit.converged,
      message: fit.message,
      covariance: Array.from(fit.covariance),
      method: 'Levenberg-Marquardt on all pixels (Bevington & Robinson, ch. 8); each model evaluation solves the scenario with the trial values',
      noiseModel: noise.description,
      uncertaintyNote:
        'uncertainty = uncertaintyFromSigma x max(1, sqrt(reduced chi-square)) (PDG scale-factor convention); ' +
        'uncertaintyFromSigma from the noise model alone; uncertaintyScaledByReducedChiSquare always scaled',
    },
    model: {
      converged: best.converged,
      atoms: best.atoms,
      condensedAtoms: best.condensedAtoms,
      atomsInPicture: modelTotal,
      chemicalPotential: inAllUnits(best.muInternal, resolved.units),
      kT: inAllUnits(best.kTInternal, resolved.units),
    },
    profiles: { file: 'profiles.csv', binWidth: binUm, unit: unit.short },
    files,
  };

  const labels: Record<string, string> = {
    atoms: 'atom number N',
    kT: 'temperature k_B T',
    centreXPixels: `trap centre along ${axisNames[0]}`,
    centreYPixels: `trap centre along ${axisNames[1]}`,
  };
  const fitRows: KeyValueRow[] = parameterRows.map((r) => ({
    label: labels[r.name] ?? r.name,
    value: r.best,
    unit: r.name === 'atoms' ? '' : r.unit,
    secondValue: r.uncertainty,
    secondUnit: r.name === 'atoms' ? '' : r.unit,
    note: `start ${r.start.toPrecision(5)}${r.atBound ? ', on its bound' : ''}`,
  }));
  fitRows.push(
    { label: 'reduced chi-square', value: fit.reducedChiSquare, note: `${fit.degreesOfFreedom} degrees of freedom` },
    { label: 'solves', value: evaluations },
    { label: 'background subtracted', value: background, unit: 'atoms per pixel' },
    { label: 'measured cloud centre', value: `(${centreFit.centre[0].toFixed(2)}, ${centreFit.centre[1].toFixed(2)})`, note: 'pixels' },
    { label: 'model cloud centre', value: `(${modelCentre.centre[0].toFixed(2)}, ${modelCentre.centre[1].toFixed(2)})`, note: 'pixels' },
  );
  const report: ReportDocument = {
    title: `tiercake compare — ${scenario.name}`,
    subtitle: `${basename(settings.imagePath)} against scenario ${scenario.name}`,
    createdIso: new Date().toISOString(),
    status,
    sections: [
      {
        heading: 'Fit',
        blocks: [
          { kind: 'keyValueTable', caption: 'Best values (second column: standard uncertainty from the noise model, enlarged by √χ²_ν when χ²_ν > 1)', unitSystems: { first: 'best', second: '± uncertainty' }, rows: fitRows },
          { kind: 'paragraph', text: `Weights: ${noise.description}.` },
        ],
      },
      {
        heading: 'Pictures',
        blocks: images.filter((img) => img.file !== 'images/profiles.png').map((img) => ({ kind: 'figure' as const, svg: img.svg, caption: img.title })),
      },
      {
        heading: 'Radial profiles',
        blocks: [{ kind: 'figure', svg: profileSvg, caption: `Annular bins of ${binUm} ${unit.short} about the measured cloud centre (the same figure as images/profiles.png).` }],
      },
      {
        heading: 'Settings',
        blocks: [
          {
            kind: 'keyValueTable',
            rows: [
              { label: 'image', value: settings.imagePath, note: measured.format },
              { label: 'orientation', value: `${measured.flipX ? 'mirrored, ' : ''}rotated ${measured.rotateDeg}°` },
              { label: 'object-plane pixel', value: p, unit: unit.short },
              { label: 'counts per atom', value: measured.countsPerAtom },
              { label: 'PSF sigma', value: optics.psfSigmaUm, unit: unit.short, note: optics.psfSource },
              { label: 'length unit', value: unit.note },
            ],
          },
        ],
      },
      { heading: 'Scenario', blocks: [{ kind: 'codeBlock', caption: 'The scenario as given (overrides applied)', code: JSON.stringify(raw, null, 2) }] },
    ],
    footer: `tiercake ${toolVersion()}`,
  };

  const folder = new OutputFolder(settings.outDir);
  try {
    folder.write('comparison.json', `${JSON.stringify(comparison, jsonReplacer, 2)}\n`);
    folder.write('profiles.csv', profilesText);
    for (const img of images) folder.write(img.file, img.png);
    for (const f of [measuredFiles, modelFiles]) {
      folder.write(f.image.file, f.image.png);
      for (const a of f.arrays) folder.write(a.file, a.bytes);
      for (const t of f.texts) folder.write(t.file, t.text);
    }
    folder.write('images/residual.npy', encodeNpy(residual, [measured.nx, measured.ny]));
    folder.write('report.html', renderReportHtml(report));
    folder.commit();
  } catch (err) {
    folder.discard();
    throw err;
  }
  if (!settings.quiet) {
    const lines = [
      `${scenario.name}: compared with ${basename(settings.imagePath)} (${fit.converged ? 'fit converged' : 'fit NOT converged'}, ${evaluations} solves)`,
      ...parameterRows.map((r) => `  ${r.name} = ${r.best.toPrecision(6)} ± ${r.uncertainty.toPrecision(2)}${r.name === 'atoms' ? '' : ` ${r.unit}`}`),
      `  reduced chi-square ${fit.reducedChiSquare.toPrecision(4)} (${fit.degreesOfFreedom} degrees of freedom)`,
      `  results in ${settings.outDir}`,
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
  }
  return best.converged ? ExitCode.done : ExitCode.notConverged;
}

// `tiercake compare SCENARIO (--image SOURCE | --absorption-frames A,P[,D]) --out DIR`: lay
// measured camera data beside the prediction, fit the scenario to it and read the physics
// off the pictures (DESIGN.md section 4; issue 15).
// Options -> frames (cameraFrames.ts) -> shots in atoms per pixel (src/pipeline/measuredShots.ts)
// -> prepareScenario -> runCompareFit (src/pipeline/compareFit.ts) -> equation of state and
// fluctuation thermometry (compareEquationOfState.ts, compareThermometry.ts) -> files
// (src/output/compareOutputs.ts) and the report (src/report/compareReport.ts).
// A measured picture must come with its unit: counts per atom (option or tiercake's own
// sidecar) or absorption frames with the species' cross-section; otherwise exit 2.
// Exit codes: 0 done; 2 bad input; 3 the solve at the best values did not converge.

import type { Command } from 'commander';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { writeCompareFiles, type CompareProvenance } from '../../output/compareOutputs.js';
import { toolVersion } from '../../output/toolVersion.js';
import { renderReportHtml } from '../../report/renderReport.js';
import { buildCompareReport } from '../../report/compareReport.js';
import { prepareScenario } from '../../pipeline/prepareScenario.js';
import { runCompareFit } from '../../pipeline/compareFit.js';
import { FIT_PARAMETER_NAMES, type FitParameterName, type FitParameterRequest } from '../../pipeline/compareFitParameters.js';
import { prepareShots, type MeasurementSettings, type RawShot, type ShotPreparation } from '../../pipeline/measuredShots.js';
import { equationOfState } from '../../pipeline/compareEquationOfState.js';
import { stackThermometry } from '../../pipeline/compareThermometry.js';
import { toOrientedFrame } from '../../imaging/camera/frameOrientation.js';
import { resonantCrossSection } from '../../imaging/camera/resonantCrossSection.js';
import { parseFrameAddress } from '../../imaging/camera/frameAddress.js';
import type { PixelImage } from '../../imaging/camera/pixelImage.js';
import type { PixelRectangle } from '../../imaging/camera/regionOfInterest.js';
import { ParameterError } from '../../physics/parameterError.js';
import { landscapeFileHashes, scenarioHash } from '../../scenario/scenarioHash.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type OptionValues, type RawOptions } from '../options.js';
import { parseInteger, parseReal } from '../numberText.js';
import { defaultThreads, memoryLimitBytes } from '../machine.js';
import { readSidecar } from '../measuredImageFile.js';
import { readFrameSource, readFrameSources, readShotFrames, shotFiles } from '../cameraFrames.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = [
  'image',
  'countsPerAtom',
  'backgroundFrame',
  'absorptionFrames',
  'saturationCounts',
  'alpha',
  'odLimit',
  'minProbeCounts',
  'crossSection',
  'shots',
  'pixelUm',
  'pixelSites',
  'region',
  'regionMask',
  'hotPixels',
  'backgroundBorder',
  'transpose',
  'flipX',
  'flipY',
  'rotate',
  'fit',
  'centrePixels',
  'maxIterations',
  'binUm',
  'binSites',
  'chiSquarePixels',
  'bootstrap',
  'eosBinSites',
  'thermometryBinSites',
  'out',
  'force',
  'set',
  'threads',
  'quiet',
] as const;

type CompareOptions = OptionValues<(typeof OPTIONS)[number]>;

export function registerCompare(program: Command, context: CommandContext): void {
  const command = program
    .command('compare')
    .description(
      'compare measured camera data (a picture with its counts per atom, or raw absorption frames) with the scenario: fit N, T, centre and more, ' +
        'residuals, profiles, equation of state, fluctuation thermometry of a stack',
    )
    .argument('<scenario>', 'scenario file (JSON)');
  declare(command, OPTIONS, { out: { required: true }, fit: { default: 'atoms' } }).action(async (scenarioPath: string, options: RawOptions) => {
    context.exitCode = await runCompareCommand(scenarioPath, options);
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

/** Files named by a source text (for the inputs of the run): the file of a dataset address, folders as they are. */
function inputPaths(text: string | undefined): string[] {
  if (text === undefined) return [];
  return text.split(',').map((s) => parseFrameAddress(s.trim()).file).filter((s) => s.length > 0);
}

/** Pairs one frame list with the signal frames: one frame for all shots or one per shot. */
function perShot(frames: PixelImage[], count: number, option: string, what: string): (k: number) => PixelImage {
  if (frames.length !== 1 && frames.length !== count) {
    throw new InputError(`${option}: ${frames.length} ${what} frame(s) for ${count} shot(s); give one for all shots or one per shot`);
  }
  return (k) => frames[frames.length === 1 ? 0 : k];
}

const absorptionOnly = ['saturationCounts', 'alpha', 'odLimit', 'minProbeCounts', 'crossSection'] as const;
const optionFlag: Record<(typeof absorptionOnly)[number], string> = {
  saturationCounts: '--saturation-counts',
  alpha: '--alpha',
  odLimit: '--od-limit',
  minProbeCounts: '--min-probe-counts',
  crossSection: '--cross-section',
};

/** The raw shots named by the options (files read here). */
async function readShots(o: CompareOptions): Promise<{ shots: RawShot[]; format: string; inputs: string[] }> {
  const absorption = o.absorptionFrames !== undefined;
  const option = absorption ? '--absorption-frames' : '--image';
  const roles = absorption ? (o.absorptionFrames as string).split(',').map((s) => s.trim()) : [(o.image as string).trim()];
  if (absorption && (roles.length < 2 || roles.length > 3 || roles.some((r) => r.length === 0))) {
    throw new InputError(`--absorption-frames: expected WITH_ATOMS,PROBE_ONLY[,DARK] (two or three frame sources), got "${o.absorptionFrames}"`);
  }
  if (o.shots !== undefined) {
    const files = shotFiles(o.shots, '--shots');
    const all = [...roles, ...(o.backgroundFrame !== undefined ? [o.backgroundFrame] : [])];
    const shots: RawShot[] = [];
    for (const file of files) {
      const frames = await readShotFrames(file, all, option);
      shots.push({
        label: file,
        signal: frames[0],
        ...(absorption ? { probe: frames[1], ...(roles.length === 3 ? { dark: frames[2] } : {}) } : o.backgroundFrame !== undefined ? { dark: frames[1] } : {}),
      });
    }
    return { shots, format: `${files.length} shot file(s)`, inputs: o.shots.split(',').map((s) => s.trim()) };
  }
  if (absorption) {
    const [withAtoms, probe, dark] = await Promise.all(roles.map((r) => readFrameSource(r, '--absorption-frames')));
    const K = withAtoms.frames.length;
    const probeOf = perShot(probe.frames, K, '--absorption-frames', 'probe');
    const darkOf = dark !== undefined ? perShot(dark.frames, K, '--absorption-frames', 'dark') : undefined;
    const shots = withAtoms.frames.map((signal, k) => ({ label: withAtoms.labels[k], signal, probe: probeOf(k), ...(darkOf !== undefined ? { dark: darkOf(k) } : {}) }));
    return { shots, format: withAtoms.format, inputs: [...withAtoms.inputs, ...probe.inputs, ...(dark?.inputs ?? [])] };
  }
  const images = await readFrameSources(o.image as string, '--image');
  const background = o.backgroundFrame !== undefined ? await readFrameSource(o.backgroundFrame, '--background-frame') : undefined;
  const backgroundOf = background !== undefined ? perShot(background.frames, images.frames.length, '--background-frame', 'background') : undefined;
  const shots = images.frames.map((signal, k) => ({ label: images.labels[k], signal, ...(backgroundOf !== undefined ? { dark: backgroundOf(k) } : {}) }));
  return { shots, format: images.format, inputs: [...images.inputs, ...(background?.inputs ?? [])] };
}

/** ParameterErrors of the camera core named after the option that set them. */
function asInputError(err: unknown, fallback: string): never {
  if (err instanceof InputError) throw err;
  if (err instanceof ParameterError) {
    const byParameter: Record<string, string> = {
      region: '--region',
      rectangle: '--region',
      'region.mask': '--region-mask',
      borderPixels: '--background-border',
      rotateDeg: '--rotate',
      angleDeg: '--rotate',
    };
    const option = byParameter[err.parameter];
    if (option !== undefined) throw new InputError(`${option}: ${err.message.slice(err.parameter.length + 2)}`);
    if (err.parameter.startsWith('--')) throw new InputError(err.message);
    throw new InputError(`${fallback}: ${err.message}`);
  }
  throw err;
}

export async function runCompareCommand(scenarioPath: string, raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  if (o.image === undefined && o.absorptionFrames === undefined) {
    throw new InputError('--image: give the measured picture (with --counts-per-atom), or raw absorption frames with --absorption-frames WITH_ATOMS,PROBE_ONLY[,DARK]');
  }
  if (o.image !== undefined && o.absorptionFrames !== undefined) throw new InputError('--image: give either --image or --absorption-frames, not both');
  if (o.out === undefined) throw new InputError('--out: give the folder for the comparison results');
  const absorption = o.absorptionFrames !== undefined;
  if (absorption) {
    const roles = (o.absorptionFrames as string).split(',').map((r) => r.trim());
    if (roles.length < 2 || roles.length > 3 || roles.some((r) => r.length === 0)) {
      throw new InputError(`--absorption-frames: expected WITH_ATOMS,PROBE_ONLY[,DARK] (two or three frame sources), got "${o.absorptionFrames}"`);
    }
  }
  if (absorption && o.countsPerAtom !== undefined) throw new InputError('--counts-per-atom: absorption frames are turned into atoms by the cross-section; --counts-per-atom is for --image');
  if (absorption && o.backgroundFrame !== undefined) throw new InputError('--background-frame: absorption frames take their dark frame as the third of --absorption-frames');
  if (!absorption) {
    for (const name of absorptionOnly) if (o[name] !== undefined) throw new InputError(`${optionFlag[name]}: only for raw absorption frames (--absorption-frames)`);
  }
  const fit = parseFitList(o.fit ?? 'atoms');
  const region = o.region !== undefined ? parseRegion(o.region) : undefined;
  const centreGiven = o.centrePixels !== undefined ? parseCentre(o.centrePixels) : undefined;
  const inputs = [scenarioPath, ...(o.shots !== undefined ? inputPaths(o.shots) : [...inputPaths(o.image), ...inputPaths(o.absorptionFrames), ...inputPaths(o.backgroundFrame)]), ...inputPaths(o.regionMask)];
  const target = outputTarget(o.out, { force: o.force ?? false, inputs });
  const overrides = o.set ?? [];
  const prepared = prepareScenario(scenarioPath, overrides, { memoryLimitBytes: memoryLimitBytes() });
  const quiet = o.quiet ?? false;
  const say = (text: string) => {
    if (!quiet) process.stderr.write(`compare: ${text}\n`);
  };

  // The unit of the measurement and the pixel size, before any frame is read.
  const firstImage = o.image !== undefined && o.shots === undefined ? parseFrameAddress(o.image.split(',')[0].trim()).file : undefined;
  // Lengths carry their unit in the option's name: µm for a laboratory scenario, lattice
  // spacings for a dimensionless one, so a number cannot be read in the wrong unit.
  const dimensionless = prepared.resolved.mode === 'hubbard';
  const lengthUnit: 'um' | 'sites' = dimensionless ? 'sites' : 'um';
  if (dimensionless && o.pixelUm !== undefined) throw new InputError('--pixel-um: the scenario is dimensionless (lengths in lattice spacings); give the pixel size with --pixel-sites');
  if (!dimensionless && o.pixelSites !== undefined) throw new InputError('--pixel-sites: the scenario is in laboratory units; give the object-plane pixel size in µm with --pixel-um');
  if (dimensionless && o.binUm !== undefined) throw new InputError('--bin-um: the scenario is dimensionless (lengths in lattice spacings); give the bin width with --bin-sites');
  if (!dimensionless && o.binSites !== undefined) throw new InputError('--bin-sites: the scenario is in laboratory units; give the bin width in µm with --bin-um');
  const pixelOption = dimensionless ? '--pixel-sites' : '--pixel-um';
  const pixelGiven = dimensionless ? o.pixelSites : o.pixelUm;
  const binWidth = dimensionless ? o.binSites : o.binUm;
  const sidecar = firstImage !== undefined && (o.countsPerAtom === undefined || pixelGiven === undefined) ? readSidecar(firstImage) : null;
  if (pixelGiven === undefined && sidecar?.pixelSize !== undefined && sidecar.lengthUnit !== undefined && sidecar.lengthUnit !== lengthUnit) {
    throw new InputError(
      `${pixelOption}: ${sidecar.file} gives the pixel size in ${sidecar.lengthUnit === 'um' ? 'µm' : 'lattice spacings'}, but the scenario is ${dimensionless ? 'dimensionless' : 'in laboratory units'}; ` +
        `give ${pixelOption} (or compare with a scenario of the picture's kind)`,
    );
  }
  const pixelUm = pixelGiven ?? sidecar?.pixelSize;
  if (pixelUm === undefined) {
    throw new InputError(
      dimensionless
        ? '--pixel-sites: give the pixel size in lattice spacings'
        : '--pixel-um: give the pixel size in the object plane (camera pixel / magnification), in µm',
    );
  }
  let measurement: MeasurementSettings;
  if (absorption) {
    let crossSection = o.crossSection;
    let crossSectionSource = '--cross-section';
    const species = prepared.scenario.laboratory?.species;
    if (crossSection === undefined) {
      if (typeof species !== 'string') {
        throw new InputError(
          prepared.resolved.mode === 'hubbard'
            ? '--cross-section: absorption frames need the resonant cross-section sigma0; in dimensionless mode give it in lattice spacings squared'
            : '--cross-section: absorption frames need the resonant cross-section sigma0; the scenario\'s species has no D2 line in the table, so give sigma0 in µm^2',
        );
      }
      try {
        const sigma = resonantCrossSection(species);
        crossSection = sigma.crossSectionUm2;
        crossSectionSource = `3 lambda^2 / 2 pi of the ${sigma.species} D2 line, lambda = ${sigma.wavelengthNm} nm (${sigma.source})${sigma.note !== undefined ? `; ${sigma.note}` : ''}`;
      } catch (err) {
        asInputError(err, '--cross-section');
      }
    }
    measurement = {
      kind: 'absorption',
      crossSection: crossSection as number,
      crossSectionSource,
      ...(o.saturationCounts !== undefined ? { saturationCounts: o.saturationCounts } : {}),
      ...(o.alpha !== undefined ? { alpha: o.alpha } : {}),
      ...(o.odLimit !== undefined ? { maximumOpticalDepth: o.odLimit } : {}),
      ...(o.minProbeCounts !== undefined ? { minimumProbeCounts: o.minProbeCounts } : {}),
    };
  } else {
    const countsPerAtom = o.countsPerAtom ?? sidecar?.countsPerAtom;
    if (countsPerAtom === undefined) {
      throw new InputError(
        '--counts-per-atom: the measured picture has no unit; give its detected counts per atom (1 for a picture already in atoms per pixel), ' +
          'or give raw absorption frames with --absorption-frames',
      );
    }
    measurement = {
      kind: 'counts',
      countsPerAtom,
      unitSource: o.countsPerAtom !== undefined ? '--counts-per-atom' : `taken from ${sidecar?.file}`,
    };
  }

  // Frames -> shots in atoms per pixel, oriented.
  say('reading the frames');
  const { shots: rawShots, format, inputs: frameInputs } = await readShots(o);
  const regionMaskImage = o.regionMask !== undefined ? (await readFrameSource(o.regionMask, '--region-mask')).frames[0] : undefined;
  const preparation: ShotPreparation = {
    pixelUm,
    hotPixels: o.hotPixels ?? false,
    ...(region !== undefined || regionMaskImage !== undefined ? { region: { ...(region !== undefined ? { rectangle: region } : {}), ...(regionMaskImage !== undefined ? { mask: regionMaskImage } : {}) } } : {}),
    ...(o.backgroundBorder !== undefined ? { backgroundBorderPixels: o.backgroundBorder } : {}),
    orientation: { transpose: o.transpose ?? false, flipColumns: o.flipX ?? false, flipRows: o.flipY ?? false, rotateDeg: o.rotate ?? 0 },
  };
  let shots;
  try {
    shots = prepareShots(rawShots, measurement, preparation);
  } catch (err) {
    asInputError(err, absorption ? '--absorption-frames' : '--image');
  }
  say(`${shots.perShot.length} shot(s), ${shots.measured.nx} x ${shots.measured.ny} pixels after orientation, ${shots.measured.usedPixels} used; ${shots.method}`);
  let fixedCentre: { x: number; y: number } | undefined;
  if (centreGiven !== undefined) {
    const p = toOrientedFrame(shots.map, centreGiven.x, centreGiven.y);
    fixedCentre = { x: p.col, y: shots.measured.ny - 1 - p.row };
  }
  const stack = shots.perShot.length >= 2;
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
  const eos = equationOfState(result, o.eosBinSites !== undefined ? { binSites: o.eosBinSites } : {});
  const thermometry = stack
    ? stackThermometry(result, { shots: shots.shots, imagingVariance: shots.imagingVariance, ...(o.thermometryBinSites !== undefined ? { binSites: o.thermometryBinSites } : {}) })
    : { available: false as const, reason: 'a single shot: fluctuation thermometry needs a stack of shots' };
  const warnings = [...shots.warnings, ...result.warnings, ...(thermometry.available ? thermometry.warnings : [])];
  const imagePath = o.shots ?? o.image ?? (o.absorptionFrames as string);
  const provenance: CompareProvenance = {
    scenarioPath,
    overrides,
    imagePath,
    inputs: frameInputs,
    format,
    scaleFrom: measurement.kind === 'counts' ? (sidecar !== null ? `missing options taken from ${sidecar.file}` : 'command-line options') : 'absorption frames and the cross-section',
    measurement,
    preparation,
    shots,
    warnings,
  };
  const createdIso = new Date().toISOString();
  const { commit } = await writeOutputFolder(target, { command: 'compare', scenarioHash: scenarioHash(prepared.scenario, 'whole', landscapeFileHashes(prepared.resolved)) }, (folder) =>
    writeCompareFiles(result, provenance, { eos, thermometry }, folder, (images) =>
      renderReportHtml(buildCompareReport(result, { imagePath, images, createdIso, toolVersion: toolVersion(), provenance, eos, thermometry })),
    ),
  );
  reportCommit(commit);
  for (const w of warnings) process.stderr.write(`tiercake: warning: ${w.code}: ${w.message}\n`);
  if (!quiet) {
    const shown = (r: (typeof result.parameters)[number]) =>
      `  ${r.name} = ${r.best.toPrecision(6)} ± ${r.uncertainty.toPrecision(2)}${r.bootstrapUncertainty !== null ? ` (bootstrap ± ${r.bootstrapUncertainty.toPrecision(2)})` : ''}${r.name === 'atoms' ? '' : ` ${r.unit}`}`;
    const lines = [
      `${prepared.scenario.name}: compared with ${imagePath.split('/').pop()} (${result.fit.converged ? 'fit converged' : 'fit NOT converged'}, ${result.fit.solves} solves)`,
      ...result.parameters.map(shown),
      `  reduced chi-square ${result.fit.reducedChiSquare.toPrecision(4)} (${result.fit.degreesOfFreedom} degrees of freedom, ${result.fit.chiSquarePixels === 'signal' ? 'pixels above the noise' : 'all used pixels'})`,
      ...(measurement.kind === 'absorption' && measurement.saturationCounts === undefined ? ['  plain Beer-Lambert (no --saturation-counts): atom numbers are low unless the probe is far below saturation'] : []),
      ...(thermometry.available ? [`  fluctuation thermometry: kT = ${thermometry.kT.toPrecision(4)} ± ${thermometry.kTUncertainty.toPrecision(2)} ${thermometry.energyUnit} (${thermometry.usableBins} bins, ${thermometry.shotCount} shots)`] : []),
      `  results in ${target.path}`,
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
  }
  return result.best.converged ? ExitCode.done : ExitCode.notConverged;
}

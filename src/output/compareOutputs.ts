// Files of `tiercake compare`: comparison.json (inputs, best values, uncertainties, the
// bootstrap, reduced chi-square with its degrees of freedom, warnings, the noise model and
// the camera used), the tables (compareTables.ts: fit.csv, profiles.csv,
// equation_of_state.csv, thermometry.csv, shots.csv, each with its CSVW metadata), the
// pictures (measured, model at the best fit, residual, side by side; the mean and spread of
// a stack; each as .npy in the camera convention a[row, col], row 0 at the top, a 16-bit
// PNG with its sidecar and a colour PNG: pictureFiles.ts), the figures (profile overlay
// with the model's uncertainty band, equation of state, thermometry) and report.html,
// staged in one output folder. Writers only: every number comes from the fit
// (src/pipeline/compareFit.ts) or what was read off the pictures.

import { sourceShortName } from '../imaging/camera/frameAddress.js';
import { encodeNpy } from '../formats/npy.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { sideBySideSvg } from '../figures/composeSvg.js';
import type { LineSeries } from '../figures/plotSpec.js';
import type { PixelPicture } from '../imaging/pixelPicture.js';
import { cameraToPlanar } from '../imaging/cameraConvention.js';
import type { CameraWarning } from '../imaging/camera/pixelImage.js';
import type { CompareFit } from '../pipeline/compareFit.js';
import type { EquationOfStateReading } from '../pipeline/compareEquationOfState.js';
import type { ThermometryReading } from '../pipeline/compareThermometry.js';
import type { MeasurementSettings, PreparedShots, ShotPreparation } from '../pipeline/measuredShots.js';
import { inAllUnits } from '../scenario/resolveScenario.js';
import type { OutputFolder } from './outputFolder.js';
import { colourPictureFigure, PICTURE_ARRAY_ORDER, pictureFiles, toPngRowOrder, type PictureFiles } from './pictureFiles.js';
import { figureImage, jsonReplacer, type WrittenImage } from './solveOutputs.js';
import { equationOfStateTable, fitTable, profileTable, shotsTable, thermometryTable, type WrittenTable } from './compareTables.js';
import { toolStamp } from './recordFields.js';

/** Where the inputs came from and how they were turned into atoms, for the files. */
export interface CompareProvenance {
  scenarioPath: string;
  overrides: readonly string[];
  /** the measured source as given (--image, --absorption-frames or --shots) */
  imagePath: string;
  /** 'command-line options', 'missing options taken from <sidecar>', or the absorption frames */
  scaleFrom: string;
  /** files and folders read */
  inputs?: readonly string[];
  /** format and sample type of the first file */
  format?: string;
  measurement?: MeasurementSettings;
  preparation?: ShotPreparation;
  shots?: PreparedShots;
  /** every warning of the run (shots, fit, thermometry) */
  warnings?: readonly CameraWarning[];
}

export interface ComparePhysics {
  eos: EquationOfStateReading;
  thermometry: ThermometryReading;
}

export interface ComparePictures {
  /** the colour figures of the report, in order */
  images: WrittenImage[];
  pictures: PictureFiles[];
}

function onGrid(c: CompareFit, values: Float64Array): PixelPicture {
  return { values, nx: c.measured.nx, ny: c.measured.ny, pixelUm: c.measured.pixelUm, xCentresUm: c.xCentresUm, yCentresUm: c.yCentresUm };
}

/** The profile overlay: measured bin means with their errors, the model with its uncertainty band. */
export function profileFigure(c: CompareFit): string {
  const radius = Array.from(c.profile.radius);
  return renderLinePlotSvg({
    title: `${c.prepared.scenario.name}: radial profiles`,
    xAxis: { label: 'trap-scaled radius', unit: c.optics.lengthUnit.short },
    yAxis: { label: 'atoms per pixel' },
    series: [
      { label: 'measured (mean ± standard error)', x: radius, y: c.profile.measuredMean, yErr: c.profile.measuredError, style: { line: 'none', marker: 'circle' } },
      { label: 'model at the best fit (± 1 sigma of the fit)', x: radius, y: c.profile.modelMean, band: c.profile.modelBand },
    ],
  });
}

export function equationOfStateFigure(c: CompareFit, eos: EquationOfStateReading): string | null {
  if (!eos.available) return null;
  const series: LineSeries[] = [
    { label: `homogeneous mean field at kT = ${eos.kT.toPrecision(3)} ${eos.energyUnit}`, x: eos.curve.mu, y: eos.curve.density },
    { label: 'model picture, same analysis', x: eos.localChemicalPotential, y: eos.modelDensity, style: { line: 'dashed' } },
    { label: eos.kind === 'layer' ? 'measured (azimuthal average)' : 'measured (inverse Abel)', x: eos.localChemicalPotential, y: eos.measuredDensity, yErr: eos.measuredDensityError, style: { line: 'none', marker: 'circle' } },
  ];
  return renderLinePlotSvg({
    title: `${c.prepared.scenario.name}: equation of state (local density approximation)`,
    xAxis: { label: 'local chemical potential mu0 - V', unit: eos.energyUnit },
    yAxis: { label: 'density', unit: 'atoms per site' },
    series,
  });
}

export function thermometryFigure(c: CompareFit, t: ThermometryReading): string | null {
  if (!t.available) return null;
  const usable = t.bins.filter((b) => b.usable);
  return renderLinePlotSvg({
    title: `${c.prepared.scenario.name}: fluctuation thermometry (${t.shotCount} shots)`,
    xAxis: { label: 'trap-scaled radius', unit: 'sites' },
    yAxis: { label: 'kT', unit: t.energyUnit },
    series: [{ label: 'per radial bin: <dN^2> / (d<N>/dmu)', x: usable.map((b) => b.radiusSites), y: usable.map((b) => b.kT), yErr: usable.map((b) => b.kTUncertainty), style: { line: 'none', marker: 'circle' } }],
    horizontalMarkers: [
      { at: t.kT, label: `fluctuations: ${t.kT.toPrecision(3)} ± ${t.kTUncertainty.toPrecision(2)}` },
      { at: t.fittedKT, label: `fit: ${t.fittedKT.toPrecision(3)}` },
    ],
  });
}

export function comparePictures(c: CompareFit, provenance: CompareProvenance, physics?: ComparePhysics): ComparePictures {
  const { data, model, residual } = c;
  const unit = c.optics.lengthUnit;
  const name = c.prepared.scenario.name;
  const axisNames = c.axisNames;
  const measuredPicture = onGrid(c, data);
  const modelPicture = onGrid(c, model);
  let maxValue = 0;
  let minValue = 0;
  for (let i = 0; i < data.length; i++) {
    if (Number.isFinite(data[i])) {
      maxValue = Math.max(maxValue, data[i]);
      minValue = Math.min(minValue, data[i]);
    }
    maxValue = Math.max(maxValue, model[i]);
  }
  const sharedRange = { min: minValue, max: maxValue > minValue ? maxValue : minValue + 1 };
  const common = { axisNames, lengthUnit: unit, quantity: 'atoms per pixel', valueRange: sharedRange } as const;
  // The pair is shown side by side: smaller images keep it about one report page wide, so
  // its labels stay at their size instead of being scaled down with the picture.
  const measuredFigure = colourPictureFigure(measuredPicture, { ...common, title: 'measured (background subtracted)', minImagePx: 300, maxImagePx: 350 });
  const modelFigure = colourPictureFigure(modelPicture, { ...common, title: 'model at the best fit', minImagePx: 300, maxImagePx: 350 });
  const pair = sideBySideSvg([measuredFigure, modelFigure], 'Measured and model pictures on the same colour scale');
  const residualFigure = colourPictureFigure(onGrid(c, residual), {
    axisNames,
    lengthUnit: unit,
    quantity: 'measured − model, atoms per pixel',
    title: `${name}: residual`,
    colorMap: 'rift',
    symmetricRange: true,
  });
  const images: WrittenImage[] = [
    figureImage('images/side_by_side.png', 'Measured (left) and model at the best fit (right), same colour scale', pair),
    figureImage('images/residual.png', 'Residual: measured minus model (grey: masked pixels)', residualFigure),
    figureImage('images/profiles.png', 'Radial profiles on the same bins (measured: mean ± standard error per bin; model: band of one standard uncertainty of the fit)', profileFigure(c)),
  ];
  const eosSvg = physics !== undefined ? equationOfStateFigure(c, physics.eos) : null;
  if (eosSvg !== null) images.push(figureImage('images/equation_of_state.png', 'Equation of state: measured n(mu_local) beside the homogeneous mean field at the fitted temperature', eosSvg));
  const thermometrySvg = physics !== undefined ? thermometryFigure(c, physics.thermometry) : null;
  if (thermometrySvg !== null) images.push(figureImage('images/thermometry.png', 'Fluctuation thermometry: kT per radial bin, the combined value and the fitted one', thermometrySvg));
  const source = sourceShortName(provenance.imagePath);
  const pictures: PictureFiles[] = [
    pictureFiles(measuredPicture, {
      name: 'measured',
      title: 'measured picture (background subtracted)',
      description: `${source} in atoms per pixel after orientation and background subtraction${c.measured.shotCount > 1 ? `, mean of ${c.measured.shotCount} shots` : ''}; masked pixels are NaN (grey); coordinates from the fitted trap centre`,
      axisNames,
      lengthUnit: unit,
    }),
    pictureFiles(modelPicture, {
      name: 'model',
      title: 'model at the best fit',
      description: 'the scenario solved at the best-fit parameters, through the camera model on the measured pixel grid; atoms per pixel',
      axisNames,
      lengthUnit: unit,
    }),
  ];
  const stack = provenance.shots;
  if (stack !== undefined && stack.perShot.length >= 2) {
    const { width, height } = stack.stack;
    const grid = (values: Float64Array) => onGrid(c, cameraToPlanar({ width, height, values }).values);
    pictures.push(
      pictureFiles(grid(stack.stack.meanImage.values), {
        name: 'stack_mean',
        title: `mean of ${stack.perShot.length} shots`,
        description: 'mean over the shots of atoms per pixel, before background subtraction (NaN where no shot is usable)',
        axisNames,
        lengthUnit: unit,
      }),
      pictureFiles(grid(stack.stack.stdImage.values), {
        name: 'stack_spread',
        title: `standard deviation over ${stack.perShot.length} shots`,
        description: 'sample standard deviation over the shots of atoms per pixel',
        quantity: 'atoms per pixel (standard deviation)',
        axisNames,
        lengthUnit: unit,
      }),
    );
  }
  return { images, pictures };
}

/** The residual in the camera convention of every picture file. */
export function residualNpy(c: CompareFit): Uint8Array {
  const { nx, ny } = c.measured;
  return encodeNpy(toPngRowOrder(c.residual, nx, ny, new Float64Array(nx * ny)), [ny, nx]);
}

/** comparison.json: inputs, the fit, what was read off the pictures, the model at the best values, warnings and the file list. */
export function comparisonSummary(c: CompareFit, provenance: CompareProvenance, files: readonly string[], physics?: ComparePhysics): Record<string, unknown> {
  const { measured, optics, fit } = c;
  const units = c.prepared.resolved.units;
  const shots = provenance.shots;
  const m = provenance.measurement;
  const warnings = provenance.warnings ?? c.warnings;
  return {
    tool: toolStamp(),
    scenario: { file: provenance.scenarioPath, name: c.prepared.scenario.name, overrides: provenance.overrides },
    warnings,
    image: {
      file: provenance.imagePath,
      inputs: provenance.inputs ?? [provenance.imagePath],
      format: provenance.format ?? null,
      arrayOrder: PICTURE_ARRAY_ORDER,
      measurement:
        m === undefined
          ? null
          : m.kind === 'counts'
            ? { kind: 'counts', countsPerAtom: m.countsPerAtom, unitFrom: m.unitSource }
            : {
                kind: 'absorption',
                crossSection: m.crossSection,
                crossSectionUnit: `${optics.lengthUnit.short}^2`,
                crossSectionFrom: m.crossSectionSource,
                saturationCounts: m.saturationCounts ?? null,
                saturationCorrection: m.saturationCounts !== undefined ? 'Reinaudi et al., Opt. Lett. 32, 3143 (2007)' : 'none: plain Beer-Lambert',
                alpha: m.alpha ?? 1,
                opticalDepthLimit: m.maximumOpticalDepth ?? 4,
                minimumProbeCounts: m.minimumProbeCounts ?? 20,
              },
      method: shots?.method ?? null,
      preparation: provenance.preparation ?? null,
      givenFrame: shots !== undefined ? { width: shots.map.givenWidth, height: shots.map.givenHeight } : null,
      shape: [measured.ny, measured.nx],
      shapeNote: 'rows, columns of the oriented picture (camera convention)',
      pixelUm: measured.pixelUm,
      countsPerAtomOfFittedPicture: measured.countsPerAtom,
      scaleFrom: provenance.scaleFrom,
      usedPixels: measured.usedPixels,
      totalAtoms: measured.totalAtoms,
      background: c.background,
      backgroundSigma: c.noise.backgroundSigma,
      atomsAfterBackground: measured.totalAtoms - c.background * measured.usedPixels,
    },
    shots:
      shots !== undefined && shots.perShot.length >= 2
        ? {
            count: shots.perShot.length,
            atoms: shots.stack.atoms,
            perShotFile: 'shots.csv',
            linearised: c.shots !== null ? { replicates: c.shots.replicates, seed: c.shots.seed, method: c.shots.method } : null,
          }
        : null,
    lengthUnit: optics.lengthUnit.note,
    camera: {
      settings: c.cameraGiven ? 'from the scenario' : 'defaults (no camera section in the scenario)',
      imagingAxis: ['x', 'y', 'z'][optics.axis],
      objectPlanePixelUm: measured.pixelUm,
      psfSigmaUm: optics.psfSigmaUm,
      psf: optics.psfSource,
      fittedPicture: c.picture,
    },
    centre: {
      fittedTrapCentrePixels: c.centre.givenFrame,
      fittedTrapCentreCovariance: c.centre.givenFrameCovariance,
      fitted: c.centre.fitted,
      orientedGridPixels: c.centre.grid,
      measuredCloudPixels: Array.from(c.measuredCentre.centre),
      modelCloudPixels: Array.from(c.modelCentre.centre),
      note:
        'fittedTrapCentrePixels: [x, y] in pixels of the frame as given, x = column, y = row from the top (pixel centres at whole numbers); ' +
        'orientedGridPixels, measuredCloudPixels and modelCloudPixels: pixel index on the oriented picture with y upwards',
    },
    fit: {
      parameters: c.parameters.map((r) => ({
        ...r,
        ...(r.name === 'kT' || r.name === 'mu' ? { bestInAllUnits: inAllUnits(r.best * c.internalPerScenarioUnit, units) } : {}),
      })),
      table: 'fit.csv',
      chiSquare: fit.chiSquare,
      reducedChiSquare: fit.reducedChiSquare,
      degreesOfFreedom: fit.degreesOfFreedom,
      chiSquarePixels: fit.chiSquarePixels === 'signal' ? 'pixels where the model or the 3x3-smoothed data stand above their noise sigma' : 'every used pixel',
      allPixels: fit.allPixels,
      iterations: fit.iterations,
      solves: fit.solves,
      linearModelEvaluations: fit.interpolated,
      sweeps: fit.sweeps,
      weightPasses: fit.weightPasses,
      converged: fit.converged,
      message: fit.message,
      covariance: Array.from(fit.covariance),
      method:
        'Levenberg-Marquardt on the used pixels (Bevington & Robinson, ch. 8); each physics evaluation solves the scenario with the trial values, ' +
        'warm-started from the previous solutions; the atom number is fitted through the chemical potential and its covariance carried by dN/dmu',
      noiseModel: c.noise.description,
      uncertaintyNote:
        'uncertainty = uncertaintyFromSigma x max(1, sqrt(reduced chi-square)) (PDG scale-factor convention); ' +
        'uncertaintyFromSigma from the noise model alone; uncertaintyScaledByReducedChiSquare always scaled; bootstrapUncertainty from resampling the shots of a stack',
    },
    model: {
      converged: c.best.converged,
      atoms: c.best.atoms,
      condensedAtoms: c.best.condensedAtoms,
      entropyPerAtom: c.best.entropyPerAtom,
      trapFrequencyFactor: c.best.trapFactor,
      atomsInPicture: c.atomsInPicture,
      chemicalPotential: inAllUnits(c.best.muInternal, units),
      kT: inAllUnits(c.best.kTInternal, units),
    },
    profiles: { file: 'profiles.csv', binWidth: c.binUm, unit: optics.lengthUnit.short },
    equationOfState:
      physics === undefined
        ? null
        : physics.eos.available
          ? { file: 'equation_of_state.csv', kind: physics.eos.kind, method: physics.eos.method, binSites: physics.eos.binSites, chiSquare: physics.eos.chiSquare, points: physics.eos.points, kT: physics.eos.kT, centralChemicalPotential: physics.eos.centralChemicalPotential, energyUnit: physics.eos.energyUnit }
          : { available: false, reason: physics.eos.reason },
    thermometry:
      physics === undefined
        ? null
        : physics.thermometry.available
          ? {
              file: 'thermometry.csv',
              kT: physics.thermometry.kT,
              kTUncertainty: physics.thermometry.kTUncertainty,
              fittedKT: physics.thermometry.fittedKT,
              energyUnit: physics.thermometry.energyUnit,
              usableBins: physics.thermometry.usableBins,
              chiSquare: physics.thermometry.chiSquare,
              degreesOfFreedom: physics.thermometry.degreesOfFreedom,
              binSites: physics.thermometry.binSites,
              shots: physics.thermometry.shotCount,
              method: physics.thermometry.method,
            }
          : { available: false, reason: physics.thermometry.reason },
    files,
  };
}

/** Stage every file of a comparison in `folder` (the caller commits it); returns the file list. */
export function writeCompareFiles(
  c: CompareFit,
  provenance: CompareProvenance,
  physics: ComparePhysics,
  folder: OutputFolder,
  reportHtml: (images: WrittenImage[]) => string,
): string[] {
  const { images, pictures } = comparePictures(c, provenance, physics);
  const tables: WrittenTable[] = [fitTable(c), profileTable(c)];
  const eosTable = equationOfStateTable(c, physics.eos);
  if (eosTable !== null) tables.push(eosTable);
  const thermometry = thermometryTable(c, physics.thermometry);
  if (thermometry !== null) tables.push(thermometry);
  if (provenance.shots !== undefined && provenance.shots.perShot.length >= 2) tables.push(shotsTable(c, provenance.shots));
  const files = [
    'comparison.json',
    'report.html',
    ...tables.flatMap((t) => [t.file, t.metadataFile]),
    ...images.map((i) => i.file),
    ...pictures.flatMap((f) => [...f.arrays.map((a) => a.file), ...f.texts.map((t) => t.file), f.image.file]),
    'images/residual.npy',
  ];
  folder.write('comparison.json', `${JSON.stringify(comparisonSummary(c, provenance, files, physics), jsonReplacer, 2)}\n`);
  for (const t of tables) {
    folder.write(t.file, t.csv);
    folder.write(t.metadataFile, t.metadata);
  }
  for (const img of images) folder.write(img.file, img.png);
  for (const f of pictures) {
    folder.write(f.image.file, f.image.png);
    for (const a of f.arrays) folder.write(a.file, a.bytes);
    for (const t of f.texts) folder.write(t.file, t.text);
  }
  folder.write('images/residual.npy', residualNpy(c));
  folder.write('report.html', reportHtml(images));
  return files;
}

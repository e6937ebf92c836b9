// Files of `tiercake compare`: comparison.json (best values, uncertainties, reduced
// chi-square, the noise model and the camera used), profiles.csv, the pictures (measured,
// model at the best fit, residual, side by side, overlaid radial profiles) and report.html,
// staged in one output folder. Writers only: every number comes from the fit
// (src/pipeline/compareFit.ts).

import { basename } from 'node:path';
import { encodeNpy } from '../formats/npy.js';
import { toCsv } from '../formats/csv.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { sideBySideSvg } from '../figures/composeSvg.js';
import type { PixelPicture } from '../imaging/pixelPicture.js';
import type { CompareFit } from '../pipeline/compareFit.js';
import { inAllUnits } from '../scenario/resolveScenario.js';
import type { OutputFolder } from './outputFolder.js';
import { colourPictureFigure, pictureFiles, type PictureFiles } from './pictureFiles.js';
import { figureImage, jsonReplacer, type WrittenImage } from './solveOutputs.js';
import { toolVersion } from './toolVersion.js';

/** Where the inputs came from, for the files. */
export interface CompareProvenance {
  scenarioPath: string;
  overrides: readonly string[];
  imagePath: string;
  /** 'command-line options' or 'missing options taken from <sidecar>' */
  scaleFrom: string;
}

export interface ComparePictures {
  /** the colour PNGs of the report (side by side, residual, profiles) */
  images: WrittenImage[];
  measured: PictureFiles;
  model: PictureFiles;
}

function onGrid(c: CompareFit, values: Float64Array): PixelPicture {
  return { values, nx: c.measured.nx, ny: c.measured.ny, pixelUm: c.measured.pixelUm, xCentresUm: c.xCentresUm, yCentresUm: c.yCentresUm };
}

export function comparePictures(c: CompareFit, provenance: CompareProvenance): ComparePictures {
  const { data, model, residual } = c;
  const unit = c.optics.lengthUnit;
  const name = c.prepared.scenario.name;
  const axisNames = c.axisNames;
  const measuredPicture = onGrid(c, data);
  const modelPicture = onGrid(c, model);
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
  const residualFigure = colourPictureFigure(onGrid(c, residual), {
    axisNames,
    lengthUnit: unit,
    quantity: 'measured − model, atoms per pixel',
    title: `${name}: residual`,
    colorMap: 'rift',
    symmetricRange: true,
  });
  const radius = Array.from(c.profile.meanRadius);
  const profileSvg = renderLinePlotSvg({
    title: `${name}: radial profiles`,
    xAxis: { label: 'trap-scaled radius', unit: unit.short },
    yAxis: { label: 'atoms per pixel' },
    series: [
      { label: 'measured (mean ± standard error)', x: radius, y: c.profile.fields.measured.mean, yErr: c.measuredSem, style: { line: 'none', marker: 'circle' } },
      { label: 'model (best fit)', x: radius, y: c.profile.fields.model.mean },
    ],
  });
  const images: WrittenImage[] = [
    figureImage('images/side_by_side.png', 'Measured (left) and model at the best fit (right), same colour scale', pair),
    figureImage('images/residual.png', 'Residual: measured minus model', residualFigure),
    figureImage('images/profiles.png', 'Radial profiles on the same bins (measured: mean ± standard error per bin)', profileSvg),
  ];
  const measuredFiles = pictureFiles(measuredPicture, {
    name: 'measured',
    title: 'measured image (background subtracted)',
    description: `${basename(provenance.imagePath)} in atoms per pixel after orientation and background subtraction; coordinates from the cloud centre`,
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
  return { images, measured: measuredFiles, model: modelFiles };
}

export function compareProfilesCsv(c: CompareFit, provenance: CompareProvenance): string {
  const unit = c.optics.lengthUnit;
  const p = c.profile;
  return toCsv(
    [
      { name: `radius_${unit.short === 'µm' ? 'um' : 'sites'}`, values: p.meanRadius },
      { name: 'bin_inner', values: p.binInner },
      { name: 'pixels', values: p.count },
      { name: 'measured_mean', values: p.fields.measured.mean },
      { name: 'measured_standard_error', values: c.measuredSem },
      { name: 'model_mean', values: p.fields.model.mean },
    ],
    [
      `tiercake ${toolVersion()} compare: radial profiles of ${basename(provenance.imagePath)} and of scenario ${c.prepared.scenario.name} at the best fit`,
      `atoms per pixel, averaged over annular bins of ${c.binUm} ${unit.short} about the measured cloud centre (trap-scaled radius)`,
    ],
  );
}

/** comparison.json: inputs, the fit, the model at the best values and the file list. */
export function comparisonSummary(c: CompareFit, provenance: CompareProvenance, files: readonly string[]): Record<string, unknown> {
  const { measured, optics, fit } = c;
  const units = c.prepared.resolved.units;
  return {
    tool: { name: 'tiercake', version: toolVersion() },
    scenario: { file: provenance.scenarioPath, name: c.prepared.scenario.name, overrides: provenance.overrides },
    image: {
      file: provenance.imagePath,
      format: measured.format,
      sourceShape: measured.sourceShape,
      shape: [measured.nx, measured.ny],
      rotateDeg: measured.rotateDeg,
      flipX: measured.flipX,
      pixelUm: measured.pixelUm,
      countsPerAtom: measured.countsPerAtom,
      scaleFrom: provenance.scaleFrom,
      totalAtoms: measured.totalAtoms,
      background: c.background,
      backgroundSigma: c.noise.backgroundSigma,
      atomsAfterBackground: measured.totalAtoms - c.background * c.data.length,
    },
    lengthUnit: optics.lengthUnit.note,
    camera: {
      settings: c.cameraGiven ? 'from the scenario' : 'defaults (no camera section in the scenario)',
      imagingAxis: ['x', 'y', 'z'][optics.axis],
      objectPlanePixelUm: measured.pixelUm,
      psfSigmaUm: optics.psfSigmaUm,
      psf: optics.psfSource,
    },
    centre: {
      measuredCloudPixels: Array.from(c.measuredCentre.centre),
      fittedTrapCentrePixels: [c.parameters[c.parameters.length - 2].best, c.parameters[c.parameters.length - 1].best],
      modelCloudPixels: Array.from(c.modelCentre.centre),
      note: 'pixel-index units, axis 0 = x: cloud centres by the iterated windowed centroid; the trap centre is a fit parameter started at the measured cloud centre',
    },
    fit: {
      parameters: c.parameters.map((r) => ({
        ...r,
        ...(r.name === 'kT' ? { bestInAllUnits: inAllUnits(r.best * c.internalPerScenarioUnit, units) } : {}),
      })),
      chiSquare: fit.chiSquare,
      reducedChiSquare: fit.reducedChiSquare,
      degreesOfFreedom: fit.degreesOfFreedom,
      iterations: fit.iterations,
      solves: fit.solves,
      linearModelEvaluations: fit.interpolated,
      sweeps: fit.sweeps,
      weightPasses: fit.weightPasses,
      converged: fit.converged,
      message: fit.message,
      covariance: Array.from(fit.covariance),
      method:
        'Levenberg-Marquardt on all pixels (Bevington & Robinson, ch. 8); each model evaluation solves the scenario with the trial values, ' +
        'warm-started from the previous solutions; the atom number is fitted through the chemical potential and its covariance carried by dN/dmu',
      noiseModel: c.noise.description,
      uncertaintyNote:
        'uncertainty = uncertaintyFromSigma x max(1, sqrt(reduced chi-square)) (PDG scale-factor convention); ' +
        'uncertaintyFromSigma from the noise model alone; uncertaintyScaledByReducedChiSquare always scaled',
    },
    model: {
      converged: c.best.converged,
      atoms: c.best.atoms,
      condensedAtoms: c.best.condensedAtoms,
      atomsInPicture: c.atomsInPicture,
      chemicalPotential: inAllUnits(c.best.muInternal, units),
      kT: inAllUnits(c.best.kTInternal, units),
    },
    profiles: { file: 'profiles.csv', binWidth: c.binUm, unit: optics.lengthUnit.short },
    files,
  };
}

/** Stage every file of a comparison in `folder` (the caller commits it); returns the file list. */
export function writeCompareFiles(
  c: CompareFit,
  provenance: CompareProvenance,
  folder: OutputFolder,
  reportHtml: (images: WrittenImage[]) => string,
): string[] {
  const pictures = comparePictures(c, provenance);
  const files = [
    'comparison.json',
    'report.html',
    'profiles.csv',
    ...pictures.images.map((i) => i.file),
    ...[pictures.measured, pictures.model].flatMap((f) => [...f.arrays.map((a) => a.file), ...f.texts.map((t) => t.file), f.image.file]),
    'images/residual.npy',
  ];
  folder.write('comparison.json', `${JSON.stringify(comparisonSummary(c, provenance, files), jsonReplacer, 2)}\n`);
  folder.write('profiles.csv', compareProfilesCsv(c, provenance));
  for (const img of pictures.images) folder.write(img.file, img.png);
  for (const f of [pictures.measured, pictures.model]) {
    folder.write(f.image.file, f.image.png);
    for (const a of f.arrays) folder.write(a.file, a.bytes);
    for (const t of f.texts) folder.write(t.file, t.text);
  }
  folder.write('images/residual.npy', encodeNpy(c.residual, [c.measured.nx, c.measured.ny]));
  folder.write('report.html', reportHtml(pictures.images));
  return files;
}

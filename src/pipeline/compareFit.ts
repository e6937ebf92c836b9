// The fit behind `tiercake compare` (DESIGN.md section 4), in memory: a measured camera
// image against the scenario's picture, fitting the atom number (and the temperature) and
// the position of the trap centre on the pixel grid.
//
// 1. The measured image (already oriented, in atoms per pixel: src/imaging/measuredImage.ts)
//    has its background (median of the border pixels) subtracted; its cloud centre is found
//    by the iterated windowed centroid (src/observables/cloudCentre.ts).
// 2. The model picture is rendered on exactly the measured pixel grid with the trap centre
//    at a fitted pixel position, through the camera model (column, area-weighted
//    resampling, PSF) with the scenario's camera section and the measured pixel size.
// 3. Weighted least squares (Levenberg-Marquardt, src/numerics/leastSquaresFit.ts, replayed
//    for an asynchronous model: compareFitReplay.ts) over all pixels, weights from
//    compareFitNoise.ts (first pass: the larger of the estimates from the smoothed data
//    and from the model at the starting values), repeated with weights from the previous
//    best model (iteratively reweighted least squares) until the parameters move by less
//    than a tenth of their uncertainty. Every model evaluation is one warm-started lattice solve of the one
//    resolved scenario on one sweep pool (compareFitModel.ts); the atom number is fitted
//    through the chemical potential and reported with its uncertainty carried by dN/dmu.
// Returns plain data; the files are written by src/output/compareOutputs.ts.

import { findCloudCentre, type CloudCentre } from '../observables/cloudCentre.js';
import { radialProfile, type RadialProfile } from '../observables/radialProfile.js';
import { cameraPicture, type CameraOptics } from '../imaging/cameraOptics.js';
import type { CameraGrid } from '../imaging/cameraResample.js';
import type { MeasuredImage } from '../imaging/measuredImage.js';
import { maxInteraction, maxHopping } from '../lattice/latticeModel.js';
import { createSweepPool, type SweepPool } from '../solver/sweepExecutor.js';
import { energyParser } from '../scenario/resolveScenario.js';
import { InputError } from '../scenario/inputError.js';
import { defaultCameraSettings } from '../scenario/imagingSchema.js';
import type { LeastSquaresOptions } from '../numerics/leastSquaresFit.js';
import { scenarioOptics, type PreparedScenario } from './prepareScenario.js';
import { threadsFor, type WorkerModule } from './solveScenario.js';
import { createFitModel, type FitSolution } from './compareFitModel.js';
import { modelNoiseSigma, pixelNoiseModel } from './compareFitNoise.js';
import { replayLeastSquaresFit, type ReplayedFit } from './compareFitReplay.js';

export type FitParameterName = 'atoms' | 'temperature';

export interface CompareFitRequest {
  prepared: PreparedScenario;
  /** the measured image, oriented, in atoms per pixel */
  measured: MeasuredImage;
  fit: readonly FitParameterName[];
  /** Levenberg-Marquardt steps at most, per weighting pass */
  maxIterations: number;
  /** radial bin width in the picture's length unit (default one pixel) */
  binUm?: number;
  threads: number;
  /** worker module of the sweep pool (tests) */
  workerModule?: WorkerModule;
  /** after each new lattice solve */
  onSolve?: (progress: { evaluation: number; atoms: number; kT: number | null; converged: boolean }) => void;
}

/** One fitted quantity as reported (the atom number, not the chemical potential behind it). */
export interface FitParameterRow {
  name: 'atoms' | 'kT' | 'centreXPixels' | 'centreYPixels';
  /** 'atoms', the scenario's energy unit, or 'pixels' */
  unit: string;
  start: number;
  best: number;
  /** uncertaintyFromSigma x max(1, sqrt(reduced chi-square)) (PDG scale-factor convention) */
  uncertainty: number;
  uncertaintyFromSigma: number;
  uncertaintyScaledByReducedChiSquare: number;
  atBound: boolean;
}

export interface CompareFit {
  prepared: PreparedScenario;
  measured: MeasuredImage;
  /** optics with the measured pixel size */
  optics: CameraOptics;
  cameraGiven: boolean;
  background: number;
  noise: { backgroundSigma: number; countsPerAtom: number; description: string };
  measuredCentre: CloudCentre;
  modelCentre: CloudCentre;
  /** background-subtracted data, model at the best fit, residual = data - model; atoms per pixel, (nx, ny) */
  data: Float64Array;
  model: Float64Array;
  residual: Float64Array;
  /** pixel-centre coordinates with the fitted trap centre at 0 */
  xCentresUm: Float64Array;
  yCentresUm: Float64Array;
  /** internal energy of one scenario energy unit */
  internalPerScenarioUnit: number;
  parameters: FitParameterRow[];
  fit: {
    chiSquare: number;
    reducedChiSquare: number;
    degreesOfFreedom: number;
    iterations: number;
    converged: boolean;
    message: string;
    /** covariance of the reported parameters (rows as `parameters`), row-major */
    covariance: Float64Array;
    /** lattice solves, and evaluations taken from the fit's linear model between them */
    solves: number;
    interpolated: number;
    sweeps: number;
    weightPasses: Array<{ weights: string; best: number[]; reducedChiSquare: number; solvesSoFar: number }>;
  };
  /** the solve at the best fit */
  best: FitSolution;
  atomsInPicture: number;
  profile: RadialProfile;
  /** standard error of the measured mean per bin (NaN below two pixels) */
  measuredSem: Float64Array;
  binUm: number;
  /** names of the two image axes */
  axisNames: [string, string];
}

/** Weighted fits at most: one with data weights, then reweighting from the model. */
const maxWeightPasses = 4;

/**
 * Each solve is expensive: stop once chi-square settles to 1e-5 relative (for a good fit
 * of ~1000 pixels that is a change of 0.01 in chi-square, a parameter shift of a tenth of
 * its uncertainty) rather than chase rounding with many tiny steps, each a new solve;
 * finite-difference steps of 1e-4 relative stay well above the solver's noise (tolerance
 * 1e-8 in phi).
 */
const lmOptions = (maxIterations: number): LeastSquaresOptions => ({ maxIterations, chiSquareTolerance: 1e-5, stepTolerance: 1e-5, relativeStep: 1e-4 });

export async function runCompareFit(request: CompareFitRequest): Promise<CompareFit> {
  const { prepared, measured } = request;
  const { scenario, resolved } = prepared;
  const fitsAtoms = request.fit.includes('atoms');
  const fitsTemperature = request.fit.includes('temperature');
  if (!fitsAtoms && !fitsTemperature) throw new InputError('--fit: name at least one parameter: atoms or atoms,temperature');
  const camera = scenario.camera ?? defaultCameraSettings();

  // Optics with the measured pixel size; the PSF and the imaging axis from the scenario.
  const optics: CameraOptics = { ...scenarioOptics(resolved, camera), pixelUm: measured.pixelUm };

  // Background, centre and weights of the measured picture.
  const centreFit = findCloudCentre(measured.values, [measured.nx, measured.ny]);
  const background = centreFit.background;
  const data = new Float64Array(measured.values.length);
  for (let i = 0; i < data.length; i++) data[i] = measured.values[i] - background;
  const noise = pixelNoiseModel({ values: data, nx: measured.nx, ny: measured.ny }, 0, measured.countsPerAtom);
  const p = measured.pixelUm;
  /** Pixel grid of the measured image with the trap centre at pixel-index (x0, y0). */
  const gridAt = (x0: number, y0: number): CameraGrid => ({ nx: measured.nx, ny: measured.ny, firstXUm: -x0 * p, firstYUm: -y0 * p });

  // Energies of kT in the scenario's unit (what --set temperature.kT reads).
  const internalPerScenarioUnit = energyParser(scenario, resolved.units)(1, 'temperature.kT');
  const uInScenarioUnit = resolved.units.interaction / internalPerScenarioUnit;
  const kTStart =
    resolved.thermal.kind === 'temperature' && resolved.thermal.kT > 0 ? resolved.thermal.kT / internalPerScenarioUnit : 0.1 * uInScenarioUnit;
  const capacity = resolved.geometry.siteCount * scenario.truncation.nmax;
  let atomsStart = measured.totalAtoms - background * data.length;
  if (!(atomsStart > 0)) atomsStart = scenario.particles.atoms ?? 1;
  atomsStart = Math.min(atomsStart, 0.99 * capacity);

  const threads = threadsFor(resolved.geometry.siteCount, request.threads);
  const pool: SweepPool | null = threads > 1 ? createSweepPool({ workers: threads - 1, ...(request.workerModule ?? {}) }) : null;
  try {
    const model = createFitModel(
      resolved,
      { fitsAtoms, fitsTemperature, internalPerScenarioUnit },
      {
        threads,
        pool,
        onSolve: (s, evaluation) =>
          request.onSolve?.({ evaluation, atoms: s.atoms, kT: fitsTemperature ? s.kTInternal / internalPerScenarioUnit : null, converged: s.converged }),
      },
    );

    // Fit parameters: the physics ones (each change is a new solve), then the position of
    // the trap centre on the measured pixel grid (a change only re-renders the picture),
    // started at the measured cloud centre. Fitting the centre lets its uncertainty reach
    // the other parameters through the covariance.
    const initial: number[] = [];
    const lower: number[] = [];
    const upper: number[] = [];
    let atomsAtStart = atomsStart;
    if (fitsAtoms) {
      const start = await model.startAtAtoms(atomsStart, fitsTemperature ? kTStart : null);
      atomsAtStart = start.solution.atoms;
      const uMax = maxInteraction(resolved.model);
      const zJ = 2 * resolved.geometry.dims * maxHopping(resolved.model);
      initial.push(start.physics[0]);
      lower.push(1e-9 * uMax);
      upper.push(zJ + scenario.truncation.nmax * uMax);
    }
    if (fitsTemperature) {
      initial.push(kTStart);
      lower.push(1e-4 * uInScenarioUnit);
      upper.push(20 * uInScenarioUnit);
    }
    const physicsCount = initial.length;
    initial.push(centreFit.centre[0], centreFit.centre[1]);
    lower.push(0, 0);
    upper.push(measured.nx - 1, measured.ny - 1);

    const shape = resolved.geometry.shape;
    const render = (s: FitSolution, x0: number, y0: number): Float64Array => cameraPicture(s.density, shape, optics, gridAt(x0, y0)).values;
    const evaluate = async (params: Float64Array): Promise<Float64Array> => {
      const s = await model.solveAt(params.subarray(0, physicsCount));
      return render(s, params[physicsCount], params[physicsCount + 1]);
    };
    const evaluateNow = (params: Float64Array): Float64Array | undefined => {
      const s = model.peek(params.subarray(0, physicsCount));
      return s === undefined ? undefined : render(s, params[physicsCount], params[physicsCount + 1]);
    };

    // Then reweighting from the previous best model until the parameters move by less
    // than a tenth of their uncertainty.
    let fit: ReplayedFit | undefined;
    let best: FitSolution | undefined;
    let picture: Float64Array = new Float64Array(0);
    const passes: CompareFit['fit']['weightPasses'] = [];
    // Pass 1 weights: per pixel the larger of the estimate from the smoothed data and the
    // one from the model at the starting values (a solve the fit needs anyway). Starting
    // near the model's weights saves a reweighting pass; taking the larger keeps a poor
    // start from giving pixels with atoms but no model a weight they do not deserve.
    let start = initial;
    const startSolution = await model.solveAt(Float64Array.from(initial.slice(0, physicsCount)));
    const startSigma = modelNoiseSigma(render(startSolution, initial[physicsCount], initial[physicsCount + 1]), noise.backgroundSigma, noise.countsPerAtom);
    let sigma: Float64Array = Float64Array.from(noise.sigma, (s, i) => Math.max(s, startSigma[i]));
    const options = lmOptions(request.maxIterations);
    for (let pass = 1; ; pass++) {
      const current = await replayLeastSquaresFit({ model: evaluate, modelSync: evaluateNow, data, sigma, initial: start, lower, upper }, options);
      fit = current;
      best = await model.solveAt(current.best.subarray(0, physicsCount), true);
      picture = render(best, current.best[physicsCount], current.best[physicsCount + 1]);
      const reported = Array.from(current.best);
      if (fitsAtoms) reported[0] = best.atoms;
      passes.push({ weights: pass === 1 ? 'larger of smoothed data and model at the start' : 'previous best model', best: reported, reducedChiSquare: current.reducedChiSquare, solvesSoFar: model.evaluations });
      const moved = current.best.some((v, j) => Math.abs(v - start[j]) > 0.1 * (Number.isFinite(current.uncertaintyFromSigma[j]) ? current.uncertaintyFromSigma[j] : 0));
      if (pass >= maxWeightPasses || (pass > 1 && !moved)) break;
      sigma = modelNoiseSigma(picture, noise.backgroundSigma, noise.countsPerAtom);
      start = Array.from(current.best);
    }
    if (fit === undefined || best === undefined) throw new Error('runCompareFit: no fit was run');

    // Reported parameters: N instead of mu - muFloor, with the covariance carried by the
    // Jacobian of the change of parameters, T = d(reported)/d(fitted): identity but for
    // the atom-number row, dN/dp_j from the finite differences the fit took at its optimum.
    const nPar = fit.best.length;
    const transform = new Float64Array(nPar * nPar);
    for (let j = 0; j < nPar; j++) transform[j * nPar + j] = 1;
    if (fitsAtoms) {
      for (let j = 0; j < physicsCount; j++) {
        const stepped = Float64Array.from(fit.best.subarray(0, physicsCount));
        let h = options.relativeStep! * (stepped[j] !== 0 ? Math.abs(stepped[j]) : 1);
        if (stepped[j] + h > upper[j]) h = -h; // as leastSquaresFit steps at an upper bound
        stepped[j] += h;
        const other = await model.solveAt(stepped);
        transform[j] = (other.atoms - best.atoms) / h;
      }
    }
    const covariance = new Float64Array(nPar * nPar);
    for (let a = 0; a < nPar; a++) {
      for (let b = 0; b < nPar; b++) {
        let sum = 0;
        for (let j = 0; j < nPar; j++) for (let k = 0; k < nPar; k++) sum += transform[a * nPar + j] * fit.covariance[j * nPar + k] * transform[b * nPar + k];
        covariance[a * nPar + b] = sum;
      }
    }
    // Uncertainties from the noise model, enlarged by sqrt(chi2_nu) only when the scatter
    // exceeds the noise model (chi2_nu > 1), the scale-factor convention of the Particle
    // Data Group (PDG Review, "Introduction: averaging and fitting"). Pixels far outside
    // the cloud hold (almost) no counts and add degrees of freedom without chi-square, so
    // chi2_nu < 1 there says nothing about the noise model and must not shrink the errors.
    const errorScale = Math.max(1, Math.sqrt(fit.reducedChiSquare));
    const energyUnitName = scenario.energyUnit ?? (resolved.mode === 'hubbard' ? 'J' : 'Hz');
    const names: FitParameterRow['name'][] = [...(fitsAtoms ? (['atoms'] as const) : []), ...(fitsTemperature ? (['kT'] as const) : []), 'centreXPixels', 'centreYPixels'];
    const parameters: FitParameterRow[] = names.map((name, j) => {
      const fromSigma = Math.sqrt(covariance[j * nPar + j]);
      return {
        name,
        unit: name === 'atoms' ? 'atoms' : name === 'kT' ? energyUnitName : 'pixels',
        start: name === 'atoms' ? atomsAtStart : initial[j],
        best: name === 'atoms' ? best.atoms : fit.best[j],
        uncertainty: fromSigma * errorScale,
        uncertaintyFromSigma: fromSigma,
        uncertaintyScaledByReducedChiSquare: fromSigma * Math.sqrt(fit.reducedChiSquare),
        atBound: fit.atBound[j],
      };
    });

    const cx = fit.best[physicsCount];
    const cy = fit.best[physicsCount + 1];
    const grid = gridAt(cx, cy);
    const residual = new Float64Array(data.length);
    let atomsInPicture = 0;
    for (let i = 0; i < data.length; i++) {
      residual[i] = data[i] - picture[i];
      atomsInPicture += picture[i];
    }
    // Radial profiles of both on the same bins about the fitted centre, trap-scaled.
    const kept = optics.keptAxes;
    const k = resolved.trapCoefficient;
    const kRef = k[kept[0]] ?? 0;
    const scaleOf = (d: number): number => (kRef > 0 && (k[d] ?? 0) > 0 ? Math.sqrt((k[d] as number) / kRef) : 1);
    const binUm = request.binUm ?? p;
    const profile = radialProfile(
      { measured: data, model: picture },
      { shape: [measured.nx, measured.ny], binWidth: binUm, centre: [cx, cy], axisScale: [p * scaleOf(kept[0]), p * scaleOf(kept[1])] },
    );
    const measuredSem = Float64Array.from(profile.fields.measured.std, (s, b) => (profile.count[b] >= 2 ? s / Math.sqrt(profile.count[b]) : NaN));
    return {
      prepared,
      measured,
      optics,
      cameraGiven: scenario.camera !== undefined,
      background,
      noise: { backgroundSigma: noise.backgroundSigma, countsPerAtom: noise.countsPerAtom, description: noise.description },
      measuredCentre: centreFit,
      modelCentre: findCloudCentre(picture, [measured.nx, measured.ny]),
      data,
      model: picture,
      residual,
      xCentresUm: Float64Array.from({ length: measured.nx }, (_, i) => grid.firstXUm + i * p),
      yCentresUm: Float64Array.from({ length: measured.ny }, (_, i) => grid.firstYUm + i * p),
      internalPerScenarioUnit,
      parameters,
      fit: {
        chiSquare: fit.chiSquare,
        reducedChiSquare: fit.reducedChiSquare,
        degreesOfFreedom: fit.degreesOfFreedom,
        iterations: fit.iterations,
        converged: fit.converged,
        message: fit.message,
        covariance,
        solves: model.evaluations,
        interpolated: model.interpolations,
        sweeps: model.sweeps,
        weightPasses: passes,
      },
      best,
      atomsInPicture,
      profile,
      measuredSem,
      binUm,
      axisNames: [['x', 'y', 'z'][kept[0]], ['x', 'y', 'z'][kept[1]]],
    };
  } finally {
    if (pool) await pool.destroy();
  }
}

// The fit behind `tiercake compare` (DESIGN.md section 4), in memory: a measured camera
// picture against the scenario's picture, fitting any subset of the atom number (or the
// chemical potential), the temperature (or the entropy per atom), a factor on the trap
// frequencies, the trap centre on the pixel grid, the turn of the lattice against the camera,
// the PSF width and a flat background offset (compareFitParameters.ts), within bounds.
//
// 1. The measured picture (src/imaging/measuredImage.ts: atoms per pixel on the model's grid,
//    a mask of usable pixels, its noise) has its background (median of the border pixels,
//    compareFitNoise.ts) subtracted, shot by shot for a stack; its cloud centre is found by
//    the iterated windowed centroid (src/observables/cloudCentre.ts) and starts the trap centre.
// 2. The model picture is rendered on exactly the measured pixel grid (compareFitPicture.ts)
//    with the scenario's camera section and the measured pixel size.
// 3. Weighted least squares (Levenberg-Marquardt, src/numerics/leastSquaresFit.ts, replayed
//    for an asynchronous model: compareFitReplay.ts) over the used pixels, weights from
//    compareFitNoise.ts, repeated with weights from the previous best model (iteratively
//    reweighted least squares) until the parameters move by less than a tenth of their
//    uncertainty. Every physics evaluation is one warm-started lattice solve of the one
//    resolved scenario on one sweep pool (compareFitModel.ts).
// 4. Reported rows and their covariance (compareFitParameters.ts). The uncertainty is
//    scaled by sqrt(chi^2_nu) when chi^2_nu > 1 (PDG scale-factor convention), with
//    chi^2_nu counted on the pixels where the model or the data stand above the noise:
//    pixels far outside the cloud add degrees of freedom without chi-square and would make
//    any fit look good. The degrees of freedom are reported with it.
// 5. For a stack of shots: per-shot estimates and a bootstrap over the shots, linearised
//    about this fit (compareFitBootstrap.ts).
// Returns plain data; the physics read off the pictures is in compareEquationOfState.ts and
// compareThermometry.ts, the files are written by src/output/compareOutputs.ts.

import { fitAtBoundWarnings } from './fitAtBound.js';
import { chiSquareWarnings } from './compareFitGoodness.js';
import { findCloudCentre, type CloudCentre } from '../observables/cloudCentre.js';
import type { CameraOptics } from '../imaging/cameraOptics.js';
import type { MeasuredImage } from '../imaging/measuredImage.js';
import type { CameraWarning } from '../imaging/camera/pixelImage.js';
import { givenFrameJacobian, toGivenFrame, type FrameMap } from '../imaging/camera/frameOrientation.js';
import { maxInteraction, maxHopping } from '../lattice/latticeModel.js';
import { createSweepPool, type SweepPool } from '../solver/sweepExecutor.js';
import { energyParser } from '../scenario/resolveScenario.js';
import { defaultCameraSettings } from '../scenario/imagingSchema.js';
import type { LeastSquaresOptions } from '../numerics/leastSquaresFit.js';
import { scenarioOptics, type PreparedScenario } from './prepareScenario.js';
import { threadsFor, type WorkerModule } from './solveScenario.js';
import { createFitModel, type FitSolution } from './compareFitModel.js';
import { pixelNoiseModel, signalChiSquare, varianceNoiseModel } from './compareFitNoise.js';
import { fitData } from './compareFitData.js';
import { replayLeastSquaresFit, type ReplayedFit } from './compareFitReplay.js';
import { createPictureRenderer, type PictureParameters } from './compareFitPicture.js';
import { compareProfile, type CompareProfile } from './compareFitProfile.js';
import { componentStd, linearisedShots } from './compareFitBootstrap.js';
import { reportedUnit, selectFitParameters, type FitParameterName, type FitParameterRequest, type FitParameterRow, type FitSlot, type ReportedName } from './compareFitParameters.js';
import { pixelCentresUm } from '../imaging/pixelPicture.js';

export type { FitParameterName, FitParameterRequest, FitParameterRow } from './compareFitParameters.js';

export interface CompareFitRequest {
  prepared: PreparedScenario;
  /** the measured picture, oriented, in atoms per pixel (for a stack: the mean of the shots) */
  measured: MeasuredImage;
  fit: readonly (FitParameterName | FitParameterRequest)[];
  /** a fixed trap centre, grid pixel index (x, y up); default: fitted */
  fixedCentre?: { x: number; y: number };
  /** Levenberg-Marquardt steps at most, per weighting pass */
  maxIterations: number;
  /** radial bin width in the picture's length unit (default one pixel) */
  binUm?: number;
  threads: number;
  /** worker module of the sweep pool (tests) */
  workerModule?: WorkerModule;
  /** oriented frame -> frame as given (default: the measured grid is the given frame) */
  frameMap?: FrameMap;
  /** pixels the reduced chi-square counts: where model or data stand above the noise (default), or all used pixels */
  chiSquarePixels?: 'signal' | 'all';
  /** the shots of a stack, grid layout, atoms per pixel, same mask as `measured` */
  shots?: readonly Float64Array[];
  /** bootstrap resamples of the shots (default 200 for a stack) */
  bootstrapReplicates?: number;
  bootstrapSeed?: string;
  /** after each new lattice solve */
  onSolve?: (progress: { evaluation: number; atoms: number; kT: number | null; converged: boolean }) => void;
  /** a stage of the fit begins */
  onStage?: (text: string) => void;
}

export interface CompareFit {
  prepared: PreparedScenario;
  measured: MeasuredImage;
  /** optics with the measured pixel size (PSF of the scenario; the fitted PSF is in `picture`) */
  optics: CameraOptics;
  cameraGiven: boolean;
  /** background subtracted (mean over the shots of their border medians), atoms per pixel */
  background: number;
  noise: { backgroundSigma: number; countsPerAtom: number | null; description: string };
  measuredCentre: CloudCentre;
  modelCentre: CloudCentre;
  /** background-subtracted data (NaN where masked), model at the best fit, residual = data - model; grid layout */
  data: Float64Array;
  model: Float64Array;
  residual: Float64Array;
  /** standard deviation per pixel of the last weighting pass */
  sigma: Float64Array;
  /** pixels the reduced chi-square counts (grid layout) */
  chiSquareMask: Uint8Array;
  /** pixel-centre coordinates with the fitted trap centre at 0 */
  xCentresUm: Float64Array;
  yCentresUm: Float64Array;
  /** internal energy of one scenario energy unit; the unit's name */
  internalPerScenarioUnit: number;
  energyUnit: string;
  parameters: FitParameterRow[];
  /** the picture parameters at the best fit (fixed ones included) */
  picture: PictureParameters;
  centre: {
    /** grid pixel index (x, y up) on the oriented frame */
    grid: [number, number];
    /** pixels of the frame as given, x = column, y = row from the top */
    givenFrame: [number, number];
    /** covariance of givenFrame (2 x 2, row-major), scaled as the uncertainties; NaN when the centre is fixed */
    givenFrameCovariance: [number, number, number, number];
    fitted: boolean;
  };
  fit: {
    /** over the pixels of chiSquareMask */
    chiSquare: number;
    reducedChiSquare: number;
    degreesOfFreedom: number;
    chiSquarePixels: 'signal' | 'all';
    /** over every used pixel (what the least-squares fit minimised) */
    allPixels: { chiSquare: number; reducedChiSquare: number; degreesOfFreedom: number; pixels: number };
    iterations: number;
    converged: boolean;
    message: string;
    /** covariance of the reported parameters (rows as `parameters`), row-major, scaled as `uncertainty` */
    covariance: Float64Array;
    solves: number;
    interpolated: number;
    sweeps: number;
    weightPasses: Array<{ weights: string; best: number[]; reducedChiSquare: number; solvesSoFar: number }>;
  };
  /** the solve at the best fit */
  best: FitSolution;
  atomsInPicture: number;
  profile: CompareProfile;
  binUm: number;
  /** names of the two image axes */
  axisNames: [string, string];
  warnings: CameraWarning[];
  /** for a stack: linearised per-shot estimates and the bootstrap */
  shots: {
    count: number;
    replicates: number;
    seed: string;
    method: string;
    /** reported values per shot (rows as `parameters`), and each shot's atoms in the used pixels */
    perShot: Array<{ values: number[]; imageAtoms: number }>;
  } | null;
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

/** The finite-difference step leastSquaresFit takes for parameter j at p (inward at an upper bound). */
function stepOf(p: Float64Array, j: number, upper: readonly number[], relativeStep: number): number {
  const h = relativeStep * (p[j] !== 0 ? Math.abs(p[j]) : 1);
  return p[j] + h > upper[j] ? -h : h;
}

const deg = 180 / Math.PI;

export async function runCompareFit(request: CompareFitRequest): Promise<CompareFit> {
  const { prepared, measured } = request;
  const { scenario, resolved } = prepared;
  const selection = selectFitParameters(request.fit);
  const fitsMu = selection.atoms || selection.mu;
  const fitsKT = selection.temperature || selection.entropy;
  const camera = scenario.camera ?? defaultCameraSettings();
  const optics: CameraOptics = { ...scenarioOptics(resolved, camera), pixelUm: measured.pixelUm };
  const { nx, ny, mask } = measured;
  const p = measured.pixelUm;
  const warnings: CameraWarning[] = [];

  // Used pixels and the background-subtracted data (compareFitData.ts).
  const stack = request.shots !== undefined && request.shots.length >= 2 ? request.shots : null;
  // With the offset fitted, the background is that parameter (started at the border median), not subtracted first.
  const subtract = !selection.offset;
  const { usedIndex, data, dataUsed, background, borderLevel, shotData, shotAtoms } = fitData(measured, stack, subtract);
  const filled = Float64Array.from(data, (v) => (Number.isFinite(v) ? v : 0));
  const centreFit = findCloudCentre(subtract ? filled : Float64Array.from(filled, (v, q) => (mask[q] !== 0 ? v - borderLevel : 0)), [nx, ny]);
  const noise =
    measured.variance !== null
      ? varianceNoiseModel({ values: filled, nx, ny }, subtract ? 0 : borderLevel, measured.variance, mask)
      : pixelNoiseModel({ values: filled, nx, ny }, subtract ? 0 : borderLevel, measured.countsPerAtom as number, mask);
  const used = (full: Float64Array): Float64Array => {
    const out = new Float64Array(usedIndex.length);
    for (let u = 0; u < out.length; u++) out[u] = full[usedIndex[u]];
    return out;
  };

  // Units and starting values.
  const internalPerScenarioUnit = energyParser(scenario, resolved.units)(1, 'temperature.kT');
  const energyUnit = scenario.energyUnit ?? (resolved.mode === 'hubbard' ? 'J' : 'Hz');
  const uInScenarioUnit = resolved.units.interaction / internalPerScenarioUnit;
  const kTStart =
    resolved.thermal.kind === 'temperature' && resolved.thermal.kT > 0 ? resolved.thermal.kT / internalPerScenarioUnit : 0.1 * uInScenarioUnit;
  const capacity = resolved.geometry.siteCount * scenario.truncation.nmax;
  let atomsStart = dataUsed.reduce((s, v) => s + v, 0) - (subtract ? 0 : borderLevel * dataUsed.length);
  if (!(atomsStart > 0)) atomsStart = scenario.particles.atoms ?? 1;
  atomsStart = Math.min(atomsStart, 0.99 * capacity);

  const threads = threadsFor(resolved.geometry.siteCount, request.threads);
  const pool: SweepPool | null = threads > 1 ? createSweepPool({ workers: threads - 1, ...(request.workerModule ?? {}) }) : null;
  try {
    const model = createFitModel(
      resolved,
      { fitsAtoms: fitsMu, fitsTemperature: fitsKT, fitsTrap: selection.trap, internalPerScenarioUnit },
      {
        threads,
        pool,
        onSolve: (s, evaluation) =>
          request.onSolve?.({ evaluation, atoms: s.atoms, kT: fitsKT ? s.kTInternal / internalPerScenarioUnit : null, converged: s.converged }),
      },
    );
    const bounds = selection.bounds;
    const within = (slot: FitSlot): FitSlot => ({ ...slot, start: Math.min(slot.upper, Math.max(slot.lower, slot.start)) });
    const slots: FitSlot[] = [];
    let atomsAtStart = atomsStart;
    request.onStage?.('starting solve at the image atom number');
    if (fitsMu) {
      const start = await model.startAtAtoms(atomsStart, fitsKT ? kTStart : null);
      atomsAtStart = start.solution.atoms;
      const uMax = maxInteraction(resolved.model);
      const zJ = 2 * resolved.geometry.dims * maxHopping(resolved.model);
      let lower = 1e-9 * uMax;
      let upper = zJ + scenario.truncation.nmax * uMax;
      if (selection.atoms && bounds.atoms !== undefined) {
        // Atom-number bounds become chemical-potential bounds by a fixed-N solve at each.
        if (bounds.atoms.lower !== undefined) lower = Math.max(lower, (await model.startAtAtoms(Math.min(bounds.atoms.lower, 0.99 * capacity), fitsKT ? kTStart : null)).physics[0]);
        if (bounds.atoms.upper !== undefined) upper = Math.min(upper, (await model.startAtAtoms(Math.min(bounds.atoms.upper, 0.99 * capacity), fitsKT ? kTStart : null)).physics[0]);
      }
      if (selection.mu && bounds.mu !== undefined) {
        if (bounds.mu.lower !== undefined) lower = Math.max(lower, bounds.mu.lower * internalPerScenarioUnit - model.muFloor);
        if (bounds.mu.upper !== undefined) upper = Math.min(upper, bounds.mu.upper * internalPerScenarioUnit - model.muFloor);
      }
      slots.push(within({ key: 'muAbove', physics: true, reported: selection.atoms ? 'atoms' : 'mu', start: start.physics[0], lower, upper }));
    }
    if (fitsKT) {
      const b = bounds.temperature ?? {};
      slots.push(within({ key: 'kT', physics: true, reported: selection.temperature ? 'kT' : 'entropyPerAtom', start: kTStart, lower: b.lower ?? 1e-4 * uInScenarioUnit, upper: b.upper ?? 20 * uInScenarioUnit }));
    }
    if (selection.trap) {
      const b = bounds.trap ?? {};
      slots.push(within({ key: 'trapFactor', physics: true, reported: 'trapFrequencyFactor', start: 1, lower: b.lower ?? 0.2, upper: b.upper ?? 5 }));
    }
    const physicsCount = slots.length;
    const centreFitted = request.fixedCentre === undefined;
    if (centreFitted) {
      slots.push({ key: 'centreX', physics: false, reported: 'centreXPixels', start: centreFit.centre[0], lower: 0, upper: nx - 1 });
      slots.push({ key: 'centreY', physics: false, reported: 'centreYPixels', start: centreFit.centre[1], lower: 0, upper: ny - 1 });
    }
    if (selection.angle) {
      const b = bounds.angle ?? {};
      slots.push(within({ key: 'angle', physics: false, reported: 'angleDeg', start: 0, lower: (b.lower ?? -45) / deg, upper: (b.upper ?? 45) / deg }));
    }
    if (selection.psf) {
      const b = bounds.psf ?? {};
      const start = Math.max(optics.psfSigmaUm, 0.5 * p);
      slots.push(within({ key: 'psf', physics: false, reported: 'psfSigma', start, lower: b.lower ?? 0.05 * p, upper: b.upper ?? Math.max(10 * start, 10 * p) }));
    }
    if (selection.offset) {
      let largest = 0;
      for (const v of dataUsed) largest = Math.max(largest, Math.abs(v));
      const b = bounds.offset ?? {};
      slots.push(within({ key: 'offset', physics: false, reported: 'offset', start: borderLevel, lower: b.lower ?? -largest, upper: b.upper ?? largest }));
    }
    const nPar = slots.length;
    const slotOf = (key: FitSlot['key']): number => slots.findIndex((s) => s.key === key);
    const at = { cx: slotOf('centreX'), cy: slotOf('centreY'), angle: slotOf('angle'), psf: slotOf('psf'), offset: slotOf('offset') };
    const pictureOf = (v: ArrayLike<number>): PictureParameters => ({
      centreX: at.cx >= 0 ? v[at.cx] : (request.fixedCentre as { x: number }).x,
      centreY: at.cy >= 0 ? v[at.cy] : (request.fixedCentre as { y: number }).y,
      angleRad: at.angle >= 0 ? v[at.angle] : 0,
      psfSigmaUm: at.psf >= 0 ? v[at.psf] : optics.psfSigmaUm,
      offset: at.offset >= 0 ? v[at.offset] : 0,
    });
    const renderer = createPictureRenderer(resolved.geometry.shape, optics, nx, ny, selection.angle);
    const render = (s: FitSolution, v: ArrayLike<number>): Float64Array => renderer.render(s.density, pictureOf(v));
    const evaluate = async (params: Float64Array): Promise<Float64Array> => used(render(await model.solveAt(params.subarray(0, physicsCount)), params));
    const evaluateNow = (params: Float64Array): Float64Array | undefined => {
      const s = model.peek(params.subarray(0, physicsCount));
      return s === undefined ? undefined : used(render(s, params));
    };

    // Pass 1 weights: per pixel the larger of the estimate from the smoothed data and the
    // one from the model at the starting values (a solve the fit needs anyway); later passes
    // from the previous best model until the parameters move by less than a tenth of their
    // uncertainty.
    const initial = slots.map((s) => s.start);
    const lower = slots.map((s) => s.lower);
    const upper = slots.map((s) => s.upper);
    let fit: ReplayedFit | undefined;
    let best: FitSolution | undefined;
    let picture: Float64Array = new Float64Array(0);
    const passes: CompareFit['fit']['weightPasses'] = [];
    let start = initial;
    const startSolution = await model.solveAt(Float64Array.from(initial.slice(0, physicsCount)));
    const startSigma = noise.fromModel(render(startSolution, initial));
    let sigmaFull: Float64Array = Float64Array.from(noise.sigma, (s, i) => Math.max(s, startSigma[i]));
    const options = lmOptions(request.maxIterations);
    for (let pass = 1; ; pass++) {
      request.onStage?.(`weighted fit, pass ${pass}`);
      const current = await replayLeastSquaresFit({ model: evaluate, modelSync: evaluateNow, data: dataUsed, sigma: used(sigmaFull), initial: start, lower, upper }, options);
      fit = current;
      best = await model.solveAt(current.best.subarray(0, physicsCount), true);
      picture = render(best, current.best);
      const reported = Array.from(current.best);
      if (selection.atoms) reported[0] = best.atoms;
      passes.push({ weights: pass === 1 ? 'larger of smoothed data and model at the start' : 'previous best model', best: reported, reducedChiSquare: current.reducedChiSquare, solvesSoFar: model.evaluations });
      const moved = current.best.some((v, j) => Math.abs(v - start[j]) > 0.1 * (Number.isFinite(current.uncertaintyFromSigma[j]) ? current.uncertaintyFromSigma[j] : 0));
      const reweighted = noise.fromModel(picture);
      const sameWeights = reweighted === sigmaFull || noise.countsPerAtom === null;
      if (pass >= maxWeightPasses || (pass > 1 && !moved) || sameWeights) break;
      sigmaFull = reweighted;
      start = Array.from(current.best);
    }
    if (fit === undefined || best === undefined) throw new Error('runCompareFit: no fit was run');
    const pBest = fit.best;

    // The model's Jacobian at the optimum (the points the fit's covariance was taken at, answered from the cache).
    const f0 = fit.valueAt(pBest) ?? used(picture);
    const columns: Float64Array[] = [];
    for (let j = 0; j < nPar; j++) {
      const stepped = Float64Array.from(pBest);
      const h = stepOf(pBest, j, upper, options.relativeStep as number);
      stepped[j] += h;
      const f = fit.valueAt(stepped) ?? (await evaluate(stepped));
      const column = new Float64Array(f.length);
      for (let i = 0; i < f.length; i++) column[i] = (f[i] - f0[i]) / h;
      columns.push(column);
    }

    // Reported rows: r(p) and its Jacobian A (compareFitParameters.ts).
    const derived = new Map<ReportedName, number[]>();
    if (selection.atoms || selection.entropy) {
      const dN: number[] = [];
      const dS: number[] = [];
      for (let j = 0; j < physicsCount; j++) {
        const stepped = Float64Array.from(pBest.subarray(0, physicsCount));
        const h = stepOf(pBest, j, upper, options.relativeStep as number);
        stepped[j] += h;
        const other = await model.solveAt(stepped);
        dN.push((other.atoms - best.atoms) / h);
        dS.push((other.entropyPerAtom - best.entropyPerAtom) / h);
      }
      derived.set('atoms', dN);
      derived.set('entropyPerAtom', dS);
    }
    const map = request.frameMap;
    const givenOf = (x: number, y: number): { x: number; y: number } => (map !== undefined ? toGivenFrame(map, x, ny - 1 - y) : { x, y: ny - 1 - y });
    // d(given x, given y) / d(grid x, grid y): the frame map's linear part times the row flip.
    const g = map !== undefined ? givenFrameJacobian(map) : [1, 0, 0, 1];
    const gridToGiven = [g[0], -g[1], g[2], -g[3]];
    const A = new Float64Array(nPar * nPar);
    const values = new Float64Array(nPar);
    const startValues = new Float64Array(nPar);
    const centre = pictureOf(pBest);
    const givenCentre = givenOf(centre.centreX, centre.centreY);
    const givenStart = givenOf(pictureOf(initial).centreX, pictureOf(initial).centreY);
    slots.forEach((slot, j) => {
      const v = pBest[j];
      switch (slot.reported) {
        case 'atoms':
        case 'entropyPerAtom': {
          const d = derived.get(slot.reported) as number[];
          for (let k = 0; k < physicsCount; k++) A[j * nPar + k] = d[k];
          values[j] = slot.reported === 'atoms' ? best.atoms : best.entropyPerAtom;
          startValues[j] = slot.reported === 'atoms' ? atomsAtStart : startSolution.entropyPerAtom;
          break;
        }
        case 'mu':
          A[j * nPar + j] = 1 / internalPerScenarioUnit;
          values[j] = (model.muFloor + v) / internalPerScenarioUnit;
          startValues[j] = (model.muFloor + slot.start) / internalPerScenarioUnit;
          break;
        case 'centreXPixels':
        case 'centreYPixels': {
          const row = slot.reported === 'centreXPixels' ? 0 : 1;
          A[j * nPar + at.cx] = gridToGiven[2 * row];
          A[j * nPar + at.cy] = gridToGiven[2 * row + 1];
          values[j] = row === 0 ? givenCentre.x : givenCentre.y;
          startValues[j] = row === 0 ? givenStart.x : givenStart.y;
          break;
        }
        case 'angleDeg':
          A[j * nPar + j] = deg;
          values[j] = v * deg;
          startValues[j] = slot.start * deg;
          break;
        default:
          A[j * nPar + j] = 1;
          values[j] = v;
          startValues[j] = slot.start;
      }
    });
    const transform = (c: Float64Array): Float64Array => {
      const out = new Float64Array(nPar * nPar);
      for (let a = 0; a < nPar; a++) {
        for (let b = 0; b < nPar; b++) {
          let s = 0;
          for (let j = 0; j < nPar; j++) for (let k = 0; k < nPar; k++) s += A[a * nPar + j] * c[j * nPar + k] * A[b * nPar + k];
          out[a * nPar + b] = s;
        }
      }
      return out;
    };

    // Chi-square on the pixels where the model or the data stand above the noise.
    const sigmaUsed = used(sigmaFull);
    let { chiSquare: chiSignal, degreesOfFreedom, mask: chiSquareMask, pixels: signalPixels } = signalChiSquare({
      nx, ny, mask, usedIndex, data: filled, dataUsed, model: picture, modelUsed: f0, sigmaUsed, parameters: nPar, signalOnly: (request.chiSquarePixels ?? 'signal') === 'signal',
    });
    let chiSquarePixels: 'signal' | 'all' = (request.chiSquarePixels ?? 'signal') === 'signal' ? 'signal' : 'all';
    if (degreesOfFreedom < 1) {
      warnings.push({ code: 'no-signal-pixels', message: `only ${signalPixels} pixel(s) stand above the noise, too few for ${nPar} parameters; the reduced chi-square counts every used pixel` });
      chiSignal = fit.chiSquare;
      degreesOfFreedom = fit.degreesOfFreedom;
      chiSquarePixels = 'all';
      chiSquareMask = Uint8Array.from(mask, (m) => (m !== 0 ? 1 : 0));
    }
    const reducedChiSquare = chiSignal / degreesOfFreedom;
    // Uncertainties from the noise model, enlarged by sqrt(chi2_nu) only when the scatter
    // exceeds the noise model (chi2_nu > 1), the scale-factor convention of the Particle
    // Data Group (PDG Review, "Introduction: averaging and fitting").
    const errorScale = Math.max(1, Math.sqrt(reducedChiSquare));
    const covarianceFromSigma = transform(fit.covariance);
    const covariance = Float64Array.from(covarianceFromSigma, (v) => v * errorScale * errorScale);

    // Shots of a stack: linearised per-shot estimates and bootstrap.
    let shots: CompareFit['shots'] = null;
    let bootstrapStd: Float64Array | null = null;
    if (stack !== null && fit.covariance.every((v) => Number.isFinite(v))) {
      request.onStage?.(`per-shot estimates and bootstrap over ${stack.length} shots`);
      const replicates = request.bootstrapReplicates ?? 200;
      const seed = request.bootstrapSeed ?? 'compare/bootstrap';
      const linear = linearisedShots({ shots: shotData, meanData: dataUsed, columns, sigma: sigmaUsed, covariance: fit.covariance, replicates, seed });
      const mapped = (dp: Float64Array): number[] => {
        const out: number[] = [];
        for (let a = 0; a < nPar; a++) {
          let s = values[a];
          for (let k = 0; k < nPar; k++) s += A[a * nPar + k] * dp[k];
          out.push(s);
        }
        return out;
      };
      const replicateValues = linear.replicates.map((dp) => Float64Array.from(mapped(dp)));
      bootstrapStd = replicates >= 2 ? componentStd(replicateValues, nPar) : null;
      shots = {
        count: stack.length,
        replicates,
        seed,
        method:
          'linearised about the fit of the mean picture: dp = C J^T W (d_shot - d_mean) (one Gauss-Newton step); bootstrap: resamples of the shots with replacement, ' +
          'their mean shift (Efron & Tibshirani, An Introduction to the Bootstrap (1993), ch. 6)',
        perShot: linear.perShot.map((dp, s) => ({ values: mapped(dp), imageAtoms: shotAtoms[s] })),
      };
    }

    const units = { energy: energyUnit, length: optics.lengthUnit.short };
    const parameters: FitParameterRow[] = slots.map((slot, j) => {
      const fromSigma = Math.sqrt(covarianceFromSigma[j * nPar + j]);
      const bound = (x: number): number | null => {
        if (slot.reported === 'centreXPixels' || slot.reported === 'centreYPixels' || slot.reported === 'atoms' || slot.reported === 'entropyPerAtom') return null;
        if (slot.reported === 'mu') return (model.muFloor + x) / internalPerScenarioUnit;
        return slot.reported === 'angleDeg' ? x * deg : x;
      };
      return {
        name: slot.reported,
        unit: reportedUnit(slot.reported, units.energy, units.length),
        start: startValues[j],
        best: values[j],
        uncertainty: fromSigma * errorScale,
        uncertaintyFromSigma: fromSigma,
        uncertaintyScaledByReducedChiSquare: fromSigma * Math.sqrt(reducedChiSquare),
        bootstrapUncertainty: bootstrapStd !== null ? bootstrapStd[j] : null,
        lower: bound(slot.lower),
        upper: bound(slot.upper),
        atBound: fit.atBound[j],
      };
    });
    warnings.push(...fitAtBoundWarnings(parameters));
    warnings.push(...chiSquareWarnings(reducedChiSquare, degreesOfFreedom));
    if (!fit.converged) warnings.push({ code: 'fit-not-converged', message: `the fit stopped before convergence (${fit.message}); raise --max-iterations` });
    if (!best.converged) warnings.push({ code: 'solve-not-converged', message: 'the solve at the best-fit values did not converge; the fit must not be trusted' });

    const residual = new Float64Array(nx * ny).fill(NaN);
    let atomsInPicture = 0;
    for (let q = 0; q < picture.length; q++) {
      atomsInPicture += picture[q];
      if (mask[q] !== 0) residual[q] = data[q] - picture[q];
    }
    const grid = renderer.gridAt(centre.centreX, centre.centreY);

    // Radial profiles of both on the same bins about the fitted centre, trap-scaled, with the model's band.
    const kept = optics.keptAxes;
    const k = resolved.trapCoefficient.map((c) => c * best.trapFactor * best.trapFactor);
    const kRef = k[kept[0]] ?? 0;
    const scaleOf = (d: number): number => (kRef > 0 && (k[d] ?? 0) > 0 ? Math.sqrt((k[d] as number) / kRef) : 1);
    const binUm = request.binUm ?? p;
    const profile = compareProfile({
      nx,
      ny,
      data,
      model: picture,
      sigma: sigmaFull,
      mask,
      centreX: centre.centreX,
      centreY: centre.centreY,
      angleRad: centre.angleRad,
      scaleU: p * scaleOf(kept[0]),
      scaleV: p * scaleOf(kept[1]),
      binWidth: binUm,
      jacobian: { usedIndex, columns, covariance: Float64Array.from(fit.covariance, (v) => v * errorScale * errorScale) },
    });

    const centreCovariance: [number, number, number, number] = [NaN, NaN, NaN, NaN];
    const ix = parameters.findIndex((r) => r.name === 'centreXPixels');
    const iy = parameters.findIndex((r) => r.name === 'centreYPixels');
    if (ix >= 0 && iy >= 0) {
      centreCovariance[0] = covariance[ix * nPar + ix];
      centreCovariance[1] = covariance[ix * nPar + iy];
      centreCovariance[2] = covariance[iy * nPar + ix];
      centreCovariance[3] = covariance[iy * nPar + iy];
    }
    return {
      prepared,
      measured,
      optics,
      cameraGiven: scenario.camera !== undefined,
      background,
      noise: { backgroundSigma: noise.backgroundSigma, countsPerAtom: noise.countsPerAtom, description: noise.description },
      measuredCentre: centreFit,
      modelCentre: findCloudCentre(picture, [nx, ny]),
      data,
      model: picture,
      residual,
      sigma: sigmaFull,
      chiSquareMask,
      xCentresUm: pixelCentresUm(grid.firstXUm, nx, p),
      yCentresUm: pixelCentresUm(grid.firstYUm, ny, p),
      internalPerScenarioUnit,
      energyUnit,
      parameters,
      picture: centre,
      centre: { grid: [centre.centreX, centre.centreY], givenFrame: [givenCentre.x, givenCentre.y], givenFrameCovariance: centreCovariance, fitted: centreFitted },
      fit: {
        chiSquare: chiSignal,
        reducedChiSquare,
        degreesOfFreedom,
        chiSquarePixels,
        allPixels: { chiSquare: fit.chiSquare, reducedChiSquare: fit.reducedChiSquare, degreesOfFreedom: fit.degreesOfFreedom, pixels: usedIndex.length },
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
      binUm,
      axisNames: [['x', 'y', 'z'][kept[0]] as string, ['x', 'y', 'z'][kept[1]] as string],
      warnings,
      shots,
    };
  } finally {
    if (pool) await pool.destroy();
  }
}

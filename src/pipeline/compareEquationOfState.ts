// The equation of state read off the measured picture in the local density approximation
// (T.-L. Ho and Q. Zhou, "Obtaining the phase diagram and thermodynamic quantities of bulk
// systems from the densities of trapped gases", Nature Phys. 6, 131 (2010)): every point of
// the trapped cloud is a piece of homogeneous lattice gas at mu_local = mu0 - V(r), with mu0
// and T from the fit and V = f^2 k_ref r^2 the scenario's harmonic trap (times the fitted
// frequency factor f) in the trap-scaled radius r = sqrt(sum_d (k_d / k_ref) x_d^2), in sites.
//
// - A 2D layer imaged face on: the azimuthal average of the column density in r is the
//   density per site n(mu_local) directly.
// - A 3D cloud: the column density is the Abel projection of the density in scaled
//   coordinates divided by s = sqrt(k_los / k_ref) (line-of-sight axis), so
//   n = s * inverseAbel(column) by onion peeling on the bins of the average (Dasch, Appl.
//   Opt. 31, 1146 (1992); src/imaging/camera/abelInversion.ts), with its noise propagated.
// - Pressure by Gibbs-Duhem at fixed T, dP = n dmu, integrated in from the cloud edge
//   (src/imaging/camera/localDensityEquationOfState.ts).
// Beside the measured points: the homogeneous mean-field density n(mu) of the scenario's
// lattice (src/solver/homogeneous.ts) at the fitted temperature, zJ = 2 sum_d J_d and U at
// the trap centre, and the same analysis of the model picture at the best fit, which shows
// what imaging (PSF, pixels, bins) and the trap (proximity, finite size) do to the LDA
// without any noise. Energies in the scenario's energy unit; densities per site (and per
// µm^2 or µm^3 in laboratory mode).
//
// Errors: the bin mean's error from the noise model, sqrt(sum_i sigma_i^2) / P_b
// (compareFitProfile.ts), converted to atoms per site and (3D) propagated through the
// inversion. The chi-square of the measured points about the homogeneous curve is given with
// the number of points, as a consistency check of the LDA reading.

import { azimuthalAverage } from '../imaging/camera/azimuthalAverage.js';
import { inverseAbelOnionPeeling } from '../imaging/camera/abelInversion.js';
import { localDensityEquationOfState } from '../imaging/camera/localDensityEquationOfState.js';
import { planarMaskToCamera, planarToCamera } from '../imaging/cameraConvention.js';
import { solveHomogeneous } from '../solver/homogeneous.js';
import { createSiteWorkspace } from '../solver/site/index.js';
import type { CompareFit } from './compareFit.js';

export interface EquationOfStateOptions {
  /** Bin width of the average in trap-scaled lattice sites; default 1. */
  binSites?: number;
  /** Points of the homogeneous curve; default 200. */
  curvePoints?: number;
}

export interface EquationOfStateResult {
  available: true;
  kind: 'layer' | 'abel';
  method: string;
  binSites: number;
  /** Trap-scaled radius of each bin, sites. */
  radiusSites: Float64Array;
  /** mu0 - V(r), scenario energy unit. */
  localChemicalPotential: Float64Array;
  measuredDensity: Float64Array;
  measuredDensityError: Float64Array;
  /** The model picture at the best fit, analysed the same way. */
  modelDensity: Float64Array;
  /** Homogeneous mean-field n at each mu_local and the fitted T. */
  homogeneousDensity: Float64Array;
  /** Gibbs-Duhem pressure from the measured points, scenario energy unit per site (2D: per site area; 3D: per site volume). */
  pressure: Float64Array;
  curve: { mu: Float64Array; density: Float64Array };
  /** chi^2 of the measured points about the homogeneous curve, and their number. */
  chiSquare: number;
  points: number;
  centralChemicalPotential: number;
  kT: number;
  energyUnit: string;
  /** Lattice spacing, µm (laboratory mode), to turn densities per site into per µm^d. */
  latticeSpacingUm: number | null;
  dimensions: 2 | 3;
}

export type EquationOfStateReading = EquationOfStateResult | { available: false; reason: string };

const hoppingOf = (h: number | Float64Array): number => {
  if (typeof h === 'number') return h;
  let m = 0;
  for (let i = 0; i < h.length; i++) if (h[i] > m) m = h[i];
  return m;
};

export function equationOfState(c: CompareFit, options: EquationOfStateOptions = {}): EquationOfStateReading {
  const { resolved } = c.prepared;
  const dims = resolved.geometry.dims;
  const optics = c.optics;
  if (dims === 1) return { available: false, reason: 'a chain has no azimuthal average; the equation of state is read from 2D layers and 3D clouds' };
  if (dims === 2 && optics.axis !== 2) return { available: false, reason: 'a 2D layer seen from the side is not an image of its density; image it along z' };
  const factor2 = c.best.trapFactor * c.best.trapFactor;
  const k = resolved.trapCoefficient.map((v) => v * factor2);
  const kept = optics.keptAxes;
  const kRef = k[kept[0]] ?? 0;
  if (!(kRef > 0) || !((k[kept[1]] ?? 0) > 0)) return { available: false, reason: 'the scenario has no harmonic trap in the image plane, so the radius does not give the local chemical potential' };
  const los = optics.axis;
  if (dims === 3 && !((k[los] ?? 0) > 0)) return { available: false, reason: 'the Abel inversion needs a harmonic trap along the line of sight' };
  const binSites = options.binSites ?? 1;
  const { nx, ny } = c.measured;
  const p = c.measured.pixelUm;
  const cell = optics.cellUm;
  const pixelSites = p / cell;
  const perSite = (cell / p) * (cell / p); // atoms per pixel -> atoms per site area
  const camera = (values: Float64Array) => planarToCamera({ values, nx, ny });
  const average = {
    centreX: c.picture.centreX,
    centreY: ny - 1 - c.picture.centreY,
    binWidth: binSites,
    scaleU: pixelSites * Math.sqrt((k[kept[0]] as number) / kRef),
    scaleV: pixelSites * Math.sqrt((k[kept[1]] as number) / kRef),
    ellipseAngleDeg: (-c.picture.angleRad * 180) / Math.PI,
    mask: planarMaskToCamera(c.measured.mask, nx, ny),
  };
  const measured = azimuthalAverage(camera(c.data), { ...average, variance: camera(Float64Array.from(c.sigma, (s) => s * s)).values });
  // Bins that hold no pixel (near the centre, for bins narrower than a pixel) are merged
  // into the next one: its shell then starts where the last kept one ends.
  const usedBins: number[] = [];
  const edges: number[] = [0];
  for (let b = 0; b < measured.pixelCount.length; b++) {
    if (!(measured.pixelCount[b] > 0) || !Number.isFinite(measured.mean[b])) continue;
    usedBins.push(b);
    edges.push((b + 1) * binSites);
  }
  const bins = usedBins.length;
  if (bins < 3) return { available: false, reason: `only ${bins} radial bin(s) of ${binSites} site(s) hold pixels; a profile needs at least 3` };
  const model = azimuthalAverage(camera(c.model), { ...average, binCount: measured.pixelCount.length });
  const radius = Float64Array.from(usedBins, (b) => measured.meanRadius[b]);
  const column = Float64Array.from(usedBins, (b) => measured.mean[b] * perSite);
  const columnError = Float64Array.from(usedBins, (b) => Math.sqrt((measured.meanVariance as Float64Array)[b] / measured.pixelCount[b]) * perSite);
  const modelColumn = Float64Array.from(usedBins, (b) => model.mean[b] * perSite);
  let density: Float64Array;
  let densityError: Float64Array;
  let modelDensity: Float64Array;
  if (dims === 2) {
    density = column;
    densityError = columnError;
    modelDensity = modelColumn;
  } else {
    const shellEdges = Float64Array.from(edges);
    const s = Math.sqrt((k[los] as number) / kRef);
    const inverted = inverseAbelOnionPeeling({ projection: column, sampleRadii: radius, shellEdges, projectionStd: columnError });
    const invertedModel = inverseAbelOnionPeeling({ projection: modelColumn, sampleRadii: radius, shellEdges });
    density = Float64Array.from(inverted.density, (v) => v * s);
    densityError = Float64Array.from(inverted.densityStd, (v) => v * s);
    modelDensity = Float64Array.from(invertedModel.density, (v) => v * s);
  }
  const ips = c.internalPerScenarioUnit;
  const mu0 = c.best.muInternal;
  const kT = c.best.kTInternal;
  const lda = localDensityEquationOfState({ radiusUm: radius, density, densityStd: densityError, harmonicHzPerUm2: kRef, centralChemicalPotentialHz: mu0 });
  // The homogeneous reference: the scenario's lattice, U at the trap centre, bulk zJ.
  const u = resolved.model.interactionU;
  let interactionU: number;
  if (typeof u === 'number') interactionU = u;
  else {
    let nearest = 0;
    let best = Infinity;
    const trap = resolved.trapCentre;
    const shape = resolved.geometry.shape;
    for (let i = 0; i < u.length; i++) {
      let rem = i;
      let d2 = 0;
      for (let d = shape.length - 1; d >= 0; d--) {
        const x = rem % shape[d];
        rem = Math.floor(rem / shape[d]);
        const dx = x - (trap[d] ?? 0);
        d2 += dx * dx;
      }
      if (d2 < best) {
        best = d2;
        nearest = i;
      }
    }
    interactionU = u[nearest];
  }
  const zJ = 2 * resolved.model.hopping.reduce((sum: number, h) => sum + hoppingOf(h), 0);
  const nmax = Math.max(c.best.nmax, resolved.scenario.truncation.nmax);
  const ws = createSiteWorkspace(nmax);
  const homogeneousAt = (mu: number): number => solveHomogeneous({ zJ, interactionU, mu, temperature: kT, nmax }, ws).density;
  const homogeneousDensity = Float64Array.from(lda.localChemicalPotentialHz, homogeneousAt);
  let chiSquare = 0;
  let points = 0;
  for (let b = 0; b < bins; b++) {
    const e = densityError[b];
    if (!(e > 0) || !Number.isFinite(density[b])) continue;
    chiSquare += ((density[b] - homogeneousDensity[b]) / e) ** 2;
    points++;
  }
  const curvePoints = options.curvePoints ?? 200;
  const muLow = lda.localChemicalPotentialHz[bins - 1];
  const curveMu = Float64Array.from({ length: curvePoints }, (_, i) => muLow + ((mu0 - muLow) * i) / (curvePoints - 1));
  const curveDensity = Float64Array.from(curveMu, homogeneousAt);
  return {
    available: true,
    kind: dims === 2 ? 'layer' : 'abel',
    method:
      (dims === 2
        ? 'azimuthal average of the layer density in the trap-scaled radius'
        : 'azimuthal average of the column density, inverse Abel transform by onion peeling (Dasch, Appl. Opt. 31, 1146 (1992))') +
      '; local density approximation mu_local = mu0 - V(r) (Ho & Zhou, Nature Phys. 6, 131 (2010)); homogeneous Gutzwiller mean field at the fitted T beside it',
    binSites,
    radiusSites: radius,
    localChemicalPotential: Float64Array.from(lda.localChemicalPotentialHz, (v) => v / ips),
    measuredDensity: density,
    measuredDensityError: densityError,
    modelDensity,
    homogeneousDensity,
    pressure: Float64Array.from(lda.pressureHz, (v) => v / ips),
    curve: { mu: Float64Array.from(curveMu, (v) => v / ips), density: curveDensity },
    chiSquare,
    points,
    centralChemicalPotential: mu0 / ips,
    kT: kT / ips,
    energyUnit: c.energyUnit,
    latticeSpacingUm: resolved.latticeSpacingUm,
    dimensions: dims === 2 ? 2 : 3,
  };
}

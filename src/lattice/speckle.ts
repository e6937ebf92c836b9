// Optical speckle potential on a 1D, 2D or 3D lattice.
//
// Physics (Goodman, Speckle Phenomena in Optics, 2007): light scattered by a diffuser
// fills the pupil of a lens of numerical aperture NA with a random phase; in the focal
// region the field is a sum of very many plane waves with independent random complex
// amplitudes, i.e. a circular complex Gaussian field whose angular spectrum is the
// pupil: transverse wave vectors q with |q| <= kmax = 2 pi NA / lambda. The intensity
// I = |E|^2 is then exponentially distributed, P(I) = exp(-I/<I>)/<I> (standard
// deviation = mean), and its transverse autocorrelation is 1 + |2 J1(kmax d)/(kmax d)|^2.
// A dipole potential is proportional to I (Grimm, Weidemueller & Ovchinnikov, Adv. At.
// Mol. Opt. Phys. 42, 95 (2000)): blue detuning repels (eps >= 0), red attracts (eps <= 0).
//
// Construction (what this file does):
// 1. The transverse plane of the beam is sampled on a periodic grid with padded period
//    L (sites) per axis, larger than the lattice by several grains so that the periodic
//    copy of the field is decorrelated from the lattice (margin 4 r0: there the
//    intensity correlation has fallen below 1e-3 of its value at zero distance), and
//    long enough that the pupil spans at least 16 spectral cells in radius.
// 2. Every spectral cell q = 2 pi (f1/L1, f2/L2) inside the pupil gets an independent
//    amplitude A_q = (g1 + i g2)/sqrt(2), g standard normal from seededRandom.normal(),
//    drawn in a fixed order (f1, then f2, ascending). The field is
//        E(x, z) = sum_q A_q exp(-i q.x) exp(-i |q|^2 z / (2 k0)),
//    the second factor being exact paraxial (Fresnel) propagation along the beam, with
//    k0 the optical wave number in lattice units. A 2D FFT (fft.js, row-column passes)
//    evaluates one transverse plane.
// 3. Along the beam (3D lattices) every lattice plane is propagated to its own z, which
//    makes the field an exact thin paraboloid shell in 3D k-space, without padding
//    along the beam. For a uniformly filled pupil the axial correlation of the field is
//        mu(dz) = (1 / (pi kmax^2)) int_0^kmax 2 pi q dq exp(-i q^2 dz / (2 k0))
//               = exp(-i a) sin(a)/a,   a = kmax^2 dz / (4 k0),
//    whose intensity correlation |mu|^2 first vanishes at z0 = 4 pi k0 / kmax^2 =
//    2 lambda / NA^2. The caller gives z0 as longitudinalGrainSites and we set
//    k0 = z0 kmax^2 / (4 pi): grains are elongated along the beam by z0/r0 = 3.3/NA.
//    On the discrete spectrum the propagation is periodic in z (Talbot revival) with
//    period z0 (kmax L / 2 pi)^2; the padding is chosen so that this period exceeds
//    32 times the lattice length along the beam, which keeps spurious revivals small.
// 4. Wannier averaging (optional): the potential on a site is the intensity averaged
//    over the Wannier density, approximated by an isotropic Gaussian of rms width sigma
//    (sites) along every direction: sigma = l/sqrt(2), with l = a / (pi s^(1/4)) the
//    harmonic-oscillator length of a lattice well of depth s E_r (common practice).
//    Transversally this is a convolution done exactly in Fourier space (factor
//    exp(-sigma^2 k^2 / 2)); the intensity has spectral extent 2 kmax, so the grid is
//    refined by a power-of-two factor m until 2 kmax < pi m and nothing aliases. Along
//    the beam the intensity varies only on the scale z0, so a 3-point Gauss-Hermite rule
//    (nodes 0, +-sqrt(3) sigma, weights 2/3, 1/6, 1/6; exact for polynomials up to
//    degree 5) averages over three propagated planes. For 1D and 2D lattices the beam
//    direction is averaged only when longitudinalGrainSites is given (otherwise the
//    grains are taken as infinitely long along the beam, and there is nothing to average).
// 5. Without Wannier averaging the field is needed only at sites; spectral cells beyond
//    the Nyquist limit of the site grid (grains below 1.22 sites) are folded onto it,
//    which is exact for site samples because exp(i k x) = exp(i (k - 2 pi) x) at integer x.
//
// Geometry: a 1D lattice is a line transverse to the beam (the second transverse
// direction is sampled at 0 only); a 2D lattice is the transverse plane z = 0; a 3D
// lattice has its beam along `beamAxis` (default the last axis).
//
// Normalisation: the intensity is divided by the number of pupil cells, which is its
// ENSEMBLE mean (sum of <|A_q|^2> = 1 per cell), not by the sample mean of this
// realisation. Fields are then unbiased: averaged over seeds the potential at every
// site is exactly meanStrength, while one realisation's lattice mean fluctuates around
// it by about (grain area / lattice area)^(1/2), as in an experiment.
//
// Determinism: the same options and seed give bit-identical fields on any machine
// (integer-only random generator, V8's portable libm, deterministic fft.js). Changing
// the lattice shape changes the padded grid and hence the whole field: a smaller
// lattice is not a crop of a larger one with the same seed.

import { seededRandom } from '../numerics/seededRandom.js';
import { BESSEL_J1_FIRST_ZERO } from './speckleGrain.js';
import { ComplexFft2d, nextPowerOfTwo } from '../numerics/fft.js';
import { gridSizes } from './gridShape.js';

export {
  BESSEL_J1_FIRST_ZERO,
  grainSitesFromAperture,
  longitudinalGrainSitesFromAperture,
} from './speckleGrain.js';

export interface SpeckleGeometryOptions {
  /** Lattice shape [nx], [nx, ny] or [nx, ny, nz]; C order, first axis slowest. */
  shape: readonly number[];
  /** Transverse grain size: first zero of the intensity autocorrelation, in sites. */
  grainSites: number;
  /** 3D only: lattice axis (0, 1 or 2) along which the beam propagates; default 2. */
  beamAxis?: number;
  /** First zero of the intensity autocorrelation along the beam, in sites (3D: required). */
  longitudinalGrainSites?: number;
  /** rms width of the Gaussian approximation of |w|^2, in sites; 0 or absent: sample at site centres. */
  wannierWidthSites?: number;
}

export interface SpeckleIntensityOptions extends SpeckleGeometryOptions {
  /** Named seed, e.g. "speckle/4". */
  seed: string;
}

export interface SpeckleOptions extends SpeckleIntensityOptions {
  /** Ensemble mean of |eps| in the caller's energy unit (>= 0). */
  meanStrength: number;
  /** 'repulsive' (blue detuned, eps >= 0) or 'attractive' (red detuned, eps <= 0). */
  sign: 'repulsive' | 'attractive';
}

/** How the field is generated; useful for reports and for checking margins. */
export interface SpeckleGridPlan {
  /** Lattice axes lying in the transverse plane (-1: a direction not in the lattice). */
  transverseAxes: [number, number];
  /** Lattice axis along the beam, or -1 (1D and 2D lattices lie transverse to it). */
  beamAxis: number;
  /** Pupil radius kmax = j_{1,1} / grainSites, radians per site. */
  pupilRadiusPerSite: number;
  /** Padded periods of the transverse grid, in sites. */
  paddedSites: [number, number];
  /** Grid points per site (power of two; > 1 only with Wannier averaging of small grains). */
  pointsPerSite: number;
  /** Transverse grid size in points (powers of two). */
  gridPoints: [number, number];
  /** Number of independent complex amplitudes inside the pupil. */
  pupilCells: number;
  /** Positions (sites) and weights of the planes averaged along the beam for each site. */
  beamNodeOffsetsSites: number[];
  beamNodeWeights: number[];
}

const WRAP_MARGIN_GRAINS = 4;
const WRAP_MARGIN_WANNIER_WIDTHS = 6;
const MIN_PUPIL_RADIUS_CELLS = 16;
const TALBOT_LENGTH_FACTOR = 32;
const MAX_GRID_POINTS = 1 << 24;

interface ResolvedGeometry {
  plan: SpeckleGridPlan;
  /** Sizes and strides of the two transverse directions and the beam in the lattice. */
  n1: number;
  n2: number;
  nBeam: number;
  stride1: number;
  stride2: number;
  strideBeam: number;
  siteCount: number;
  sigma: number;
  /** 1/(2 k0) in sites per radian^2, or 0 when the beam direction is not resolved. */
  inverseTwoK0: number;
}

function checkPositive(name: string, value: number, hint: string): void {
  if (!Number.isFinite(value) || value <= 0) {
    throw new RangeError(`speckle ${name}: expected a finite number > 0 (${hint}), got ${value}`);
  }
}

function resolveGeometry(options: SpeckleGeometryOptions): ResolvedGeometry {
  const { shape, grainSites } = options;
  gridSizes(shape, 'speckle');
  checkPositive('grainSites', grainSites, 'grain size in lattice sites');
  const sigma = options.wannierWidthSites ?? 0;
  if (!Number.isFinite(sigma) || sigma < 0) {
    throw new RangeError(
      `speckle wannierWidthSites: expected a width >= 0 in sites (0 samples at site centres), got ${sigma}`,
    );
  }
  const dims = shape.length;
  const z0 = options.longitudinalGrainSites;
  if (z0 !== undefined) checkPositive('longitudinalGrainSites', z0, 'axial grain size in sites');
  if (dims < 3 && options.beamAxis !== undefined) {
    throw new RangeError(
      `speckle beamAxis: applies to 3D lattices only; a ${dims}D lattice is taken transverse to the beam, remove beamAxis`,
    );
  }
  let beamAxis = -1;
  let transverseAxes: [number, number];
  if (dims === 3) {
    beamAxis = options.beamAxis ?? 2;
    if (beamAxis !== 0 && beamAxis !== 1 && beamAxis !== 2) {
      throw new RangeError(`speckle beamAxis: expected 0, 1 or 2 for a 3D lattice, got ${beamAxis}`);
    }
    if (z0 === undefined) {
      throw new RangeError(
        'speckle longitudinalGrainSites: required for a 3D lattice (axial grain size in sites, e.g. from longitudinalGrainSitesFromAperture)',
      );
    }
    const others = [0, 1, 2].filter((a) => a !== beamAxis);
    transverseAxes = [others[0], others[1]];
  } else if (dims === 2) {
    transverseAxes = [0, 1];
  } else {
    transverseAxes = [0, -1];
  }

  const strides = [1, 1, 1];
  for (let a = dims - 2; a >= 0; a--) strides[a] = strides[a + 1] * shape[a + 1];
  const sizeOf = (axis: number): number => (axis < 0 ? 1 : shape[axis]);
  const strideOf = (axis: number): number => (axis < 0 ? 0 : strides[axis]);
  const n1 = sizeOf(transverseAxes[0]);
  const n2 = sizeOf(transverseAxes[1]);
  const nBeam = sizeOf(beamAxis);
  const siteCount = shape.reduce((p, n) => p * n, 1);

  const kmax = BESSEL_J1_FIRST_ZERO / grainSites;
  const inverseTwoK0 = z0 === undefined ? 0 : (2 * Math.PI) / (z0 * kmax * kmax);
  const averageAlongBeam = sigma > 0 && z0 !== undefined;
  const beamNodeOffsetsSites = averageAlongBeam ? [0, -Math.sqrt(3) * sigma, Math.sqrt(3) * sigma] : [0];
  const beamNodeWeights = averageAlongBeam ? [2 / 3, 1 / 6, 1 / 6] : [1];

  // Refinement so that the intensity (spectral extent 2 kmax) is resolved when it is
  // filtered; without filtering, folding makes one point per site exact.
  let pointsPerSite = 1;
  if (sigma > 0) while (2 * kmax >= Math.PI * pointsPerSite) pointsPerSite *= 2;

  const wrapMargin = Math.ceil(WRAP_MARGIN_GRAINS * grainSites + WRAP_MARGIN_WANNIER_WIDTHS * sigma) + 1;
  const pupilSampling = (2 * Math.PI * MIN_PUPIL_RADIUS_CELLS) / kmax;
  const beamSpan = nBeam - 1 + (averageAlongBeam ? 2 * Math.sqrt(3) * sigma : 0);
  const talbot =
    z0 !== undefined && beamSpan > 0
      ? ((2 * Math.PI) / kmax) * Math.sqrt((TALBOT_LENGTH_FACTOR * beamSpan) / z0)
      : 0;
  const gridFor = (n: number): number =>
    nextPowerOfTwo(Math.ceil(pointsPerSite * Math.max(n + wrapMargin, pupilSampling, talbot)));
  const gridPoints: [number, number] = [gridFor(n1), gridFor(n2)];
  if (gridPoints[0] * gridPoints[1] > MAX_GRID_POINTS) {
    throw new RangeError(
      `speckle grid of ${gridPoints[0]} x ${gridPoints[1]} points is too large for shape ${JSON.stringify(shape)} ` +
        `with grainSites ${grainSites}` +
        (sigma > 0 ? ` and wannierWidthSites ${sigma} (refined ${pointsPerSite}x per site)` : '') +
        ` (each transverse axis spans at least the lattice plus ${WRAP_MARGIN_GRAINS} grains, and at least ` +
        `${Math.ceil(pupilSampling / grainSites)} grains so the pupil is finely sampled); use a smaller lattice ` +
        (sigma > 0 ? 'or a grain size nearer the lattice spacing, or set wannierWidthSites to 0' : 'or a grain size nearer the lattice spacing'),
    );
  }
  const paddedSites: [number, number] = [
    gridPoints[0] / pointsPerSite,
    gridPoints[1] / pointsPerSite,
  ];
  return {
    plan: {
      transverseAxes,
      beamAxis,
      pupilRadiusPerSite: kmax,
      paddedSites,
      pointsPerSite,
      gridPoints,
      pupilCells: countPupilCells(kmax, paddedSites),
      beamNodeOffsetsSites,
      beamNodeWeights,
    },
    n1,
    n2,
    nBeam,
    stride1: strideOf(transverseAxes[0]),
    stride2: strideOf(transverseAxes[1]),
    strideBeam: strideOf(beamAxis),
    siteCount,
    sigma,
    inverseTwoK0,
  };
}

/** Largest |f1|, |f2| of a pupil cell q = 2 pi (f1/L1, f2/L2). */
function pupilExtent(kmax: number, paddedSites: [number, number]): [number, number] {
  return [
    Math.floor((kmax * paddedSites[0]) / (2 * Math.PI)),
    Math.floor((kmax * paddedSites[1]) / (2 * Math.PI)),
  ];
}

/** Cells q = 2 pi (f1/L1, f2/L2) with |q| <= kmax, visited in the fixed draw order. */
function forEachPupilCell(
  kmax: number,
  paddedSites: [number, number],
  visit: (f1: number, f2: number, q2: number) => void,
): void {
  const [l1, l2] = paddedSites;
  const [fMax1, fMax2] = pupilExtent(kmax, paddedSites);
  const kmax2 = kmax * kmax;
  for (let f1 = -fMax1; f1 <= fMax1; f1++) {
    const k1 = (2 * Math.PI * f1) / l1;
    for (let f2 = -fMax2; f2 <= fMax2; f2++) {
      const k2 = (2 * Math.PI * f2) / l2;
      const q2 = k1 * k1 + k2 * k2;
      if (q2 <= kmax2) visit(f1, f2, q2);
    }
  }
}

function countPupilCells(kmax: number, paddedSites: [number, number]): number {
  let count = 0;
  forEachPupilCell(kmax, paddedSites, () => {
    count++;
  });
  return count;
}

/** The generation grid that speckleIntensity would use for these options. */
export function planSpeckleGrid(options: SpeckleGeometryOptions): SpeckleGridPlan {
  return resolveGeometry(options).plan;
}

/** Gaussian transfer function exp(-sigma^2 k^2 / 2) on the FFT frequencies of one axis. */
function gaussianTransfer(points: number, periodSites: number, sigma: number): Float64Array {
  const transfer = new Float64Array(points);
  for (let j = 0; j < points; j++) {
    const f = j < points / 2 ? j : j - points;
    const k = (2 * Math.PI * f) / periodSites;
    transfer[j] = Math.exp(-0.5 * sigma * sigma * k * k);
  }
  return transfer;
}

/**
 * Speckle intensity on the lattice, normalised to ensemble mean 1 (exponentially
 * distributed at each site when sampled at site centres).
 */
export function speckleIntensity(options: SpeckleIntensityOptions): Float64Array {
  if (typeof options.seed !== 'string' || options.seed.length === 0) {
    throw new RangeError('speckle seed: expected a non-empty seed name, e.g. "speckle/1"');
  }
  const geometry = resolveGeometry(options);
  const { plan, n1, n2, nBeam, stride1, stride2, strideBeam, sigma, inverseTwoK0 } = geometry;
  const [rows, cols] = plan.gridPoints;
  const m = plan.pointsPerSite;
  const kmax = plan.pupilRadiusPerSite;

  // Pupil amplitudes in the fixed draw order; cellIndex is the folded grid cell.
  const cellCount = plan.pupilCells;
  const cellIndex = new Int32Array(cellCount);
  const cellF1 = new Int32Array(cellCount);
  const cellF2 = new Int32Array(cellCount);
  const cellRe = new Float64Array(cellCount);
  const cellIm = new Float64Array(cellCount);
  const rowUsed = new Uint8Array(rows);
  const random = seededRandom(options.seed);
  let c = 0;
  const [fMax1, fMax2] = pupilExtent(kmax, plan.paddedSites);
  forEachPupilCell(kmax, plan.paddedSites, (f1, f2) => {
    const r = ((f1 % rows) + rows) % rows;
    const s = ((f2 % cols) + cols) % cols;
    cellIndex[c] = r * cols + s;
    cellF1[c] = f1 + fMax1;
    cellF2[c] = f2 + fMax2;
    cellRe[c] = random.normal() * Math.SQRT1_2;
    cellIm[c] = random.normal() * Math.SQRT1_2;
    rowUsed[r] = 1;
    c++;
  });
  const normalisation = 1 / cellCount;
  // The Fresnel phase -|q|^2 z/(2 k0) is a sum over the two transverse axes, so per plane
  // it takes two small tables of exp(-i k_a^2 z/(2 k0)) instead of one sine and cosine
  // per pupil cell.
  const wave1 = Float64Array.from({ length: 2 * fMax1 + 1 }, (_, i) => (2 * Math.PI * (i - fMax1)) / plan.paddedSites[0]);
  const wave2 = Float64Array.from({ length: 2 * fMax2 + 1 }, (_, i) => (2 * Math.PI * (i - fMax2)) / plan.paddedSites[1]);
  const phase1Re = new Float64Array(wave1.length);
  const phase1Im = new Float64Array(wave1.length);
  const phase2Re = new Float64Array(wave2.length);
  const phase2Im = new Float64Array(wave2.length);

  const fft = new ComplexFft2d(rows, cols);
  const field = new Float64Array(2 * rows * cols);
  const filtered = sigma > 0;
  const intensity = filtered ? new Float64Array(2 * rows * cols) : field;
  const transfer1 = filtered ? gaussianTransfer(rows, plan.paddedSites[0], sigma) : undefined;
  const transfer2 = filtered ? gaussianTransfer(cols, plan.paddedSites[1], sigma) : undefined;
  const out = new Float64Array(geometry.siteCount);

  // With filtering, two beam planes share one filter pass: plane b0 in the real part and
  // plane b0 + 1 in the imaginary part. The Gaussian transfer function is real and even,
  // so it maps real fields to real fields and the two planes do not mix.
  const planesPerPass = filtered ? 2 : 1;
  for (let b0 = 0; b0 < nBeam; b0 += planesPerPass) {
    if (filtered) intensity.fill(0);
    const planesHere = Math.min(planesPerPass, nBeam - b0);
    for (let slot = 0; slot < planesHere; slot++) {
      const b = b0 + slot;
      for (let node = 0; node < plan.beamNodeOffsetsSites.length; node++) {
        const z = b + plan.beamNodeOffsetsSites[node];
        const weight = plan.beamNodeWeights[node] * normalisation;
        // Scatter the propagated pupil amplitudes (folded cells add up).
        field.fill(0);
        const phasePerQ2 = -z * inverseTwoK0;
        if (phasePerQ2 === 0) {
          for (let p = 0; p < cellCount; p++) {
            const at = 2 * cellIndex[p];
            field[at] += cellRe[p];
            field[at + 1] += cellIm[p];
          }
        } else {
          for (let i = 0; i < wave1.length; i++) {
            const phase = phasePerQ2 * wave1[i] * wave1[i];
            phase1Re[i] = Math.cos(phase);
            phase1Im[i] = Math.sin(phase);
          }
          for (let i = 0; i < wave2.length; i++) {
            const phase = phasePerQ2 * wave2[i] * wave2[i];
            phase2Re[i] = Math.cos(phase);
            phase2Im[i] = Math.sin(phase);
          }
          for (let p = 0; p < cellCount; p++) {
            const a = cellF1[p];
            const d = cellF2[p];
            const cos = phase1Re[a] * phase2Re[d] - phase1Im[a] * phase2Im[d];
            const sin = phase1Re[a] * phase2Im[d] + phase1Im[a] * phase2Re[d];
            const at = 2 * cellIndex[p];
            field[at] += cellRe[p] * cos - cellIm[p] * sin;
            field[at + 1] += cellRe[p] * sin + cellIm[p] * cos;
          }
        }
        fft.transformRows(field, 'forward', rowUsed);
        if (!filtered) {
          // Only the columns and rows at sites are needed (one point per site here).
          const planeOffset = b * strideBeam;
          for (let j = 0; j < n2; j++) {
            const columnOut = fft.transformColumn(field, j, 'forward');
            const base = planeOffset + j * stride2;
            for (let i = 0; i < n1; i++) {
              const re = columnOut[2 * i];
              const im = columnOut[2 * i + 1];
              out[base + i * stride1] = (re * re + im * im) * weight;
            }
          }
        } else {
          // Write the columns back, then accumulate |E|^2 in one sequential sweep
          // (accumulating column by column would stride through memory).
          fft.transformColumns(field, 'forward');
          for (let at = 0; at < field.length; at += 2) {
            const re = field[at];
            const im = field[at + 1];
            intensity[at + slot] += (re * re + im * im) * weight;
          }
        }
      }
    }
    if (!filtered || transfer1 === undefined || transfer2 === undefined) continue;
    // Transverse Gaussian average: exact multiplication of the resolved intensity spectrum.
    fft.transform(intensity, 'forward');
    for (let i = 0; i < rows; i++) {
      const t1 = transfer1[i];
      let at = 2 * i * cols;
      for (let j = 0; j < cols; j++, at += 2) {
        const t = t1 * transfer2[j];
        intensity[at] *= t;
        intensity[at + 1] *= t;
      }
    }
    fft.transformRows(intensity, 'inverse');
    for (let j = 0; j < n2; j++) {
      const columnOut = fft.transformColumn(intensity, j * m, 'inverse');
      for (let slot = 0; slot < planesHere; slot++) {
        const base = (b0 + slot) * strideBeam + j * stride2;
        for (let i = 0; i < n1; i++) out[base + i * stride1] = columnOut[2 * i * m + slot];
      }
    }
  }
  return out;
}

/**
 * Speckle potential eps_i in the caller's energy unit: sign * meanStrength * I_i with
 * I the ensemble-mean-1 intensity of speckleIntensity.
 */
export function speckleField(options: SpeckleOptions): Float64Array {
  const { meanStrength, sign } = options;
  if (!Number.isFinite(meanStrength) || meanStrength < 0) {
    throw new RangeError(
      `speckle meanStrength: expected a mean potential >= 0 in energy units (choose the sign with 'sign'), got ${meanStrength}`,
    );
  }
  if (sign !== 'repulsive' && sign !== 'attractive') {
    throw new RangeError(`speckle sign: expected 'repulsive' or 'attractive', got ${String(sign)}`);
  }
  const intensity = speckleIntensity(options);
  const scale = sign === 'repulsive' ? meanStrength : -meanStrength;
  for (let i = 0; i < intensity.length; i++) intensity[i] *= scale;
  return intensity;
}

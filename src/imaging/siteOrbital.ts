// The single-site orbital along one image axis, in momentum space and after a free flight:
// what turns lattice amplitudes into a time-of-flight picture.
//
// Two kinds:
// - the lowest-band Wannier function of a lattice axis of depth s E_r (physics/wannier.ts):
//   w~(k) = sqrt(a) W(k a) with W(pi (q + 2l)) = c_l(q), the Bloch coefficients in the smooth
//   real gauge; normalised as int |w~|^2 dk / (2 pi) = 1;
// - the harmonic-oscillator ground state w(x) = (pi l^2)^(-1/4) exp(-x^2 / (2 l^2)) of an axis
//   held by a harmonic trap (a 2D layer seen from the side), also the Gaussian approximation of
//   a deep well; w~(k) = (4 pi l^2)^(1/4) exp(-k^2 l^2 / 2).
//
// Free flight (interactions neglected, as everywhere in tiercake's time of flight): the
// orbital evolves with the free propagator (e.g. Cohen-Tannoudji, Diu, Laloe, Quantum
// Mechanics, complement on the free wave packet), written in Fresnel form,
//     w_t(x) = sqrt(m / (2 pi i hbar t)) int dx' exp(i m (x - x')^2 / (2 hbar t)) w(x')
//            = sqrt(m / (2 pi i hbar t)) exp(i alpha x^2) F(2 alpha x),   alpha = m / (2 hbar t),
//     F(kappa) = int dx' exp(-i kappa x') exp(i alpha x'^2) w(x'),
// so F is the Fourier transform of the orbital times the quadratic phase that the far-field
// picture drops (alpha -> 0 gives F -> w~ and the far-field law k = m x / (hbar t)).
// - Gaussian: closed form w_t(x) = (pi l^2)^(-1/4) (1 + i tau)^(-1/2) exp(-x^2 / (2 l^2 (1 + i tau))),
//   tau = hbar t / (m l^2); |w_t|^2 has rms width (l / sqrt 2) sqrt(1 + tau^2).
// - Wannier: F on a fine uniform kappa grid by one zero-padded FFT of the real-space Wannier
//   function times the chirp (a spectrally accurate trapezoid sum, the function decaying
//   exponentially), then 4-point Lagrange interpolation in kappa (the table is oversampled 32x
//   relative to the inverse support, so the interpolation error is ~1e-8 of the peak; tested
//   against a direct quadrature of the Fresnel integral).
//
// Units: lengths in micrometres, times in milliseconds, w in um^(-1/2), w~ in um^(1/2).

import { hbarJs } from '../physics/constants.js';
import { latticeBand1d } from '../physics/bandStructure.js';
import { momentumSpaceWannier1d, wannierFunction1d } from '../physics/wannier.js';
import { complexFft1d, nextPowerOfTwo } from '../numerics/fft.js';

/** The orbital after a free flight, evaluated at displacements from its site. */
export interface ExpandedOrbital1d {
  /** Writes w_t(d) (um^(-1/2)) for each displacement d (um) into re[i], im[i]. */
  fill(displacementsUm: ArrayLike<number>, re: Float64Array, im: Float64Array): void;
  /** rms width of |w_t|^2, um. */
  rmsWidthUm: number;
}

export interface SiteOrbital1d {
  kind: 'lattice-wannier' | 'harmonic-ground-state';
  /** One line for metadata, e.g. 'lowest-band Wannier function of a 16 E_r lattice'. */
  description: string;
  /** rms width of |w|^2, um. */
  rmsWidthUm: number;
  /** w~(k) (real, even), um^(1/2); int |w~|^2 dk / (2 pi) = 1. */
  momentumAmplitude(kPerUm: number): number;
  /** |w~(k)|^2, um. */
  momentumDensity(kPerUm: number): number;
  /** The orbital after a free flight of flightTimeMs for a particle of mass massKg. */
  expand(flightTimeMs: number, massKg: number): ExpandedOrbital1d;
}

/** hbar / m in um^2 / ms. */
export function hbarOverMassUm2PerMs(massKg: number): number {
  if (!(massKg > 0) || !Number.isFinite(massKg)) {
    throw new RangeError(`mass must be a positive number of kg, got ${massKg}`);
  }
  return (hbarJs / massKg) * 1e9;
}

function checkFlight(flightTimeMs: number): void {
  if (!(flightTimeMs > 0) || !Number.isFinite(flightTimeMs)) {
    throw new RangeError(`flight time must be a positive number of ms, got ${flightTimeMs}`);
  }
}

/** Harmonic-oscillator ground state of length l (um): exact in momentum space and after any flight. */
export function harmonicGroundStateOrbital(lengthUm: number, description?: string): SiteOrbital1d {
  if (!(lengthUm > 0) || !Number.isFinite(lengthUm)) {
    throw new RangeError(`harmonicGroundStateOrbital: oscillator length must be a positive number of um, got ${lengthUm}`);
  }
  const l = lengthUm;
  const peak = Math.pow(4 * Math.PI * l * l, 0.25);
  const l2 = l * l;
  return {
    kind: 'harmonic-ground-state',
    description: description ?? `harmonic-oscillator ground state, length ${l.toPrecision(4)} um`,
    rmsWidthUm: l / Math.SQRT2,
    momentumAmplitude: (k) => peak * Math.exp(-0.5 * k * k * l2),
    momentumDensity: (k) => peak * peak * Math.exp(-k * k * l2),
    expand(flightTimeMs, massKg) {
      checkFlight(flightTimeMs);
      const tau = (hbarOverMassUm2PerMs(massKg) * flightTimeMs) / l2;
      // (1 + i tau)^(-1/2) = r^(-1/2) exp(-i theta / 2), 1 + i tau = r exp(i theta).
      const r = Math.hypot(1, tau);
      const theta = Math.atan2(tau, 1);
      const ampRe = (Math.pow(Math.PI * l2, -0.25) / Math.sqrt(r)) * Math.cos(-theta / 2);
      const ampIm = (Math.pow(Math.PI * l2, -0.25) / Math.sqrt(r)) * Math.sin(-theta / 2);
      // -x^2 / (2 l^2 (1 + i tau)) = -x^2 (1 - i tau) / (2 l^2 (1 + tau^2))
      const g = 1 / (2 * l2 * (1 + tau * tau));
      return {
        rmsWidthUm: (l / Math.SQRT2) * r,
        fill(d, re, im) {
          for (let i = 0; i < d.length; i++) {
            const x2 = d[i] * d[i];
            const mag = Math.exp(-x2 * g);
            const ph = x2 * g * tau;
            const c = Math.cos(ph);
            const s = Math.sin(ph);
            re[i] = mag * (ampRe * c - ampIm * s);
            im[i] = mag * (ampRe * s + ampIm * c);
          }
        },
      };
    },
  };
}

/** 4-point Lagrange interpolation weights at fractional position f in [0, 1) between nodes 1 and 2 of (0, 1, 2, 3). */
function lagrangeWeights(f: number, w: Float64Array): void {
  const u = f + 1; // position relative to node 0
  w[0] = (-(u - 1) * (u - 2) * (u - 3)) / 6;
  w[1] = (u * (u - 2) * (u - 3)) / 2;
  w[2] = (-u * (u - 1) * (u - 3)) / 2;
  w[3] = (u * (u - 1) * (u - 2)) / 6;
}

/** Samples per 2 pi / a of the momentum table (cubic interpolation error ~ (pi / 64)^4 / 24 relative). */
const momentumSamplesPerZone = 128;
/** Oversampling of the kappa table relative to the orbital's support. */
const kappaOversampling = 32;
/** Relative size below which the Wannier function's tails are dropped before the FFT. */
const tailCut = 1e-15;

/**
 * Lowest-band Wannier function of a lattice axis of depth `depthEr` recoil energies and spacing
 * `latticeSpacingUm`. The momentum amplitude is tabulated once (every 2 pi / (128 a)) from fresh
 * diagonalisations and interpolated; the expansion builds its F table on demand.
 */
export function latticeWannierOrbital(depthEr: number, latticeSpacingUm: number): SiteOrbital1d {
  if (!(latticeSpacingUm > 0) || !Number.isFinite(latticeSpacingUm)) {
    throw new RangeError(`latticeWannierOrbital: lattice spacing must be a positive number of um, got ${latticeSpacingUm}`);
  }
  const a = latticeSpacingUm;
  const band = latticeBand1d(depthEr);
  const exact = momentumSpaceWannier1d(band);
  // Table of W(K) for K = k a >= 0 at step dK = 2 pi / S (S = momentumSamplesPerZone); W is
  // even. Entry j holds K = j dK = pi (q + 2l), so one diagonalisation at q_r = -1 + 2r/S
  // fills the entries j = r - S/2 + S l for every l: S diagonalisations in all.
  const S = momentumSamplesPerZone;
  const L = exact.planeWaveCutoff;
  const dK = (2 * Math.PI) / S;
  const nK = S * (L + 1);
  const table = new Float64Array(nK + 3);
  const comb = new Float64Array(2 * L + 1);
  for (let r = 0; r < S; r++) {
    exact.comb(-1 + (2 * r) / S, comb);
    for (let l = -L; l <= L; l++) {
      const j = r - S / 2 + S * l;
      if (j >= 0 && j < nK) table[j] = comb[l + L];
    }
  }
  const weights = new Float64Array(4);
  const sqrtA = Math.sqrt(a);
  const amplitude = (kPerUm: number): number => {
    const u = Math.abs(kPerUm * a) / dK;
    const j = Math.floor(u);
    if (j >= nK) return 0;
    lagrangeWeights(u - j, weights);
    // Node j - 1 of j = 0 is W(-dK) = W(dK) (even function).
    const w0 = j === 0 ? table[1] : table[j - 1];
    return sqrtA * (weights[0] * w0 + weights[1] * table[j] + weights[2] * table[j + 1] + weights[3] * table[j + 2]);
  };

  const real = wannierFunction1d(band);
  const spreadUm = real.spreadSites * a;

  const expandUncached = (flightTimeMs: number, massKg: number): ExpandedOrbital1d => {
    checkFlight(flightTimeMs);
    const hbarOverM = hbarOverMassUm2PerMs(massKg);
    const alpha = 1 / (2 * hbarOverM * flightTimeMs); // 1/um^2
    // Real-space Wannier function on a grid fine enough for W (|K| <= pi (2L + 1)) plus the
    // chirp's local wavenumber 2 alpha x' at the edge of the support.
    let grid = real;
    let support = supportHalfWidthSites(grid);
    const needed = (2 * exact.planeWaveCutoff + 1 + (2 * alpha * support * a * a) / Math.PI) * 1.25;
    if (grid.pointsPerSite < needed) {
      grid = wannierFunction1d(band, { pointsPerSite: Math.ceil(needed) });
      support = supportHalfWidthSites(grid);
    }
    const P = grid.pointsPerSite;
    const h = a / P; // um
    const count = grid.positionsSites.length;
    const first = grid.positionsSites.findIndex((xi) => xi >= -support);
    const last = count - 1 - [...grid.positionsSites].reverse().findIndex((xi) => xi <= support);
    const used = last - first + 1;
    const N = nextPowerOfTwo(Math.max(kappaOversampling * used, 64));
    const data = new Float64Array(2 * N);
    const out = new Float64Array(2 * N);
    // Sample n of the FFT input sits at x'_n = (n - N/2) h; the Wannier grid point xi_i = i0/P.
    for (let i = first; i <= last; i++) {
      const xi = grid.positionsSites[i];
      const n = Math.round(xi * P) + N / 2;
      const x = xi * a;
      // w in um^(-1/2) is the tabulated w(xi) (units a^(-1/2)) over sqrt(a); times the
      // trapezoid weight h (periodic grid, tails ~ 0).
      const w = (grid.real[i] / sqrtA) * h;
      const ph = alpha * x * x;
      data[2 * n] = w * Math.cos(ph);
      data[2 * n + 1] = w * Math.sin(ph);
    }
    complexFft1d(N, 'kappa table').transform(out, data);
    // F(kappa_k) = sum_n g_n exp(-i kappa_k (n - N/2) h) = (-1)^k X_k, kappa_k = 2 pi k / (N h);
    // stored for k = -N/2 .. N/2 - 1 at index k + N/2, plus 3 guard entries of zero.
    const fRe = new Float64Array(N + 3);
    const fIm = new Float64Array(N + 3);
    for (let k = -N / 2; k < N / 2; k++) {
      const src = ((k % N) + N) % N;
      const sign = (k & 1) === 0 ? 1 : -1;
      fRe[k + N / 2] = sign * out[2 * src];
      fIm[k + N / 2] = sign * out[2 * src + 1];
    }
    const dKappa = (2 * Math.PI) / (N * h);
    const kappaFirst = (-N / 2) * dKappa;
    // sqrt(m / (2 pi i hbar t)) = sqrt(alpha / pi) exp(-i pi / 4)
    const norm = Math.sqrt(alpha / Math.PI);
    const nRe = norm * Math.SQRT1_2;
    const nIm = -norm * Math.SQRT1_2;
    const wts = new Float64Array(4);
    const tau = hbarOverM * flightTimeMs;
    return {
      // Exact for any orbital: <x^2>_t = <x^2>_0 + (hbar t / m)^2 <k^2>_0 for a real w (no <xk> term).
      rmsWidthUm: Math.sqrt(spreadUm * spreadUm + tau * tau * momentumSecondMoment(amplitude, a)),
      fill(d, re, im) {
        for (let i = 0; i < d.length; i++) {
          const x = d[i];
          const u = (2 * alpha * x - kappaFirst) / dKappa;
          const j = Math.floor(u);
          if (j < 1 || j >= N - 2) {
            re[i] = 0;
            im[i] = 0;
            continue;
          }
          lagrangeWeights(u - j, wts);
          const Fr = wts[0] * fRe[j - 1] + wts[1] * fRe[j] + wts[2] * fRe[j + 1] + wts[3] * fRe[j + 2];
          const Fi = wts[0] * fIm[j - 1] + wts[1] * fIm[j] + wts[2] * fIm[j + 1] + wts[3] * fIm[j + 2];
          const ph = alpha * x * x;
          const c = Math.cos(ph);
          const s = Math.sin(ph);
          // (nRe + i nIm) (c + i s) (Fr + i Fi)
          const pr = nRe * c - nIm * s;
          const pi = nRe * s + nIm * c;
          re[i] = pr * Fr - pi * Fi;
          im[i] = pr * Fi + pi * Fr;
        }
      },
    };
  };
  // The last expansion is kept: both image axes of a square lattice, and repeated pictures at
  // one flight time, share it.
  let cached: { flightTimeMs: number; massKg: number; value: ExpandedOrbital1d } | null = null;
  return {
    kind: 'lattice-wannier',
    description: `lowest-band Wannier function of a ${depthEr} E_r lattice (spacing ${a.toPrecision(4)} um)`,
    rmsWidthUm: spreadUm,
    momentumAmplitude: amplitude,
    momentumDensity: (k) => {
      const v = amplitude(k);
      return v * v;
    },
    expand(flightTimeMs, massKg) {
      if (cached === null || cached.flightTimeMs !== flightTimeMs || cached.massKg !== massKg) {
        cached = { flightTimeMs, massKg, value: expandUncached(flightTimeMs, massKg) };
      }
      return cached.value;
    },
  };
}

/** Half-width (sites) outside which |w| < tailCut * max |w|. */
function supportHalfWidthSites(grid: { positionsSites: Float64Array; real: Float64Array }): number {
  let max = 0;
  for (let i = 0; i < grid.real.length; i++) max = Math.max(max, Math.abs(grid.real[i]));
  let half = 0;
  for (let i = 0; i < grid.real.length; i++) {
    if (Math.abs(grid.real[i]) > tailCut * max) half = Math.max(half, Math.abs(grid.positionsSites[i]));
  }
  return half + 1;
}

/** <k^2> = int k^2 |w~|^2 dk / (2 pi), 1/um^2, by the midpoint rule on the tabulated amplitude. */
function momentumSecondMoment(amplitude: (k: number) => number, a: number): number {
  const dk = (2 * Math.PI) / (momentumSamplesPerZone * a);
  let sum = 0;
  for (let j = 0; ; j++) {
    const k = (j + 0.5) * dk;
    const v = amplitude(k);
    if (j > 16 && v === 0) break;
    sum += k * k * v * v;
  }
  return (2 * sum * dk) / (2 * Math.PI);
}

/** What siteOrbitalsForAxes needs to know about the lattice (HubbardParameters has it). */
export interface OrbitalAxesSource {
  /** One entry per lattice axis, in lattice-axis order (first lattice axes of the geometry). */
  latticeAxes: ReadonlyArray<{ depthEr: number; latticeSpacingUm: number }>;
  /** The axes held by a harmonic trap instead (e.g. the vertical axis of a 2D layer), after the lattice axes. */
  harmonicAxes: ReadonlyArray<{ oscillatorLengthUm: number }>;
}

/**
 * The orbitals along the two image axes: the lattice Wannier function for a lattice axis,
 * the harmonic-oscillator ground state for an axis without lattice (axis index >= number of
 * lattice axes: a 2D layer seen from the side). Equal depths share one orbital (and its
 * expansion cache).
 */
export function siteOrbitalsForAxes(source: OrbitalAxesSource, keptAxes: readonly [number, number]): [SiteOrbital1d, SiteOrbital1d] {
  const made = new Map<number, SiteOrbital1d>();
  const orbital = (axis: number): SiteOrbital1d => {
    const cached = made.get(axis);
    if (cached) return cached;
    let result: SiteOrbital1d;
    const lattice = source.latticeAxes[axis];
    if (lattice !== undefined) {
      const same = [...made.entries()].find(([d]) => {
        const other = source.latticeAxes[d];
        return other !== undefined && other.depthEr === lattice.depthEr && other.latticeSpacingUm === lattice.latticeSpacingUm;
      });
      result = same ? same[1] : latticeWannierOrbital(lattice.depthEr, lattice.latticeSpacingUm);
    } else {
      const harmonic = source.harmonicAxes[axis - source.latticeAxes.length];
      if (harmonic === undefined) throw new RangeError(`siteOrbitalsForAxes: axis ${axis} is neither a lattice axis nor a harmonic axis`);
      result = harmonicGroundStateOrbital(
        harmonic.oscillatorLengthUm,
        `harmonic-oscillator ground state of the confinement, length ${harmonic.oscillatorLengthUm.toPrecision(4)} um`,
      );
    }
    made.set(axis, result);
    return result;
  };
  return [orbital(keptAxes[0]), orbital(keptAxes[1])];
}

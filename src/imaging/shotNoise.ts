// Shot noise: Poisson-distributed counts (atoms detected, or photons per pixel) from a
// named seed, so the same seed gives the same noisy picture on every machine.
//
// Sampling, exact for every mean:
// - mean < 10: inversion by sequential search of the cumulative distribution,
//   starting at k = 0 (Devroye, Non-Uniform Random Variate Generation, Springer 1986,
//   section X.3.3); cost grows like the mean, which is small here.
// - mean >= 10: PTRS, "transformed rejection with squeeze" (W. Hoermann, "The
//   transformed rejection method for generating Poisson random variables", Insurance:
//   Mathematics and Economics 12, 39 (1993)); constant expected cost (about 1.15
//   uniform pairs per sample) at any mean. Its acceptance test needs ln k!, which we take
//   from an exact table for k < 32 and Stirling's series beyond (A&S 6.1.41 with terms
//   to k^-7, relative error far below 1e-15 there).
// Uniforms come from src/numerics/seededRandom.ts (xoshiro128**).

import { seededRandom, type SeededRandom } from '../numerics/seededRandom.js';

const logFactorialTable = (() => {
  const table = new Float64Array(32);
  for (let k = 2; k < 32; k++) table[k] = table[k - 1] + Math.log(k);
  return table;
})();

/** ln(k!) for integer k >= 0. */
export function logFactorial(k: number): number {
  if (k < 32) return logFactorialTable[k];
  const x = k + 1; // ln k! = ln Gamma(k + 1)
  const inv = 1 / x;
  const inv2 = inv * inv;
  // Stirling: ln Gamma(x) = (x - 1/2) ln x - x + ln(2 pi)/2 + 1/(12x) - 1/(360x^3) + 1/(1260x^5) - 1/(1680x^7)
  return (
    (x - 0.5) * Math.log(x) - x + 0.9189385332046728 +
    inv * (1 / 12 - inv2 * (1 / 360 - inv2 * (1 / 1260 - inv2 / 1680)))
  );
}

/** Below this mean, inversion; at and above, PTRS (Hoermann 1993 requires mean >= 10). */
const ptrsThreshold = 10;

/** One Poisson deviate with the given mean (>= 0, finite). */
export function samplePoisson(mean: number, random: SeededRandom): number {
  if (mean < ptrsThreshold) {
    if (mean === 0) return 0;
    let p = Math.exp(-mean);
    let cumulative = p;
    const u = random.uniform();
    let k = 0;
    // The 1000-term cap only guards against rounding leaving `cumulative` a hair
    // below u near 1; P(k > 1000) is below 1e-1000 for mean < 10.
    while (u > cumulative && k < 1000) {
      k++;
      p *= mean / k;
      cumulative += p;
    }
    return k;
  }
  const sqrtMean = Math.sqrt(mean);
  const logMean = Math.log(mean);
  const b = 0.931 + 2.53 * sqrtMean;
  const a = -0.059 + 0.02483 * b;
  const invAlpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const u = random.uniform() - 0.5;
    const v = random.uniform();
    const us = 0.5 - Math.abs(u);
    const k = Math.floor(((2 * a) / us + b) * u + mean + 0.43);
    if (us >= 0.07 && v <= vr) return k; // squeeze: accepted without logarithms
    if (k < 0 || (us < 0.013 && v > us)) continue;
    const lhs = Math.log(v * invAlpha / (a / (us * us) + b));
    if (lhs <= -mean + k * logMean - logFactorial(k)) return k;
  }
}

export interface ShotNoiseOptions {
  /** Name of the random stream, e.g. "camera/shot-3". */
  seed: string;
  /**
   * Detected counts per atom (photons or camera counts per atom). The noisy value is
   * Poisson(mean * countsPerAtom) / countsPerAtom, i.e. still in atoms. Default 1:
   * atom shot noise (each atom detected or not, atom number Poisson-distributed).
   */
  countsPerAtom?: number;
}

/**
 * A noisy copy of `expectedAtoms` (atoms per pixel or per site, >= 0): every entry
 * replaced by an independent Poisson sample, in the order of the array.
 */
export function addShotNoise(expectedAtoms: Float64Array, options: ShotNoiseOptions): Float64Array {
  const countsPerAtom = options.countsPerAtom ?? 1;
  if (!(countsPerAtom > 0) || !Number.isFinite(countsPerAtom)) {
    throw new Error(`addShotNoise: countsPerAtom must be a positive number, got ${countsPerAtom}`);
  }
  const random = seededRandom(options.seed);
  const out = new Float64Array(expectedAtoms.length);
  for (let i = 0; i < expectedAtoms.length; i++) {
    const mean = expectedAtoms[i] * countsPerAtom;
    if (!(mean >= 0) || !Number.isFinite(mean)) {
      throw new Error(
        `addShotNoise: expected counts must be finite and >= 0, got ${expectedAtoms[i]} at index ${i}; ` +
          'clip negative values (e.g. after background subtraction) before adding noise',
      );
    }
    out[i] = samplePoisson(mean, random) / countsPerAtom;
  }
  return out;
}

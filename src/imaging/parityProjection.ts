// Parity projection in single-site-resolved fluorescence imaging: during the imaging
// light pulse, light-assisted collisions eject atoms in pairs, so a site holding n
// atoms shows up bright if n is odd and dark if n is even (Bakr et al., Science 329,
// 547 (2010); Sherson et al., Nature 467, 68 (2010)).
//
// With the Gutzwiller state of site i, sum_n c_{i,n} |n> (or a thermal mixture with
// occupation probabilities p_{i,n}), the probability of a bright site is
// P_odd(i) = sum_{n odd} p_{i,n}. Averaged over many shots the picture is P_odd itself;
// a single shot is a Bernoulli draw per site (sites are uncorrelated in the product
// state), taken here from a named seed.

import { seededRandom } from '../numerics/seededRandom.js';

/**
 * P_odd per site from occupation probabilities stored site-major:
 * probabilities[site * nStates + n] = p_{site, n}, n = 0 .. nStates - 1.
 */
export function oddOccupationProbability(probabilities: Float64Array, nStates: number): Float64Array {
  if (!Number.isInteger(nStates) || nStates < 1) {
    throw new Error(`oddOccupationProbability: nStates (nmax + 1) must be a positive integer, got ${nStates}`);
  }
  if (probabilities.length % nStates !== 0) {
    throw new Error(
      `oddOccupationProbability: ${probabilities.length} probabilities are not a whole number of sites with ${nStates} states each`,
    );
  }
  const sites = probabilities.length / nStates;
  const out = new Float64Array(sites);
  for (let s = 0; s < sites; s++) {
    const base = s * nStates;
    let odd = 0;
    for (let n = 1; n < nStates; n += 2) odd += probabilities[base + n];
    out[s] = odd;
  }
  return out;
}

function checkProbabilities(pOdd: Float64Array, what: string): void {
  for (let i = 0; i < pOdd.length; i++) {
    const p = pOdd[i];
    // A little slack for rounding in sums of probabilities.
    if (!(p >= -1e-12 && p <= 1 + 1e-12)) {
      throw new Error(`${what}: P_odd must lie in [0, 1], got ${p} at site ${i}`);
    }
  }
}

/** Expected detected atoms per site after pair loss: a copy of P_odd, checked to lie in [0, 1]. */
export function expectedParityImage(pOdd: Float64Array): Float64Array {
  checkProbabilities(pOdd, 'expectedParityImage');
  const out = new Float64Array(pOdd.length);
  for (let i = 0; i < pOdd.length; i++) out[i] = Math.min(1, Math.max(0, pOdd[i]));
  return out;
}

/** One simulated parity-projected shot: 1 where a site shows an atom, else 0. */
export function sampleParityShot(pOdd: Float64Array, seed: string): Uint8Array {
  checkProbabilities(pOdd, 'sampleParityShot');
  const random = seededRandom(seed);
  const out = new Uint8Array(pOdd.length);
  // u in [0, 1): u < p is true with probability p, always for p = 1, never for p = 0.
  for (let i = 0; i < pOdd.length; i++) out[i] = random.uniform() < pOdd[i] ? 1 : 0;
  return out;
}

// Box (uniform) on-site disorder: eps_i drawn independently and uniformly from
// [-W/2, W/2) for every site, the model of Fisher, Weichman, Grinstein & Fisher,
// PRB 40, 546 (1989). Mean 0, variance W^2/12 (uniform distribution).
//
// At J = 0 and T = 0 the n = 1 Mott window shrinks to W/2 < mu < U - W/2, because
// the most shifted sites already change filling at the window edges (DESIGN.md
// section 1); that is why the box distribution, with its hard edges, is the standard
// test case for the Bose glass.
//
// The values come from the named seed through seededRandom (xoshiro128**), one
// uniform draw per site in site-index order, so a seed gives the same field on every
// machine and for every thread count.

import { seededRandom } from '../numerics/seededRandom.js';

/**
 * Site energies eps_i uniform in [-widthW/2, widthW/2), in the energy unit of widthW.
 * @param siteCount number of lattice sites (flat C-order index)
 * @param widthW full width W of the distribution (>= 0), any energy unit
 * @param seed named seed, e.g. "disorder/3"
 */
export function boxDisorder(siteCount: number, widthW: number, seed: string): Float64Array {
  if (!Number.isInteger(siteCount) || siteCount < 0) {
    throw new RangeError(`boxDisorder siteCount: expected a non-negative integer, got ${siteCount}`);
  }
  if (!Number.isFinite(widthW) || widthW < 0) {
    throw new RangeError(
      `boxDisorder widthW: expected a finite disorder width >= 0 (energy units), got ${widthW}`,
    );
  }
  if (typeof seed !== 'string' || seed.length === 0) {
    throw new RangeError('boxDisorder seed: expected a non-empty seed name, e.g. "disorder/1"');
  }
  const random = seededRandom(seed);
  const eps = new Float64Array(siteCount);
  for (let i = 0; i < siteCount; i++) {
    // uniform() is in [0, 1), so eps is in [-W/2, W/2); the missing end point has
    // probability zero and does not bias the mean at the 2^-53 level.
    eps[i] = widthW * (random.uniform() - 0.5);
  }
  return eps;
}

// J(s) and int |w|^4 (s) of one lattice axis over the depths a ramp or a modulation visits,
// sampled once on Chebyshev nodes from the exact 1D band structure and interpolated
// (depthInterpolation.ts, relative error below 1e-10 up to 50 E_r), so that a depth ramp
// can update J and U at every right-hand-side evaluation for the cost of one
// interpolation. The range is padded slightly so that round-off at its ends stays inside.

import { latticeAxisInterpolator, type LatticeAxisInterpolator } from '../physics/depthInterpolation.js';
import { maxAxisDepthEr, minAxisDepthEr } from '../physics/latticeAxis.js';
import { ParameterError } from '../physics/parameterError.js';

/** A table covering every depth in `depthsEr` (e.g. the ramp's points, or V0 (1 +- A)). */
export function depthTableCovering(depthsEr: readonly number[]): LatticeAxisInterpolator {
  if (depthsEr.length === 0) throw new ParameterError('depthEr', 'give at least one depth');
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of depthsEr) {
    if (!(s >= minAxisDepthEr && s <= maxAxisDepthEr)) {
      throw new ParameterError('depthEr', `a ramp or modulation reaches ${s} E_r, outside [${minAxisDepthEr}, ${maxAxisDepthEr}] E_r where the single-band model holds`);
    }
    lo = Math.min(lo, s);
    hi = Math.max(hi, s);
  }
  const pad = 1e-6 * Math.max(hi, 1);
  return latticeAxisInterpolator(Math.max(minAxisDepthEr, lo - pad), Math.min(maxAxisDepthEr, hi + pad));
}

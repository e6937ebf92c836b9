// The `fit-at-bound` warning (runWarnings.ts): a least-squares parameter that ends on a bound
// of its allowed range did not find a minimum inside it. Its value is then the bound, not a
// best estimate, and the covariance (the curvature at that point) says nothing about its
// uncertainty (e.g. Press et al., Numerical Recipes, 3rd ed., section 15.5: the error
// estimate assumes an interior minimum; common practice to flag). Any fit that knows its
// parameters' bounds can call this; `compare` does.

import type { RunWarning } from './runWarnings.js';

export interface BoundedParameter {
  /** name as the user knows it, e.g. 'atoms' or 'kT' */
  name: string;
  /** the value the fit ended at */
  best: number;
  /** unit of best ('' for none) */
  unit: string;
  /** true when best equals a bound of the allowed range */
  atBound: boolean;
}

/** One `fit-at-bound` warning per parameter on its bound. */
export function fitAtBoundWarnings(parameters: readonly BoundedParameter[]): RunWarning[] {
  return parameters
    .filter((p) => p.atBound)
    .map((p) => ({
      code: 'fit-at-bound',
      message:
        `the fitted ${p.name} ended on a bound of its allowed range (${Number(p.best.toPrecision(6))}${p.unit !== '' && p.unit !== p.name ? ` ${p.unit}` : ''}): ` +
        'no minimum was found inside the range, so this value is the bound itself and its uncertainty is not meaningful; ' +
        'check the image scale (counts per atom, pixel size) and the starting values, or fit fewer parameters',
    }));
}

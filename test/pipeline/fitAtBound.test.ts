// The fit-at-bound warning (src/pipeline/fitAtBound.ts): one warning per parameter that the
// fit left on a bound of its range, naming it with its value, none for interior parameters.
// A least-squares fit ending on a bound has not found an interior minimum, so its covariance
// says nothing about the uncertainty (Press et al., Numerical Recipes, 3rd ed., 15.5).

import { describe, expect, it } from 'vitest';
import { fitAtBoundWarnings } from '../../src/pipeline/fitAtBound.js';
import { leastSquaresFit } from '../../src/numerics/leastSquaresFit.js';

describe('fitAtBoundWarnings', () => {
  it('flags exactly the parameters on a bound, with name, value and unit', () => {
    const w = fitAtBoundWarnings([
      { name: 'atoms', best: 5000, unit: 'atoms', atBound: true },
      { name: 'kT', best: 0.12, unit: 'U', atBound: false },
      { name: 'centreXPixels', best: 3, unit: 'pixels', atBound: true },
    ]);
    expect(w.map((x) => x.code)).toEqual(['fit-at-bound', 'fit-at-bound']);
    expect(w[0].message).toMatch(/^the fitted atoms ended on a bound of its allowed range \(5000\)/);
    expect(w[1].message).toMatch(/centreXPixels ended on a bound of its allowed range \(3 pixels\)/);
    expect(w[1].message).toMatch(/uncertainty is not meaningful/);
  });

  it('a straight-line fit whose slope is held below its true value ends on the bound and is flagged', () => {
    // y = 2 x exactly; the slope is allowed only up to 1.5, so the minimum lies outside.
    const x = [0, 1, 2, 3, 4];
    const fit = leastSquaresFit({
      model: (p: Float64Array) => Float64Array.from(x, (xi) => p[0] * xi),
      data: Float64Array.from(x, (xi) => 2 * xi),
      sigma: 1,
      initial: [1],
      upper: [1.5],
    });
    expect(fit.atBound[0]).toBe(true);
    expect(fitAtBoundWarnings([{ name: 'slope', best: fit.best[0], unit: '', atBound: fit.atBound[0] }])).toHaveLength(1);
  });
});

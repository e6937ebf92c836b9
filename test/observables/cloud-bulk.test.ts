// The bulk of a cloud for the spanning test: density above a fraction of the peak, eroded by
// whole nearest-neighbour layers; counted by hand on small grids.
import { describe, expect, it } from 'vitest';
import { cloudBulk } from '../../src/observables/cloudBulk.js';

describe('cloudBulk', () => {
  it('keeps the sites above the fraction of the peak and erodes one layer at open faces and at the cloud edge', () => {
    // 1D: densities; peak 2, fraction 0.1 -> threshold 0.2: sites 1..6 pass, erosion drops 1 and 6.
    const b = cloudBulk(Float64Array.from([0, 0.3, 1, 2, 1.5, 0.9, 0.25, 0.1]), [8], [false], 0.1, 1);
    expect(Array.from(b.mask)).toEqual([0, 0, 1, 1, 1, 1, 0, 0]);
    expect(b.densityThreshold).toBeCloseTo(0.2, 15);
    expect(b.peakDensity).toBe(2);
  });

  it('a uniform 6 x 4 box: open faces erode, a periodic axis does not', () => {
    const density = new Float64Array(24).fill(1);
    expect(cloudBulk(density, [6, 4], [false, false], 0.1, 1).sites).toBe(4 * 2);
    expect(cloudBulk(density, [6, 4], [false, true], 0.1, 1).sites).toBe(4 * 4);
    expect(cloudBulk(density, [6, 4], [false, false], 0.1, 2).sites).toBe(0);
    expect(cloudBulk(density, [6, 4], [false, false], 0.1, 0).sites).toBe(24);
  });

  it('an empty lattice has no bulk', () => {
    expect(cloudBulk(new Float64Array(9), [3, 3], [false, false], 0.1, 1).sites).toBe(0);
  });
});

// Grid shapes of lattice fields: sizes padded to three axes (C order, first axis slowest,
// so trailing axes of length 1 leave every flat index i = (x ny + y) nz + z unchanged).

import { describe, expect, it } from 'vitest';
import { gridSizes } from '../../src/lattice/gridShape.js';

describe('gridSizes', () => {
  it('pads 1-D and 2-D shapes with trailing ones and keeps the site count', () => {
    expect(gridSizes([7], 'f')).toEqual([7, 1, 1]);
    expect(gridSizes([4, 5], 'f')).toEqual([4, 5, 1]);
    expect(gridSizes([2, 3, 4], 'f')).toEqual([2, 3, 4]);
    // (x ny + y) nz + z with nz = 1 is the 2-D index x ny + y
    const [, ny, nz] = gridSizes([4, 5], 'f');
    expect((3 * ny + 2) * nz + 0).toBe(3 * 5 + 2);
  });

  it('names the caller and the bad axis', () => {
    expect(() => gridSizes([], 'speckle')).toThrow(/^speckle shape: expected \[nx\], \[nx, ny\] or \[nx, ny, nz\], got \[\]$/);
    expect(() => gridSizes([1, 2, 3, 4], 'clusters')).toThrow(/clusters shape: expected/);
    expect(() => gridSizes([3, 0], 'radialProfile')).toThrow(/^radialProfile shape\[1\]: expected an integer >= 1, got 0$/);
    expect(() => gridSizes([2.5], 'x')).toThrow(/shape\[0\]: expected an integer >= 1, got 2.5/);
  });
});

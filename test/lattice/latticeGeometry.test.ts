// mapSites against the flat C order written out by hand (index = (x * ny + y) * nz + z,
// missing axes of length 1 in front): a 2 x 3 plane is [1, 2, 3] internally, so its sites
// come as (x, y) = (0,0) (0,1) (0,2) (1,0) (1,1) (1,2); and against siteCoordinates on a cube.
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry, mapSites, siteCoordinates } from '../../src/lattice/latticeGeometry.js';

describe('mapSites', () => {
  it('visits a 2 x 3 plane in the hand-written C order', () => {
    const geometry = createLatticeGeometry([2, 3], [false, false]);
    const out = mapSites(geometry, (q) => 100 * q[0] + 10 * q[1] + q[2]);
    expect(Array.from(out)).toEqual([0, 1, 2, 10, 11, 12]);
  });

  it('gives each site of a 3 x 2 x 4 lattice the coordinates siteCoordinates names', () => {
    const geometry = createLatticeGeometry([3, 2, 4], [false, false, true]);
    const seen: number[][] = [];
    const out = mapSites(geometry, (q) => {
      seen.push(Array.from(q));
      return seen.length - 1;
    });
    expect(out.length).toBe(24);
    for (let i = 0; i < 24; i++) {
      expect(out[i]).toBe(i);
      expect(seen[i]).toEqual(siteCoordinates(geometry, i, []));
    }
  });
});

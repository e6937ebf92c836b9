// columnProjection against hand counts on a 2 x 3 x 4 field in C order (flat index
// i = 12 x + 4 y + z): the kept axes, their lengths and strides for each line of sight, and
// that layer * sl + u * su + v * sv visits every site exactly once at its own coordinates.
import { describe, expect, it } from 'vitest';
import { columnProjection, keptAxes } from '../../src/lattice/columnProjection.js';

describe('columnProjection', () => {
  const n: [number, number, number] = [2, 3, 4];

  it('gives the hand-counted axes, lengths and strides for each imaging axis', () => {
    expect(columnProjection(n, 0)).toEqual({ kept: [1, 2], lu: 3, lv: 4, su: 4, sv: 1, sl: 12, layers: 2 });
    expect(columnProjection(n, 1)).toEqual({ kept: [0, 2], lu: 2, lv: 4, su: 12, sv: 1, sl: 4, layers: 3 });
    expect(columnProjection(n, 2)).toEqual({ kept: [0, 1], lu: 2, lv: 3, su: 12, sv: 4, sl: 1, layers: 4 });
    expect(keptAxes(1)).toEqual([0, 2]);
  });

  it('walks every site once, at the coordinates the kept axes name', () => {
    for (const axis of [0, 1, 2] as const) {
      const { kept, lu, lv, su, sv, sl, layers } = columnProjection(n, axis);
      const seen = new Array<number>(24).fill(0);
      for (let layer = 0; layer < layers; layer++) {
        for (let u = 0; u < lu; u++) {
          for (let v = 0; v < lv; v++) {
            const i = layer * sl + u * su + v * sv;
            const coords = [Math.floor(i / 12), Math.floor(i / 4) % 3, i % 4];
            expect([coords[kept[0]], coords[kept[1]], coords[axis]]).toEqual([u, v, layer]);
            seen[i]++;
          }
        }
      }
      expect(seen).toEqual(new Array<number>(24).fill(1));
    }
  });
});

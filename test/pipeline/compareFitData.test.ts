// Direct test of src/pipeline/compareFitData.ts on a 4 x 4 picture whose numbers are counted by
// hand: the border (frame edge, and the used pixels next to a masked one) holds six pixels at
// 0.5 and six at 3 atoms, the inside 5, 6, 7, 8. The median of the twelve edge pixels is
// (0.5 + 3) / 2 = 1.75; with the pixel at 5 masked, its used neighbours 6 and 7 join the
// border, and the median of the fourteen is 3. A stack: every shot loses its own border
// median and the data are the mean of the shots.

import { describe, expect, it } from 'vitest';
import { fitData } from '../../src/pipeline/compareFitData.js';
import type { MeasuredImage } from '../../src/imaging/measuredImage.js';

const nx = 4;
const ny = 4;
/** Grid layout values[i * ny + j]: the edge alternates 0.5 and 3 (six each), inside (1,1)=5, (1,2)=6, (2,1)=7, (2,2)=8. */
function picture(offset = 0): Float64Array {
  const v = new Float64Array(nx * ny);
  let edge = 0;
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < ny; j++) {
      const inside = i > 0 && j > 0 && i < nx - 1 && j < ny - 1;
      v[i * ny + j] = offset + (inside ? 5 + (i - 1) * 2 + (j - 1) : edge++ % 2 === 0 ? 0.5 : 3);
    }
  }
  return v;
}
const image = (values: Float64Array, mask: Uint8Array): MeasuredImage => ({
  nx,
  ny,
  values,
  mask,
  usedPixels: mask.reduce((s, m) => s + m, 0),
  pixelUm: 1,
  variance: null,
  countsPerAtom: 1,
  totalAtoms: 0,
  shotCount: 1,
});
const allUsed = new Uint8Array(nx * ny).fill(1);

describe('fitData', () => {
  it('subtracts the median of the border from one picture', () => {
    const values = picture();
    const d = fitData(image(values, allUsed), null, true);
    expect(d.background).toBe(1.75);
    expect(d.borderLevel).toBe(1.75);
    expect(Array.from(d.usedIndex)).toEqual([...Array(16).keys()]);
    expect(Array.from(d.dataUsed)).toEqual(Array.from(values, (v) => v - 1.75));
    expect(d.shotData).toEqual([]);
    // With the offset fitted, nothing is subtracted but the border level is still reported.
    const kept = fitData(image(values, allUsed), null, false);
    expect(kept.background).toBe(0);
    expect(kept.borderLevel).toBe(1.75);
    expect(Array.from(kept.dataUsed)).toEqual(Array.from(values));
  });
  it('leaves masked pixels out and counts their neighbours as border', () => {
    const mask = Uint8Array.from(allUsed);
    mask[1 * ny + 1] = 0; // the pixel at 5
    const d = fitData(image(picture(), mask), null, true);
    expect(d.background).toBe(3);
    expect(d.usedIndex.length).toBe(15);
    expect(d.usedIndex.includes(1 * ny + 1)).toBe(false);
    expect(Number.isNaN(d.data[1 * ny + 1])).toBe(true);
    expect(d.data[2 * ny + 2]).toBe(8 - 3);
  });
  it('takes each shot of a stack about its own border median and fits their mean', () => {
    // Shots offset by 0 and 2 atoms: border medians 1.75 and 3.75, so both shots give the same data.
    const shots = [picture(0), picture(2)];
    const mean = Float64Array.from(shots[0], (v, p) => (v + shots[1][p]) / 2);
    const d = fitData(image(mean, allUsed), shots, true);
    expect(d.background).toBe((1.75 + 3.75) / 2);
    expect(d.borderLevel).toBe((1.75 + 3.75) / 2);
    const expected = Array.from(picture(), (v) => v - 1.75);
    expect(Array.from(d.dataUsed)).toEqual(expected);
    expect(d.shotData.map((s) => Array.from(s))).toEqual([expected, expected]);
    // Atoms of one shot: 6 x 0.5 + 6 x 3 + 5 + 6 + 7 + 8 - 16 x 1.75 = 19.
    expect(d.shotAtoms).toEqual([19, 19]);
  });
});

// quadrilateralSquareOverlap against areas worked out by hand (elementary geometry):
// - a unit square shifted by (0.5, 0) covers half of the pixel: 1/2;
// - shifted by (0.25, 0.5): (1 - 0.25)(1 - 0.5) = 0.375;
// - a unit square turned by 45 degrees about the pixel centre: the square minus four corner
//   triangles of legs h = (sqrt 2 - 1)/2 sticking out past each edge, each of area h^2, so
//   1 - (sqrt 2 - 1)^2 = 2 sqrt 2 - 2;
// - a square far away: 0; a square holding the whole pixel: 1;
// - any quadrilateral's overlaps over the pixels it touches add up to its own shoelace area;
// - touchedPixels: the bounding box of the corners in whole pixels, clipped to the grid (hand-worked).
import { describe, expect, it } from 'vitest';
import { quadrilateralSquareOverlap, touchedPixels } from '../../src/imaging/squareOverlap.js';

function square(cx: number, cy: number, side: number, angle: number): Float64Array {
  const corners = new Float64Array(8);
  const c = Math.cos(angle);
  const s = Math.sin(angle);
  for (let k = 0; k < 4; k++) {
    const du = (k === 1 || k === 2 ? 0.5 : -0.5) * side;
    const dv = (k >= 2 ? 0.5 : -0.5) * side;
    corners[2 * k] = cx + c * du - s * dv;
    corners[2 * k + 1] = cy + s * du + c * dv;
  }
  return corners;
}

describe('quadrilateralSquareOverlap', () => {
  it('gives the hand-worked areas of shifted and turned unit squares', () => {
    expect(quadrilateralSquareOverlap(square(1, 0.5, 1, 0), 0, 0)).toBeCloseTo(0.5, 14);
    expect(quadrilateralSquareOverlap(square(0.75, 1, 1, 0), 0, 0)).toBeCloseTo(0.375, 14);
    expect(quadrilateralSquareOverlap(square(0.5, 0.5, 1, Math.PI / 4), 0, 0)).toBeCloseTo(2 * Math.SQRT2 - 2, 14);
    expect(quadrilateralSquareOverlap(square(5.5, 0.5, 1, 0.3), 0, 0)).toBe(0);
    expect(quadrilateralSquareOverlap(square(3.5, -1.5, 3, 0), 3, -2)).toBeCloseTo(1, 14);
  });

  it('splits a turned, scaled square over its pixels without losing area', () => {
    const side = 1.7;
    const corners = square(2.3, 1.9, side, 0.41);
    let total = 0;
    for (let x = -2; x <= 6; x++) for (let y = -2; y <= 6; y++) total += quadrilateralSquareOverlap(corners, x, y);
    expect(total).toBeCloseTo(side * side, 12);
  });

  it('names the pixels a quadrilateral can touch, clipped to the grid (hand-worked)', () => {
    const range = new Float64Array(4);
    // a unit square turned by 45 degrees about (2.5, 1.5) reaches x 1.79 .. 3.21, y 0.79 .. 2.21
    touchedPixels(square(2.5, 1.5, 1, Math.PI / 4), 10, 10, range);
    expect(Array.from(range)).toEqual([1, 3, 0, 2]);
    // clipped at the grid: x -0.5 .. 1.5 on a 1-wide grid, y 8.5 .. 10.5 on a 10-high grid
    touchedPixels(square(0.5, 9.5, 2, 0), 1, 10, range);
    expect(Array.from(range)).toEqual([0, 0, 8, 9]);
    // far off the grid: an empty range (first > last), not a wrapped integer
    touchedPixels(square(5e9, 1, 1, 0), 4, 4, range);
    expect(range[0]).toBeGreaterThan(range[1]);
  });

  it('over the touched pixels only, recovers the whole area of a quadrilateral inside the grid', () => {
    const corners = square(4.2, 3.7, 2.3, 1.1);
    const range = new Float64Array(4);
    touchedPixels(corners, 12, 12, range);
    let total = 0;
    for (let x = range[0]; x <= range[1]; x++) for (let y = range[2]; y <= range[3]; y++) total += quadrilateralSquareOverlap(corners, x, y);
    expect(total).toBeCloseTo(2.3 * 2.3, 12);
  });
});

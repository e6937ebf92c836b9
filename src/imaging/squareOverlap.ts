// Exact overlap area of a convex quadrilateral with one unit pixel square, and the pixels it
// can touch: the core of the
// two conserving resamplers, site cells onto camera pixels at an angle (rotatedResample.ts)
// and a camera frame rotated by any angle (camera/imageGeometry.ts). The quadrilateral is
// clipped against the four edges of the square (Sutherland & Hodgman, Commun. ACM 17, 32
// (1974)) and the area of what is left follows from the shoelace formula. Both callers
// need the areas of one quadrilateral to add up to its own area over the pixels it covers,
// which exact clipping gives to rounding (interpolation would not).
//
// Hot path: called once per (source cell, touched pixel) pair, so it works in two module
// buffers and allocates nothing; it is not re-entrant, which is fine in single-threaded JS.

// Clipping buffers (x, y interleaved), reused: a square clipped by four half-planes has at most 8 vertices.
const polyA = new Float64Array(32);
const polyB = new Float64Array(32);

/** Clip `src` (n vertices) to the half-plane sign * (coordinate - limit) <= 0 on axis 0 (x) or 1 (y); returns the vertex count in dst. */
function clip(src: Float64Array, n: number, dst: Float64Array, axis: number, limit: number, sign: number): number {
  let m = 0;
  for (let i = 0; i < n; i++) {
    const j = i + 1 === n ? 0 : i + 1;
    const ax = src[2 * i];
    const ay = src[2 * i + 1];
    const bx = src[2 * j];
    const by = src[2 * j + 1];
    const da = sign * ((axis === 0 ? ax : ay) - limit);
    const db = sign * ((axis === 0 ? bx : by) - limit);
    if (da <= 0) {
      dst[2 * m] = ax;
      dst[2 * m + 1] = ay;
      m++;
    }
    if ((da < 0 && db > 0) || (da > 0 && db < 0)) {
      const f = da / (da - db);
      dst[2 * m] = ax + f * (bx - ax);
      dst[2 * m + 1] = ay + f * (by - ay);
      m++;
    }
  }
  return m;
}

/**
 * Area of the convex quadrilateral `corners` (4 vertices in order, x and y interleaved, in
 * pixel units) inside the unit square [x0, x0 + 1] x [y0, y0 + 1].
 */
export function quadrilateralSquareOverlap(corners: Float64Array, x0: number, y0: number): number {
  for (let k = 0; k < 8; k++) polyA[k] = corners[k]; // no subarray view: no allocation per call
  let n = clip(polyA, 4, polyB, 0, x0, -1); // x >= x0
  if (n === 0) return 0;
  n = clip(polyB, n, polyA, 0, x0 + 1, 1); // x <= x0 + 1
  if (n === 0) return 0;
  n = clip(polyA, n, polyB, 1, y0, -1);
  if (n === 0) return 0;
  n = clip(polyB, n, polyA, 1, y0 + 1, 1);
  let area = 0;
  for (let i = 0; i < n; i++) {
    const j = i + 1 === n ? 0 : i + 1;
    area += polyA[2 * i] * polyA[2 * j + 1] - polyA[2 * j] * polyA[2 * i + 1];
  }
  return Math.abs(area) / 2;
}

/**
 * The pixels a quadrilateral can touch on an nx x ny grid of unit squares (pixel k spans
 * [k, k + 1]): writes [kFirst, kLast, lFirst, lLast] into range, clipped to the grid (empty,
 * first > last, when the bounding box misses it). Float64 so that a far-off or non-finite
 * corner keeps an empty range instead of wrapping as an integer. Lets the callers visit only
 * those pixels.
 */
export function touchedPixels(corners: Float64Array, nx: number, ny: number, range: Float64Array): void {
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let k = 0; k < 4; k++) {
    const x = corners[2 * k];
    const y = corners[2 * k + 1];
    if (x < minX) minX = x;
    if (x > maxX) maxX = x;
    if (y < minY) minY = y;
    if (y > maxY) maxY = y;
  }
  range[0] = Math.max(0, Math.floor(minX));
  range[1] = Math.min(nx - 1, Math.floor(maxX));
  range[2] = Math.max(0, Math.floor(minY));
  range[3] = Math.min(ny - 1, Math.floor(maxY));
}

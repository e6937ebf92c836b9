// Row-column passes of a 2-D complex FFT on a flat, interleaved [re, im] grid of
// rows x cols points (row-major: the second index is contiguous), built on fft.js
// (radix-4, power-of-two sizes). A 2-D DFT is separable, so transforming every row and
// then every column gives the full 2-D transform; exposing the passes separately lets a
// caller skip rows that are known to be zero and columns whose values it does not need.
//
// Convention (fft.js): transform computes X_k = sum_n x_n exp(-2 pi i k n / N) with no
// normalisation; inverseTransform uses exp(+2 pi i k n / N) and divides by N.

import FFT from 'fft.js';

/** A 1-D complex FFT of one power-of-two size; data and out are interleaved [re, im]. */
export interface ComplexFftPlan {
  readonly size: number;
  transform(out: Float64Array, data: Float64Array): void;
  inverseTransform(out: Float64Array, data: Float64Array): void;
}

/** True for 2, 4, 8, ... (the sizes fft.js accepts). */
export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

/** Smallest power of two >= max(n, 2). */
export function nextPowerOfTwo(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

export function complexFftPlan(size: number): ComplexFftPlan {
  if (!isPowerOfTwo(size)) {
    throw new RangeError(`complexFftPlan size: expected a power of two >= 2, got ${size}`);
  }
  // fft.js ships an `export =` declaration with `any` parameters; this narrows it.
  return new FFT(size) as unknown as ComplexFftPlan;
}

/**
 * Transforms rows in place. rowBuffer must hold 2*cols numbers. With rowSelection, only
 * rows whose flag is nonzero are transformed (the transform of a zero row is zero).
 */
export function transformRows(
  grid: Float64Array,
  rows: number,
  cols: number,
  plan: ComplexFftPlan,
  rowBuffer: Float64Array,
  inverse: boolean,
  rowSelection?: Uint8Array,
): void {
  const rowLength = 2 * cols;
  for (let r = 0; r < rows; r++) {
    if (rowSelection !== undefined && rowSelection[r] === 0) continue;
    const row = grid.subarray(r * rowLength, (r + 1) * rowLength);
    if (inverse) plan.inverseTransform(rowBuffer, row);
    else plan.transform(rowBuffer, row);
    row.set(rowBuffer);
  }
}

/**
 * Transforms one column: gathers it into columnIn, transforms into columnOut (both
 * 2*rows long) and, when writeBack is set, scatters the result back into the grid.
 * Without writeBack the grid is untouched and the caller reads columnOut.
 */
export function transformColumn(
  grid: Float64Array,
  rows: number,
  cols: number,
  column: number,
  plan: ComplexFftPlan,
  columnIn: Float64Array,
  columnOut: Float64Array,
  inverse: boolean,
  writeBack: boolean,
): void {
  const stride = 2 * cols;
  let at = 2 * column;
  for (let r = 0; r < rows; r++, at += stride) {
    columnIn[2 * r] = grid[at];
    columnIn[2 * r + 1] = grid[at + 1];
  }
  if (inverse) plan.inverseTransform(columnOut, columnIn);
  else plan.transform(columnOut, columnIn);
  if (!writeBack) return;
  at = 2 * column;
  for (let r = 0; r < rows; r++, at += stride) {
    grid[at] = columnOut[2 * r];
    grid[at + 1] = columnOut[2 * r + 1];
  }
}

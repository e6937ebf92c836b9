// Discrete Fourier transforms of power-of-two length on flat, interleaved [re, im] arrays,
// on top of fft.js (a maintained radix-4 FFT; it accepts power-of-two sizes >= 2 only).
//
// Convention (the one of fft.js):
//   forward  X_k = sum_n x_n exp(-2 pi i k n / N)            (no normalisation)
//   inverse  x_n = (1/N) sum_k X_k exp(+2 pi i k n / N)
// so inverse(forward(x)) = x. The 2-D transform of a grid of rows x cols points in C order
// (element (r, c) at 2 (r cols + c), the second index contiguous) is separable: every row is
// transformed, then every column (the row-column method; e.g. Press et al., Numerical
// Recipes, 3rd ed., sec. 12.5). The passes are exposed separately because the callers know
// more than the transform does: rows that are zero on input need no transform (zero
// padding), and often only a few columns of the result are read at all.
//
// Determinism: each 1-D transform is fft.js on the same values in the same order, so the
// results are bit-identical on every machine and for every caller that asks for the same
// passes.
//
// There is no 3-D or real-input transform here because nothing needs one: 3-D lattices
// are transformed plane by plane (the speckle propagates each plane to its own z; the
// momentum structure factor sums layers that do not interfere), and the one real-valued
// filter (speckle intensity) packs two real planes into one complex grid instead.

import FFT from 'fft.js';

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

export type FftDirection = 'forward' | 'inverse';

/** A 1-D complex FFT of one power-of-two size; `data` and `out` are interleaved [re, im] and must differ. */
export interface ComplexFft1d {
  readonly size: number;
  transform(out: Float64Array, data: Float64Array): void;
  inverseTransform(out: Float64Array, data: Float64Array): void;
}

/** A 1-D plan (twiddle tables built once). */
export function complexFft1d(size: number, parameter = 'size'): ComplexFft1d {
  if (!isPowerOfTwo(size)) {
    throw new RangeError(`FFT ${parameter}: expected a power of two >= 2 (zero-pad to nextPowerOfTwo), got ${size}`);
  }
  // fft.js ships an `export =` declaration with `any` parameters; this narrows it.
  return new FFT(size) as unknown as ComplexFft1d;
}

function run(plan: ComplexFft1d, direction: FftDirection, out: Float64Array, data: Float64Array): void {
  if (direction === 'forward') plan.transform(out, data);
  else plan.inverseTransform(out, data);
}

/**
 * Plan for 2-D transforms of a rows x cols grid (both powers of two), interleaved complex,
 * C order. It owns its scratch buffers, so one plan serves one caller at a time.
 */
export class ComplexFft2d {
  readonly rows: number;
  readonly cols: number;
  private readonly rowPlan: ComplexFft1d;
  private readonly columnPlan: ComplexFft1d;
  private readonly rowOut: Float64Array;
  private readonly columnIn: Float64Array;
  private readonly columnOut: Float64Array;

  constructor(rows: number, cols: number) {
    this.columnPlan = complexFft1d(rows, 'rows');
    this.rowPlan = rows === cols ? this.columnPlan : complexFft1d(cols, 'cols');
    this.rows = rows;
    this.cols = cols;
    this.rowOut = new Float64Array(2 * cols);
    this.columnIn = new Float64Array(2 * rows);
    this.columnOut = new Float64Array(2 * rows);
  }

  private check(grid: Float64Array): void {
    if (grid.length !== 2 * this.rows * this.cols) {
      throw new RangeError(
        `FFT grid: expected ${2 * this.rows * this.cols} interleaved values for ${this.rows} x ${this.cols} points, got ${grid.length}`,
      );
    }
  }

  /**
   * Transforms rows in place. With `rowMask`, only rows whose flag is non-zero are
   * transformed: the caller asserts the others are zero (their transform is zero).
   */
  transformRows(grid: Float64Array, direction: FftDirection, rowMask?: Uint8Array): void {
    this.check(grid);
    const rowLength = 2 * this.cols;
    for (let r = 0; r < this.rows; r++) {
      if (rowMask !== undefined && rowMask[r] === 0) continue;
      const row = grid.subarray(r * rowLength, (r + 1) * rowLength);
      run(this.rowPlan, direction, this.rowOut, row);
      row.set(this.rowOut);
    }
  }

  /**
   * Transforms one column without changing the grid and returns it (2 rows interleaved
   * values). The returned array is the plan's scratch buffer: read it before the next call.
   */
  transformColumn(grid: Float64Array, column: number, direction: FftDirection): Float64Array {
    this.check(grid);
    if (!Number.isInteger(column) || column < 0 || column >= this.cols) {
      throw new RangeError(`FFT column: expected an integer in [0, ${this.cols - 1}], got ${column}`);
    }
    const { rows, columnIn, columnOut } = this;
    const stride = 2 * this.cols;
    for (let r = 0, at = 2 * column; r < rows; r++, at += stride) {
      columnIn[2 * r] = grid[at];
      columnIn[2 * r + 1] = grid[at + 1];
    }
    run(this.columnPlan, direction, columnOut, columnIn);
    return columnOut;
  }

  /** Transforms every column in place. */
  transformColumns(grid: Float64Array, direction: FftDirection): void {
    const stride = 2 * this.cols;
    for (let c = 0; c < this.cols; c++) {
      const result = this.transformColumn(grid, c, direction);
      for (let r = 0, at = 2 * c; r < this.rows; r++, at += stride) {
        grid[at] = result[2 * r];
        grid[at + 1] = result[2 * r + 1];
      }
    }
  }

  /** The full 2-D transform in place: rows (those in `rowMask`, if given), then all columns. */
  transform(grid: Float64Array, direction: FftDirection, rowMask?: Uint8Array): void {
    this.transformRows(grid, direction, rowMask);
    this.transformColumns(grid, direction);
  }
}

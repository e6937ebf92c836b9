// Two-dimensional complex FFT by the row-column method on top of fft.js (a maintained
// radix-4 1D FFT, power-of-two sizes). Forward transform, no normalisation:
// X[p, q] = sum_{x, y} x[x, y] exp(-2 pi i (p x / Mx + q y / My)).
// Data are interleaved [re, im] in C order (x slowest): element (x, y) at 2 (x My + y).

import FFT from 'fft.js';
import { isPowerOfTwo, nextPowerOfTwo } from './gridFft.js';

export { isPowerOfTwo, nextPowerOfTwo };

/** Reusable plan for Mx x My transforms: allocates its scratch buffers once. */
export class Fft2d {
  readonly mx: number;
  readonly my: number;
  private readonly rowFft: FFT;
  private readonly colFft: FFT;
  private readonly rowOut: Float64Array;
  private readonly colIn: Float64Array;
  private readonly colOut: Float64Array;

  constructor(mx: number, my: number) {
    if (!isPowerOfTwo(mx) || !isPowerOfTwo(my)) {
      throw new Error(`Fft2d: sizes must be powers of two >= 2, got ${mx} x ${my}`);
    }
    this.mx = mx;
    this.my = my;
    this.rowFft = new FFT(my);
    this.colFft = mx === my ? this.rowFft : new FFT(mx);
    this.rowOut = new Float64Array(2 * my);
    this.colIn = new Float64Array(2 * mx);
    this.colOut = new Float64Array(2 * mx);
  }

  /**
   * Forward transform of `data` in place. `nonZeroRows`: only rows x < nonZeroRows may
   * be non-zero on input (zero padding), so the other row transforms are skipped.
   */
  forwardInPlace(data: Float64Array, nonZeroRows = this.mx): void {
    const { mx, my, rowOut, colIn, colOut } = this;
    if (data.length !== 2 * mx * my) {
      throw new Error(`Fft2d: expected ${2 * mx * my} interleaved values, got ${data.length}`);
    }
    for (let x = 0; x < nonZeroRows; x++) {
      const row = data.subarray(2 * x * my, 2 * (x + 1) * my);
      this.rowFft.transform(rowOut, row);
      row.set(rowOut);
    }
    const stride = 2 * my;
    for (let y = 0; y < my; y++) {
      for (let x = 0, p = 2 * y; x < mx; x++, p += stride) {
        colIn[2 * x] = data[p];
        colIn[2 * x + 1] = data[p + 1];
      }
      this.colFft.transform(colOut, colIn);
      for (let x = 0, p = 2 * y; x < mx; x++, p += stride) {
        data[p] = colOut[2 * x];
        data[p + 1] = colOut[2 * x + 1];
      }
    }
  }
}

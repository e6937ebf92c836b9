// The FFT wrapper against the defining sums. Reference: the DFT written out,
// X_k = sum_n x_n exp(-2 pi i k n / N) (and the 2-D double sum), evaluated directly in
// O(N^2) with twiddles from Math.cos/Math.sin of the reduced angle 2 pi (k n mod N) / N.
// Tolerance: the FFT's rounding error grows like eps log2 N times the l2 norm of the input
// (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 24.1), the direct
// sum's like eps N; 1e-12 of the l2 norm covers both for N <= 64 per axis with room.

import { describe, expect, it } from 'vitest';
import { ComplexFft2d, complexFft1d, isPowerOfTwo, nextPowerOfTwo } from '../../src/numerics/fft.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

function randomComplex(count: number, seed: string): Float64Array {
  const random = seededRandom(seed);
  return Float64Array.from({ length: 2 * count }, () => random.uniform() - 0.5);
}

function naiveDft1d(x: Float64Array, sign: -1 | 1): Float64Array {
  const n = x.length / 2;
  const out = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    let re = 0;
    let im = 0;
    for (let j = 0; j < n; j++) {
      const angle = (sign * 2 * Math.PI * ((k * j) % n)) / n;
      const c = Math.cos(angle);
      const s = Math.sin(angle);
      re += x[2 * j] * c - x[2 * j + 1] * s;
      im += x[2 * j] * s + x[2 * j + 1] * c;
    }
    out[2 * k] = re;
    out[2 * k + 1] = im;
  }
  return out;
}

function naiveDft2d(x: Float64Array, rows: number, cols: number): Float64Array {
  const out = new Float64Array(2 * rows * cols);
  for (let p = 0; p < rows; p++) {
    for (let q = 0; q < cols; q++) {
      let re = 0;
      let im = 0;
      for (let r = 0; r < rows; r++) {
        for (let c = 0; c < cols; c++) {
          // exp(-2 pi i (p r / rows + q c / cols)), angle reduced to one turn
          const turns = ((p * r) % rows) / rows + ((q * c) % cols) / cols;
          const angle = -2 * Math.PI * turns;
          const at = 2 * (r * cols + c);
          re += x[at] * Math.cos(angle) - x[at + 1] * Math.sin(angle);
          im += x[at] * Math.sin(angle) + x[at + 1] * Math.cos(angle);
        }
      }
      out[2 * (p * cols + q)] = re;
      out[2 * (p * cols + q) + 1] = im;
    }
  }
  return out;
}

function norm(x: Float64Array): number {
  let s = 0;
  for (const v of x) s += v * v;
  return Math.sqrt(s);
}

function maxDifference(a: Float64Array, b: Float64Array): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

describe('power-of-two sizes', () => {
  it('accepts 2, 4, 8, ... and says how to fix another size', () => {
    expect([2, 4, 1024].every(isPowerOfTwo)).toBe(true);
    expect([0, 1, 3, 6, 2.5, -4].some(isPowerOfTwo)).toBe(false);
    expect([1, 2, 3, 64, 65].map(nextPowerOfTwo)).toEqual([2, 2, 4, 64, 128]);
    expect(() => complexFft1d(12)).toThrow(/size: expected a power of two .* got 12/);
    expect(() => new ComplexFft2d(8, 6)).toThrow(/cols: expected a power of two/);
  });
});

describe('1-D transform against the direct DFT sum', () => {
  for (const n of [2, 4, 8, 32, 64]) {
    it(`forward and inverse agree with the sums for N = ${n}`, () => {
      const x = randomComplex(n, `fft1d/${n}`);
      const plan = complexFft1d(n);
      const out = new Float64Array(2 * n);
      plan.transform(out, x);
      expect(maxDifference(out, naiveDft1d(x, -1))).toBeLessThan(1e-12 * norm(x));
      const back = new Float64Array(2 * n);
      plan.inverseTransform(back, out);
      // inverse includes 1/N: inverse(forward(x)) = x
      expect(maxDifference(back, x)).toBeLessThan(1e-13 * norm(x));
      const inverseSum = naiveDft1d(out, 1).map((v) => v / n);
      expect(maxDifference(back, inverseSum)).toBeLessThan(1e-12 * norm(x));
    });
  }

  it('maps a unit impulse at n0 to the phase ramp exp(-2 pi i k n0 / N) (closed form)', () => {
    const n = 16;
    const x = new Float64Array(2 * n);
    x[2 * 3] = 1;
    const out = new Float64Array(2 * n);
    complexFft1d(n).transform(out, x);
    for (let k = 0; k < n; k++) {
      expect(out[2 * k]).toBeCloseTo(Math.cos((-2 * Math.PI * k * 3) / n), 14);
      expect(out[2 * k + 1]).toBeCloseTo(Math.sin((-2 * Math.PI * k * 3) / n), 14);
    }
  });
});

describe('2-D transform against the direct double sum', () => {
  for (const [rows, cols] of [
    [2, 2],
    [4, 8],
    [16, 4],
    [8, 8],
  ] as const) {
    it(`${rows} x ${cols}: full transform, and rows / columns separately`, () => {
      const x = randomComplex(rows * cols, `fft2d/${rows}x${cols}`);
      const reference = naiveDft2d(x, rows, cols);
      const fft = new ComplexFft2d(rows, cols);
      const grid = Float64Array.from(x);
      fft.transform(grid, 'forward');
      expect(maxDifference(grid, reference)).toBeLessThan(1e-12 * norm(x));

      // Rows, then single columns read without writing back: the same values.
      const partial = Float64Array.from(x);
      fft.transformRows(partial, 'forward');
      const before = Float64Array.from(partial);
      for (let c = 0; c < cols; c++) {
        const column = fft.transformColumn(partial, c, 'forward');
        for (let r = 0; r < rows; r++) {
          expect(column[2 * r]).toBe(grid[2 * (r * cols + c)]);
          expect(column[2 * r + 1]).toBe(grid[2 * (r * cols + c) + 1]);
        }
      }
      expect(partial).toEqual(before);

      // Inverse undoes forward (1 / (rows cols) included).
      fft.transform(grid, 'inverse');
      expect(maxDifference(grid, x)).toBeLessThan(1e-13 * norm(x));
    });
  }

  it('skips rows flagged zero in the mask and still gives the transform of the zero-padded grid', () => {
    const rows = 16;
    const cols = 8;
    const x = new Float64Array(2 * rows * cols);
    const filled = randomComplex(5 * cols, 'fft2d/padded');
    x.set(filled); // rows 0..4 hold data, the rest is zero padding
    const mask = new Uint8Array(rows);
    mask.fill(1, 0, 5);
    const fft = new ComplexFft2d(rows, cols);
    const masked = Float64Array.from(x);
    fft.transform(masked, 'forward', mask);
    const full = Float64Array.from(x);
    fft.transform(full, 'forward');
    expect(masked).toEqual(full); // a zero row transforms to zero exactly
    expect(maxDifference(masked, naiveDft2d(x, rows, cols))).toBeLessThan(1e-12 * norm(x));
  });

  it('satisfies Parseval: sum |X|^2 = rows cols sum |x|^2', () => {
    const rows = 32;
    const cols = 16;
    const x = randomComplex(rows * cols, 'fft2d/parseval');
    const grid = Float64Array.from(x);
    new ComplexFft2d(rows, cols).transform(grid, 'forward');
    expect(norm(grid) ** 2 / (rows * cols * norm(x) ** 2)).toBeCloseTo(1, 13);
  });

  it('names the bad argument', () => {
    const fft = new ComplexFft2d(4, 4);
    expect(() => fft.transform(new Float64Array(30), 'forward')).toThrow(/expected 32 interleaved values for 4 x 4 points, got 30/);
    expect(() => fft.transformColumn(new Float64Array(32), 4, 'forward')).toThrow(/column: expected an integer in \[0, 3\], got 4/);
  });
});

// Pixel scales of a time-of-flight picture and the far-field check, against numbers worked
// out by hand (CODATA 2018 constants; 87Rb mass 86.909180527 u, recalled from memory).

import { describe, expect, it } from 'vitest';
import { cloudEdgeFraction, cloudRadiusUm, farFieldCheck, timeOfFlightScales } from '../../src/imaging/timeOfFlightScales.js';

const rb87Kg = 86.909180527 * 1.6605390666e-27;

describe('time-of-flight pixel scales', () => {
  it('gives m p / (hbar t) for the pixel in the plane of the atoms (13 um camera pixel, magnification 2, 15 ms)', () => {
    // By hand: p = 13 / 2 = 6.5 um; m = 1.443161e-25 kg; m p / (hbar t) =
    // 1.443161e-25 * 6.5e-6 / (1.054572e-34 * 0.015) = 5.93008e5 / m = 0.593008 / um.
    // k_L = pi / 0.532 um = 5.905249 / um: 0.100421 hbar k_L per pixel.
    // x_1 = h t / (m a) = 6.626070e-34 * 0.015 / (1.443161e-25 * 0.532e-6) = 129.456 um = 19.916 pixels.
    const s = timeOfFlightScales({ objectPixelUm: 13 / 2, flightTimeMs: 15, massKg: rb87Kg, latticeSpacingUm: 0.532 });
    expect(s.objectPixelUm).toBe(6.5);
    expect(s.wavenumberPerPixelInverseUm).toBeCloseTo(0.593008, 5);
    expect(s.momentumPerPixelHbarKL).toBeCloseTo(0.100421, 5);
    expect(s.firstOrderPeakUm).toBeCloseTo(129.456, 3);
    expect(s.firstOrderPeakPixels).toBeCloseTo(19.916, 3);
    // The old sidecar value was the momentum grid step 2 pi / (M a) with M = 64: 0.18454 / um,
    // 3.21 times too small for this camera (issue 22).
    expect(s.wavenumberPerPixelInverseUm / ((2 * Math.PI) / (64 * 0.532))).toBeCloseTo(3.2134, 3);
  });

  it('is consistent: the first-order peak is 2 k_L away, i.e. 2 / momentumPerPixelHbarKL pixels', () => {
    for (const [p, t] of [[1, 5], [3.7, 22], [16, 40]]) {
      const s = timeOfFlightScales({ objectPixelUm: p, flightTimeMs: t, massKg: rb87Kg, latticeSpacingUm: 0.383 });
      expect(s.firstOrderPeakPixels * s.momentumPerPixelHbarKL).toBeCloseTo(2, 12);
    }
  });
});

describe('far-field check', () => {
  it('finds the far-field time m R^2 / hbar = 182 ms for a cloud edge at 11.54 um (87Rb)', () => {
    // By hand: 1.443161e-25 * (11.5396e-6)^2 / 1.054572e-34 = 0.18223 s.
    const c = farFieldCheck({ flightTimeMs: 20, massKg: rb87Kg, cloudRadiusUm: 11.5396, model: 'far-field' });
    expect(c.farFieldTimeMs).toBeCloseTo(182.23, 1);
    expect(c.flightOverFarFieldTime).toBeCloseTo(20 / 182.23, 4);
    expect(c.edgePhaseRad).toBeCloseTo(182.23 / 40, 2);
    expect(c.notice?.code).toBe('tof-near-field');
    expect(c.notice?.severity).toBe('warning');
    expect(c.notice?.message).toContain('approximation');
    const finite = farFieldCheck({ flightTimeMs: 20, massKg: rb87Kg, cloudRadiusUm: 11.5396, model: 'free-expansion' });
    expect(finite.notice?.severity).toBe('info');
    expect(farFieldCheck({ flightTimeMs: 200, massKg: rb87Kg, cloudRadiusUm: 11.5396, model: 'far-field' }).notice).toBeNull();
  });

  it('reads the cloud radius off the column at 0.5 % of the peak column', () => {
    // A disk of 2 atoms per site out to 10 sites and a tail of 0.009 (0.45 %) beyond: R = the
    // farthest site of the disk. a = 0.5 um, trap centre on the middle of a 41 x 41 grid.
    const n = 41;
    const values = new Float64Array(n * n);
    let farthest = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const d = Math.hypot(i - 20, j - 20);
        if (d <= 10) {
          values[i * n + j] = 2;
          farthest = Math.max(farthest, d);
        } else if (d <= 18) values[i * n + j] = 0.9 * cloudEdgeFraction * 2;
      }
    }
    expect(cloudRadiusUm({ values, nx: n, ny: n }, 0.5, { x: -10, y: -10 })).toBeCloseTo(0.5 * farthest, 12);
    expect(cloudRadiusUm({ values: new Float64Array(4), nx: 2, ny: 2 }, 0.5, { x: 0, y: 0 })).toBe(0);
  });
});

// The shared start of the two counting models (src/imaging/camera/countingStart.ts), against
// the rules written out here: the defaults the camera settings document (gain 1 count per
// photoelectron, read noise 0), a region must have width x height entries (counted by hand
// for a 3 x 2 frame: 6), a bad noise setting is reported before a bad region (the order both
// models used), and the per-pixel results are zero-filled arrays of the frame's size.
import { describe, expect, it } from 'vitest';
import { countingStart } from '../../../src/imaging/camera/countingStart.js';
import { ParameterError } from '../../../src/physics/parameterError.js';

const frame = { width: 3, height: 2, values: new Float64Array(6) };

describe('countingStart', () => {
  it('defaults and sizes', () => {
    const s = countingStart(frame, {});
    expect([s.gain, s.readNoise, s.width, s.height, s.count]).toEqual([1, 0, 3, 2, 6]);
    for (const a of [s.atomsPerPixel, s.atomsVariance, s.mask]) expect(Array.from(a)).toEqual([0, 0, 0, 0, 0, 0]);
    expect(s.mask).toBeInstanceOf(Uint8Array);
    const given = countingStart(frame, { countsPerPhotoelectron: 2.5, readNoiseCounts: 4, region: new Uint8Array(6).fill(1) });
    expect([given.gain, given.readNoise]).toEqual([2.5, 4]);
  });

  it('refuses a region of the wrong size naming region and the 6 entries, and bad noise first', () => {
    const wrong = (): unknown => countingStart(frame, { region: new Uint8Array(5) });
    expect(wrong).toThrow(ParameterError);
    expect(wrong).toThrow(/^region: expected a mask of 6 entries \(width 3 x height 2\), got 5$/);
    expect(() => countingStart(frame, { readNoiseCounts: -1, region: new Uint8Array(5) })).toThrow(/^readNoiseCounts:/);
  });
});

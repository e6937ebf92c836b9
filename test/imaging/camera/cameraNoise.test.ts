// cameraNoise: the documented defaults (gain 1 count per photoelectron, no read noise) and
// the refusals that keep the per-pixel variance gain * counts + read^2 meaningful, checked by
// hand: a zero or negative gain, and a negative or non-finite read noise, are errors naming
// the field; the fluorescence model now refuses them as the absorption model always did.
import { describe, expect, it } from 'vitest';
import { cameraNoise } from '../../../src/imaging/camera/cameraNoise.js';
import { fluorescenceImage } from '../../../src/imaging/camera/fluorescenceImage.js';

describe('cameraNoise', () => {
  it('takes the defaults and passes given values through', () => {
    expect(cameraNoise({})).toEqual({ gain: 1, readNoise: 0 });
    expect(cameraNoise({ countsPerPhotoelectron: 2.5, readNoiseCounts: 3 })).toEqual({ gain: 2.5, readNoise: 3 });
  });

  it('refuses a gain that is not positive and a read noise below zero or not finite, naming the field', () => {
    expect(() => cameraNoise({ countsPerPhotoelectron: 0 })).toThrow(/countsPerPhotoelectron/);
    expect(() => cameraNoise({ countsPerPhotoelectron: -1 })).toThrow(/countsPerPhotoelectron/);
    expect(() => cameraNoise({ readNoiseCounts: -0.5 })).toThrow(/readNoiseCounts.*>= 0/);
    expect(() => cameraNoise({ readNoiseCounts: Number.NaN })).toThrow(/readNoiseCounts/);
    expect(() => cameraNoise({ readNoiseCounts: Number.POSITIVE_INFINITY })).toThrow(/readNoiseCounts/);
  });

  it('is what the fluorescence model reads: a negative read noise is refused there too', () => {
    const signal = { width: 2, height: 1, values: Float64Array.from([10, 20]) };
    expect(() => fluorescenceImage(signal, undefined, { countsPerAtom: 5, readNoiseCounts: -2 })).toThrow(/readNoiseCounts/);
    // read noise 2 counts, gain 1, 5 counts per atom: var = (20 + 2^2) / 5^2 = 0.96 atoms^2 (hand count)
    const image = fluorescenceImage(signal, undefined, { countsPerAtom: 5, readNoiseCounts: 2 });
    expect(image.atomsVariance[1]).toBeCloseTo(0.96, 14);
  });
});

import { describe, expect, it } from 'vitest';
import { pixelCentresUm } from '../../src/imaging/pixelPicture.js';

// Hand count: centres of a regular grid are first + k * pixel (a grid centred on 0 with an
// even count has no pixel at 0 and is symmetric).
describe('pixelCentresUm', () => {
  it('gives first + k * pixel for each pixel', () => {
    expect(Array.from(pixelCentresUm(-1.5, 4, 1))).toEqual([-1.5, -0.5, 0.5, 1.5]);
    expect(Array.from(pixelCentresUm(2, 3, 0.25))).toEqual([2, 2.25, 2.5]);
    expect(pixelCentresUm(0, 0, 1).length).toBe(0);
  });
});

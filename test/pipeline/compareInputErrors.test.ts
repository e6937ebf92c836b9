// Direct test of src/pipeline/compareInputErrors.ts: the camera core's ParameterErrors become
// InputErrors (exit 2) that name the option which set the value, with the core's own words
// after it; InputErrors pass unchanged and any other error (a bug) is rethrown as it is.

import { describe, expect, it } from 'vitest';
import { compareInputError } from '../../src/pipeline/compareInputErrors.js';
import { ParameterError } from '../../src/physics/parameterError.js';
import { InputError } from '../../src/scenario/inputError.js';

function mapped(err: unknown, fallback = '--image'): unknown {
  try {
    compareInputError(err, fallback);
  } catch (out) {
    return out;
  }
  throw new Error('compareInputError returned');
}

describe('compareInputError', () => {
  it('names the option of a known camera parameter', () => {
    const cases: Array<[string, string]> = [
      ['region', '--region'],
      ['rectangle', '--region'],
      ['region.mask', '--region-mask'],
      ['borderPixels', '--background-border'],
      ['rotateDeg', '--rotate'],
      ['angleDeg', '--rotate'],
    ];
    for (const [parameter, option] of cases) {
      const out = mapped(new ParameterError(parameter, 'too wide for the frame'));
      expect(out).toBeInstanceOf(InputError);
      expect((out as Error).message).toBe(`${option}: too wide for the frame`);
    }
  });
  it('keeps a message that already names an option, and puts others under the fallback', () => {
    expect((mapped(new ParameterError('--absorption-frames', 'no probe')) as Error).message).toBe('--absorption-frames: no probe');
    const other = mapped(new ParameterError('species', 'no D2 line'), '--cross-section');
    expect(other).toBeInstanceOf(InputError);
    expect((other as Error).message).toBe('--cross-section: species: no D2 line');
  });
  it('passes InputErrors through and rethrows bugs unchanged', () => {
    const input = new InputError('--pixel-um: give the pixel size');
    expect(mapped(input)).toBe(input);
    const bug = new TypeError('x is undefined');
    expect(mapped(bug)).toBe(bug);
  });
});

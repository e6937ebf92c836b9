// The camera core names its parameters (`region`, `borderPixels`, ...) in ParameterErrors;
// `compare` sets them from options, so a user reads the option instead: the known parameters
// are mapped to their option, a message that already starts with an option stays as it is,
// and anything else is put under the option that supplied the data (`fallback`).
// InputErrors pass through; any other error is a bug and is rethrown unchanged.

import { ParameterError } from '../physics/parameterError.js';
import { InputError } from '../scenario/inputError.js';

const optionOfParameter: Record<string, string> = {
  region: '--region',
  rectangle: '--region',
  'region.mask': '--region-mask',
  borderPixels: '--background-border',
  rotateDeg: '--rotate',
  angleDeg: '--rotate',
};

/** Rethrows `err` as an InputError naming the option that set the faulty value. */
export function compareInputError(err: unknown, fallback: string): never {
  if (err instanceof InputError) throw err;
  if (err instanceof ParameterError) {
    const option = optionOfParameter[err.parameter];
    // ParameterError messages start with "<parameter>: ".
    if (option !== undefined) throw new InputError(`${option}: ${err.message.slice(err.parameter.length + 2)}`);
    if (err.parameter.startsWith('--')) throw new InputError(err.message);
    throw new InputError(`${fallback}: ${err.message}`);
  }
  throw err;
}

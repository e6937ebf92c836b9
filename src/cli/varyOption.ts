// The `--vary` option of `scan` and `submit --scan`: which scenario value runs over which
// values. Pure (text in, axes out), so it is tested on plain strings.
//
//   --vary PATH=FROM:TO:COUNT        COUNT values from FROM to TO in equal steps
//   --vary PATH=FROM:TO:COUNT:log    ... in a constant ratio (FROM, TO > 0); --log makes
//                                    every FROM:TO:COUNT axis logarithmic
//   --vary PATH=A,B,C                the values listed (one value is a list of one)
// PATH is a dotted scenario path (hubbard.hopping, trap.coefficient, particles.atoms,
// temperature.kT, disorder.width, landscape.0.wallHeight, lattice depth laboratory.depthEr.0,
// ...) or characteristicDensity. Numbers go through numberText.ts.

import { InputError } from '../scenario/inputError.js';
import { parseInteger, parseReal } from './numberText.js';
import { linearValues, logValues, MAX_SCAN_POINTS, type ScanAxis } from '../pipeline/scan/scanPlan.js';

const PATH = /^[A-Za-z_][A-Za-z0-9_]*(\.[A-Za-z0-9_]+)*$/;
const EXAMPLE = 'e.g. --vary hubbard.hopping=0.01:0.05:9 or --vary particles.atoms=1000,2000,4000';

export function parseVary(text: string, logDefault = false): ScanAxis {
  const eq = text.indexOf('=');
  if (eq <= 0) throw new InputError(`--vary ${JSON.stringify(text)}: expected PATH=FROM:TO:COUNT or PATH=A,B,C; ${EXAMPLE}`);
  const path = text.slice(0, eq).trim();
  const spec = text.slice(eq + 1).trim();
  if (!PATH.test(path)) throw new InputError(`--vary ${JSON.stringify(text)}: ${JSON.stringify(path)} is not a dotted scenario path; ${EXAMPLE}`);
  const option = `--vary ${path}`;
  if (spec.length === 0) throw new InputError(`${option}: no values after '='; ${EXAMPLE}`);
  if (spec.includes(':')) {
    const parts = spec.split(':');
    const log = parts.length === 4 && parts[3] === 'log';
    const linearWord = parts.length === 4 && parts[3] === 'linear';
    if (parts.length !== 3 && !log && !linearWord) {
      throw new InputError(`${option}: expected FROM:TO:COUNT or FROM:TO:COUNT:log, got ${JSON.stringify(spec)}`);
    }
    const from = parseReal(parts[0], `${option} (FROM)`);
    const to = parseReal(parts[1], `${option} (TO)`);
    const count = parseInteger(parts[2], `${option} (COUNT)`, { min: 1, max: MAX_SCAN_POINTS });
    const useLog = log || (logDefault && !linearWord);
    if (useLog) {
      if (!(from > 0) || !(to > 0)) throw new InputError(`${option}: logarithmic steps need FROM and TO above 0, got ${parts[0]} and ${parts[1]}; use equal steps (no --log) for values of either sign`);
      return { path, values: logValues(from, to, count), spacing: 'log' };
    }
    return { path, values: linearValues(from, to, count), spacing: 'linear' };
  }
  const values = spec.split(',').map((v, k) => parseReal(v.trim(), `${option} (value ${k + 1})`));
  if (new Set(values).size !== values.length) throw new InputError(`${option}: a value is listed twice; give each value once`);
  return { path, values, spacing: 'list' };
}

/** All --vary options of a command: one or two axes with different paths. */
export function parseVaryOptions(texts: readonly string[] | undefined, logDefault = false): ScanAxis[] {
  if (texts === undefined || texts.length === 0) throw new InputError(`--vary: required; give the scenario value to scan, ${EXAMPLE}`);
  if (texts.length > 2) throw new InputError(`--vary: given ${texts.length} times; a scan has one or two axes`);
  const axes = texts.map((t) => parseVary(t, logDefault));
  if (axes.length === 2 && axes[0].path === axes[1].path) throw new InputError(`--vary ${axes[0].path}: given twice; scan two different values`);
  const points = axes.reduce((n, a) => n * a.values.length, 1);
  if (points > MAX_SCAN_POINTS) throw new InputError(`--vary: ${points} points, more than ${MAX_SCAN_POINTS}; use fewer values`);
  return axes;
}

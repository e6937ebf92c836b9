// `tiercake hubbard`: Hubbard parameters against lattice depth for a laboratory lattice,
// printed as a table and (with --out) written as CSV, text and a plot of J and U against
// depth; optionally the depth estimated from beam power and waist (with the laser-safety
// caution). Options -> hubbardTable (src/pipeline) -> stdout and files.

import type { Command } from 'commander';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { writeHubbardFiles } from '../../output/hubbardOutputs.js';
import { ParameterError } from '../../physics/parameterError.js';
import { estimateLatticeDepth, laserSafetyCaution } from '../../physics/dipolePotential.js';
import type { SpeciesInput } from '../../physics/species.js';
import { depthRangeEr, formatHubbardTable, hubbardTable } from '../../pipeline/hubbardTable.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { parseInteger, parseReal } from '../numberText.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { cautionsShownFor } from '../../output/outputMarker.js';

/** Marker name of the laser-safety caution (outputMarker.ts `cautions`). */
export const LASER_CAUTION_ID = 'laser-safety';

const OPTIONS = ['species', 'massU', 'scatteringBohr', 'wavelengthNm', 'depth', 'axes', 'confinementHz', 'powerW', 'waistUm', 'out', 'force'] as const;

export function registerHubbard(program: Command, context: CommandContext): void {
  const command = program.command('hubbard').description('J, U and related figures against lattice depth, from Wannier functions (table, CSV, plot)');
  declare(command, OPTIONS, {
    wavelengthNm: { required: true },
    depth: { default: '4:30:27' },
    axes: { default: '3' },
    out: { help: 'write hubbard.csv, hubbard.txt and hubbard.png into this folder' },
  }).action(async (options: RawOptions) => {
    context.exitCode = await runHubbard(options);
  });
}

const depthRange = { min: 0, minOpen: true, unit: 'E_r', what: 'the lattice depth' } as const;

export async function runHubbard(raw: RawOptions): Promise<number> {
  const o = readOptions(raw, OPTIONS);
  let species: SpeciesInput;
  if (o.massU !== undefined) {
    if (o.scatteringBohr === undefined) throw new InputError('--scattering-bohr: required with --mass-u; give the s-wave scattering length in Bohr radii');
    species = { massU: o.massU, scatteringLengthBohr: o.scatteringBohr };
  } else if (o.species !== undefined) {
    species = o.scatteringBohr !== undefined ? { name: o.species, scatteringLengthBohr: o.scatteringBohr } : o.species;
  } else {
    throw new InputError('--species: give an isotope name (e.g. 87Rb) or --mass-u with --scattering-bohr');
  }
  if (o.wavelengthNm === undefined) throw new InputError('--wavelength-nm: required; give the lattice laser wavelength in nm');
  const axes = (o.axes ?? 3) as 1 | 2 | 3;
  const parts = (o.depth ?? '4:30:27').split(':');
  let depths: number[];
  if (parts.length === 1) depths = [parseReal(parts[0], '--depth', depthRange)];
  else if (parts.length === 3) {
    const count = parseInteger(parts[2], '--depth (count)', { min: 2, max: 1000 });
    depths = depthRangeEr(parseReal(parts[0], '--depth (from)', depthRange), parseReal(parts[1], '--depth (to)', depthRange), count);
  } else throw new InputError(`--depth: expected one depth or from:to:count, got ${JSON.stringify(o.depth)}`);
  if (axes < 3 && o.confinementHz === undefined) {
    throw new InputError(`--confinement-hz: a ${axes}-axis lattice needs the trap frequency along the other ${3 - axes} axis/axes`);
  }
  if (o.powerW !== undefined && o.waistUm === undefined) throw new InputError('--waist-um: required with --power-w; give the beam waist at the atoms in µm');
  const target = o.out !== undefined ? outputTarget(o.out, { force: o.force ?? false }) : null;
  const confinement = axes < 3 ? Array<number>(3 - axes).fill(o.confinementHz as number) : [];

  let rows;
  let power = null;
  try {
    rows = hubbardTable({ species, wavelengthNm: o.wavelengthNm, depthsEr: depths, latticeDimension: axes, confinementFrequencyHz: confinement });
    if (o.powerW !== undefined) power = estimateLatticeDepth({ species, wavelengthNm: o.wavelengthNm, powerW: o.powerW, waistUm: o.waistUm as number });
  } catch (err) {
    // The physics names the parameter it refuses (species, wavelengthNm, depthEr, ...).
    if (err instanceof ParameterError) throw new InputError(`${err.parameter}: ${err.message.slice(err.parameter.length + 2)}`);
    throw err;
  }
  let text = formatHubbardTable(rows);
  const caution = power ? `CAUTION: ${laserSafetyCaution}\n` : '';
  if (power) {
    text +=
      `\nDepth estimate for ${o.powerW} W in a ${o.waistUm} µm waist: ${power.depthEr.toFixed(2)} E_r ` +
      `(${(power.depthHz / 1000).toFixed(2)} kHz), scattering rate ${power.scatteringRateAtMaximumPerS.toExponential(2)} /s.\n`;
  }
  // The laser caution goes with the depth estimate once per output folder: always into
  // hubbard.txt and the folder's marker, on the terminal when the folder is new (or its
  // marker does not record it) and on every run without --out (there is no folder to keep it).
  const shownBefore = target !== null && target.existing.kind === 'owned' && cautionsShownFor(target.path).includes(LASER_CAUTION_ID);
  process.stdout.write(text + (power && !shownBefore ? caution : ''));
  if (target) {
    const speciesName = typeof species === 'string' ? species : 'custom species';
    const finalRows = rows;
    const fileText = text + caution;
    const identity = { command: 'hubbard', scenarioHash: null, ...(power ? { cautions: [LASER_CAUTION_ID] } : {}) };
    const { commit } = await writeOutputFolder(target, identity, (folder) =>
      writeHubbardFiles(finalRows, fileText, { speciesName, wavelengthNm: o.wavelengthNm as number }, folder),
    );
    reportCommit(commit);
    process.stdout.write(`written to ${target.path}\n`);
  }
  return ExitCode.done;
}

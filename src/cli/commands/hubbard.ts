// `tiercake hubbard`: Hubbard parameters against lattice depth for a laboratory lattice,
// printed as a table and (with --out) written as CSV, text and a plot of J and U against
// depth; optionally the depth estimated from beam power and waist (with the laser-safety
// caution). Options -> hubbardTable (src/pipeline) -> stdout and files.

import type { Command } from 'commander';
import { laserCautionShownBefore, writeHubbardFolder } from '../../output/hubbardOutputs.js';
import { depthRangeEr } from '../../pipeline/hubbardTable.js';
import { checkHubbardRequest, hubbardSpecies, runHubbardRequest } from '../../pipeline/hubbardRequest.js';
import { hubbardSummaryText } from '../../report/hubbardSummaryText.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { parseInteger, parseReal } from '../numberText.js';
import { outputTarget, reportCommit } from '../outputOption.js';

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
  const species = hubbardSpecies(o);
  if (o.wavelengthNm === undefined) throw new InputError('--wavelength-nm: required; give the lattice laser wavelength in nm');
  const parts = (o.depth ?? '4:30:27').split(':');
  let depths: number[];
  if (parts.length === 1) depths = [parseReal(parts[0], '--depth', depthRange)];
  else if (parts.length === 3) {
    const count = parseInteger(parts[2], '--depth (count)', { min: 2, max: 1000 });
    depths = depthRangeEr(parseReal(parts[0], '--depth (from)', depthRange), parseReal(parts[1], '--depth (to)', depthRange), count);
  } else throw new InputError(`--depth: expected one depth or from:to:count, got ${JSON.stringify(o.depth)}`);
  const request = { species, wavelengthNm: o.wavelengthNm, depthsEr: depths, axes: (o.axes ?? 3) as 1 | 2 | 3, confinementHz: o.confinementHz, powerW: o.powerW, waistUm: o.waistUm };
  checkHubbardRequest(request);
  const target = o.out !== undefined ? outputTarget(o.out, { force: o.force ?? false }) : null;
  const result = runHubbardRequest(request);
  const { text, caution } = hubbardSummaryText(result, request);
  process.stdout.write(text + (result.power && !laserCautionShownBefore(target) ? caution : ''));
  if (target) {
    const about = { speciesName: typeof species === 'string' ? species : 'custom species', wavelengthNm: o.wavelengthNm, laserCaution: result.power !== null };
    reportCommit(await writeHubbardFolder(target, result.rows, text + caution, about));
    process.stdout.write(`written to ${target.path}\n`);
  }
  return ExitCode.done;
}

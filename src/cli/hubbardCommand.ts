// `tiercake hubbard`: Hubbard parameters against lattice depth for a laboratory lattice,
// printed as a table and written as CSV and a plot of J and U against depth; optionally the
// depth estimated from beam power and waist (with the laser-safety caution).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { OutputFolder } from '../output/outputFolder.js';
import { renderLinePlotSvg } from '../figures/linePlotSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { ParameterError } from '../physics/parameterError.js';
import { estimateLatticeDepth, laserSafetyCaution } from '../physics/dipolePotential.js';
import type { SpeciesInput } from '../physics/species.js';
import { depthRangeEr, formatHubbardTable, hubbardCsv, hubbardTable } from '../pipeline/hubbardTable.js';
import { ExitCode, InputError } from '../scenario/inputError.js';
import type { CommandContext } from './main.js';

interface HubbardOptions {
  species?: string;
  massU?: string;
  scatteringBohr?: string;
  wavelengthNm: string;
  depth: string;
  axes: string;
  confinementHz?: string;
  powerW?: string;
  waistUm?: string;
  out?: string;
}

function positive(text: string | undefined, name: string): number {
  const x = Number(text);
  if (text === undefined || !Number.isFinite(x) || x <= 0) throw new InputError(`${name}: expected a positive number, got ${text ?? 'nothing'}`);
  return x;
}

export function registerHubbard(program: Command, context: CommandContext): void {
  program
    .command('hubbard')
    .description('J, U and related figures against lattice depth, from Wannier functions (table, CSV, plot)')
    .option('--species <name>', 'isotope from the built-in table, e.g. 87Rb')
    .option('--mass-u <u>', 'or: atomic mass in u (with --scattering-bohr)')
    .option('--scattering-bohr <a0>', 's-wave scattering length in Bohr radii (overrides the table value)')
    .requiredOption('--wavelength-nm <nm>', 'lattice laser wavelength in nm')
    .option('--depth <from:to:count | s>', 'lattice depths in E_r: one value or a range', '4:30:27')
    .option('--axes <n>', 'lattice axes: 3 (cubic), 2 (layer) or 1 (tubes)', '3')
    .option('--confinement-hz <f>', 'trap frequency along the axes without lattice (layer or tubes), Hz')
    .option('--power-w <P>', 'also estimate the depth of one retro-reflected beam of this power (W)')
    .option('--waist-um <w>', 'waist of that beam at the atoms, µm (with --power-w)')
    .option('-o, --out <dir>', 'write hubbard.csv and hubbard.png into this folder')
    .action((options: HubbardOptions) => {
      context.exitCode = runHubbard(options);
    });
}

export function runHubbard(options: HubbardOptions): number {
  let species: SpeciesInput;
  if (options.massU !== undefined) {
    species = { massU: positive(options.massU, '--mass-u'), scatteringLengthBohr: positive(options.scatteringBohr, '--scattering-bohr') };
  } else if (options.species !== undefined) {
    species = options.scatteringBohr !== undefined ? { name: options.species, scatteringLengthBohr: positive(options.scatteringBohr, '--scattering-bohr') } : options.species;
  } else {
    throw new InputError('--species: give an isotope name (e.g. 87Rb) or --mass-u with --scattering-bohr');
  }
  const wavelengthNm = positive(options.wavelengthNm, '--wavelength-nm');
  const axes = Number(options.axes);
  if (axes !== 1 && axes !== 2 && axes !== 3) throw new InputError(`--axes: expected 1, 2 or 3, got ${options.axes}`);
  let depths: number[];
  const parts = options.depth.split(':');
  if (parts.length === 1) depths = [positive(parts[0], '--depth')];
  else if (parts.length === 3) {
    const count = Number(parts[2]);
    if (!Number.isInteger(count) || count < 2 || count > 1000) throw new InputError(`--depth: the count must be a whole number from 2 to 1000, got ${parts[2]}`);
    depths = depthRangeEr(positive(parts[0], '--depth (from)'), positive(parts[1], '--depth (to)'), count);
  } else throw new InputError(`--depth: expected one depth or from:to:count, got ${options.depth}`);
  if (axes < 3 && options.confinementHz === undefined) {
    throw new InputError(`--confinement-hz: a ${axes}-axis lattice needs the trap frequency along the other ${3 - axes} axis/axes`);
  }
  const confinement = axes < 3 ? Array(3 - axes).fill(positive(options.confinementHz, '--confinement-hz')) : [];

  let rows;
  let power = null;
  try {
    rows = hubbardTable({ species, wavelengthNm, depthsEr: depths, latticeDimension: axes, confinementFrequencyHz: confinement });
    if (options.powerW !== undefined) {
      power = estimateLatticeDepth({ species, wavelengthNm, powerW: positive(options.powerW, '--power-w'), waistUm: positive(options.waistUm, '--waist-um') });
    }
  } catch (err) {
    if (err instanceof ParameterError) throw new InputError(`${err.parameter}: ${err.message}`);
    throw err;
  }
  let text = formatHubbardTable(rows);
  if (power) {
    text +=
      `\nDepth estimate for ${options.powerW} W in a ${options.waistUm} µm waist: ${power.depthEr.toFixed(2)} E_r ` +
      `(${(power.depthHz / 1000).toFixed(2)} kHz), scattering rate ${power.scatteringRateAtMaximumPerS.toExponential(2)} /s.\n` +
      `CAUTION: ${laserSafetyCaution}\n`;
  }
  process.stdout.write(text);
  if (options.out) {
    const depth = rows.map((r) => r.depthEr);
    const svg = renderLinePlotSvg({
      title: `Hubbard parameters, ${typeof species === 'string' ? species : 'custom species'} at ${wavelengthNm} nm`,
      xAxis: { label: 'lattice depth', unit: 'E_r' },
      yAxis: { label: 'energy / h', unit: 'Hz', log: true },
      series: [
        { label: 'tunnelling J', x: depth, y: rows.map((r) => r.JHz) },
        { label: 'on-site interaction U', x: depth, y: rows.map((r) => r.UHz) },
      ],
    });
    const folder = new OutputFolder(resolve(options.out));
    try {
      folder.write('hubbard.csv', hubbardCsv(rows));
      folder.write('hubbard.png', svgToPng(svg));
      folder.write('hubbard.txt', text);
      folder.commit();
    } catch (err) {
      folder.discard();
      throw err;
    }
    process.stdout.write(`written to ${resolve(options.out)}\n`);
  }
  return ExitCode.done;
}

// `tiercake diagram`: the homogeneous mean-field phase map in the (zJ/U, mu/U) plane with
// the computed Mott-lobe boundaries. Options -> phaseMap (src/solver) -> files
// (src/output/diagramOutputs.ts).

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { lobesOf, writeDiagramFiles, type DiagramSettings } from '../../output/diagramOutputs.js';
import { phaseMap } from '../../solver/phaseMap.js';
import { ExitCode, InputError } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';
import { declare, readOptions, type RawOptions } from '../options.js';
import { parseInteger, parseReal } from '../numberText.js';
import { outputTarget, reportCommit } from '../outputOption.js';

const OPTIONS = ['zjMax', 'mu', 'grid', 'kt', 'nmax', 'shade', 'out', 'force'] as const;

export function registerDiagram(program: Command, context: CommandContext): void {
  const command = program.command('diagram').description('homogeneous mean-field phase map in the (zJ/U, mu/U) plane with the Mott-lobe boundaries');
  declare(command, OPTIONS, {
    zjMax: { default: '0.25' },
    mu: { default: '-0.2:3' },
    grid: { default: '400x400' },
    kt: { default: '0' },
    nmax: { default: '10' },
    shade: { default: 'phi' },
    out: { default: 'out/phase-map' },
  }).action(async (options: RawOptions) => {
    context.exitCode = await runDiagram(options);
  });
}

/** The options checked and converted; every message names the option. */
export function parseDiagramOptions(raw: RawOptions): DiagramSettings & { out: string; force: boolean } {
  const o = readOptions(raw, OPTIONS);
  const muParts = (o.mu ?? '-0.2:3').split(':');
  if (muParts.length !== 2) throw new InputError(`--mu: expected from:to, e.g. -0.2:3, got ${JSON.stringify(o.mu)}`);
  const muMin = parseReal(muParts[0], '--mu (from)', { min: -100, minOpen: true });
  const muMax = parseReal(muParts[1], '--mu (to)', { min: muMin, minOpen: true, max: 100, maxOpen: true });
  const grid = /^(\d+)x(\d+)$/.exec(o.grid ?? '400x400');
  if (!grid) throw new InputError(`--grid: expected COLSxROWS, e.g. 400x400, got ${JSON.stringify(o.grid)}`);
  const columns = parseInteger(grid[1], '--grid (columns)', { min: 2, max: 4000 });
  const rows = parseInteger(grid[2], '--grid (rows)', { min: 2, max: 4000 });
  const nmax = o.nmax ?? 10;
  if (muMax + 1 >= nmax) throw new InputError(`--nmax: ${nmax} is too small for mu/U up to ${muMax}; use at least ${Math.ceil(muMax) + 3}`);
  return {
    zJMax: o.zjMax ?? 0.25,
    muMin,
    muMax,
    columns,
    rows,
    temperature: o.kt ?? 0,
    nmax,
    shade: (o.shade ?? 'phi') as DiagramSettings['shade'],
    out: o.out ?? 'out/phase-map',
    force: o.force ?? false,
  };
}

export async function runDiagram(raw: RawOptions): Promise<number> {
  const s = parseDiagramOptions(raw);
  const outDir = resolve(s.out);
  const target = outputTarget(s.out, { force: s.force });
  const t0 = performance.now();
  const result = phaseMap({ zJMax: s.zJMax, muMin: s.muMin, muMax: s.muMax, columns: s.columns, rows: s.rows, temperature: s.temperature, nmax: s.nmax, boundaryPoints: 400 });
  const seconds = (performance.now() - t0) / 1000;
  if (result.maxTopWeight > 1e-6) {
    throw new InputError(`--nmax: the weight on |nmax> reaches ${result.maxTopWeight.toExponential(2)} on this map; raise --nmax`);
  }
  const { commit } = await writeOutputFolder(target, { command: 'diagram', scenarioHash: null }, (folder) => writeDiagramFiles(result, s, seconds, folder));
  reportCommit(commit);
  const tips = lobesOf(result).map((b) => `n=${b.filling}: zJ/U=${b.tipZJ.toFixed(5)} at mu/U=${b.tipMu.toFixed(4)}`).join('; ');
  process.stdout.write(`phase map ${s.columns}x${s.rows} in ${seconds.toFixed(2)} s; lobe tips ${tips}\nresults in ${outDir}\n`);
  return ExitCode.done;
}

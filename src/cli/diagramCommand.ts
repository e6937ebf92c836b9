// `tiercake diagram`: the homogeneous mean-field phase map in the (zJ/U, mu/U) plane with
// the computed Mott-lobe boundaries: a PNG, CSV files of the grid and of the boundaries,
// and a report.

import type { Command } from 'commander';
import { resolve } from 'node:path';
import { OutputFolder } from '../output/outputFolder.js';
import { toCsv } from '../formats/csv.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { renderReportHtml } from '../report/renderReport.js';
import { MEAN_FIELD_CAUTION } from '../report/cautions.js';
import { phaseMap } from '../solver/phaseMap.js';
import { ExitCode, InputError } from '../scenario/inputError.js';
import type { CommandContext } from './main.js';
import { toolVersion } from '../output/toolVersion.js';

interface DiagramOptions {
  zjMax: string;
  mu: string;
  grid: string;
  kt: string;
  nmax: string;
  shade: string;
  out: string;
}

function numberOption(text: string, name: string, check: (x: number) => boolean, allowed: string): number {
  const x = Number(text);
  if (!Number.isFinite(x) || !check(x)) throw new InputError(`${name}: expected ${allowed}, got ${text}`);
  return x;
}

export function registerDiagram(program: Command, context: CommandContext): void {
  program
    .command('diagram')
    .description('homogeneous mean-field phase map in the (zJ/U, mu/U) plane with the Mott-lobe boundaries')
    .option('--zj-max <x>', 'largest zJ/U shown', '0.25')
    .option('--mu <from:to>', 'range of mu/U', '-0.2:3')
    .option('--grid <cols>x<rows>', 'grid points along zJ/U and mu/U', '400x400')
    .option('--kt <x>', 'temperature k_B T/U (0: ground state)', '0')
    .option('--nmax <n>', 'highest occupation kept per site', '10')
    .option('--shade <field>', "colour by 'phi' (order parameter) or 'density'", 'phi')
    .option('-o, --out <dir>', 'output folder', 'out/phase-map')
    .action((options: DiagramOptions) => {
      context.exitCode = runDiagram(options);
    });
}

export function runDiagram(options: DiagramOptions): number {
  const zJMax = numberOption(options.zjMax, '--zj-max', (x) => x > 0 && x <= 10, 'a number in (0, 10]');
  const muParts = options.mu.split(':');
  if (muParts.length !== 2) throw new InputError(`--mu: expected from:to, e.g. -0.2:3, got ${options.mu}`);
  const muMin = numberOption(muParts[0], '--mu (from)', (x) => x > -100, 'a number > -100');
  const muMax = numberOption(muParts[1], '--mu (to)', (x) => x > muMin && x < 100, `a number above ${muMin} and below 100`);
  const grid = /^(\d+)x(\d+)$/.exec(options.grid);
  if (!grid) throw new InputError(`--grid: expected COLSxROWS, e.g. 400x400, got ${options.grid}`);
  const columns = Number(grid[1]);
  const rows = Number(grid[2]);
  if (columns < 2 || rows < 2 || columns > 4000 || rows > 4000) throw new InputError(`--grid: each size must be 2 to 4000, got ${options.grid}`);
  const temperature = numberOption(options.kt, '--kt', (x) => x >= 0 && x <= 100, 'a number from 0 to 100');
  const nmax = numberOption(options.nmax, '--nmax', (x) => Number.isInteger(x) && x >= 2 && x <= 40, 'a whole number from 2 to 40');
  if (options.shade !== 'phi' && options.shade !== 'density') throw new InputError(`--shade: expected phi or density, got ${options.shade}`);
  if (muMax + 1 >= nmax) {
    throw new InputError(`--nmax: ${nmax} is too small for mu/U up to ${muMax}; use at least ${Math.ceil(muMax) + 3}`);
  }

  const t0 = performance.now();
  const result = phaseMap({ zJMax, muMin, muMax, columns, rows, temperature, nmax, boundaryPoints: 400 });
  const seconds = (performance.now() - t0) / 1000;
  if (result.maxTopWeight > 1e-6) {
    throw new InputError(`--nmax: the weight on |nmax> reaches ${result.maxTopWeight.toExponential(2)} on this map; raise --nmax`);
  }

  const dz = zJMax / (columns - 1);
  const dmu = (muMax - muMin) / (rows - 1);
  const shadePhi = options.shade === 'phi';
  const title = temperature > 0 ? `Mean-field phase map at k_B T = ${temperature} U` : 'Mean-field phase map at T = 0';
  // The superfluid edge is one continuous curve in mu (the lobes of successive fillings
  // meet at zJ = 0 at T = 0 and join smoothly at T > 0): one path, so no joint is drawn
  // twice, clipped at the frame instead of being pinned to its edge.
  const edgeZ = result.boundaries.flatMap((b) => Array.from(b.zJ));
  const edgeMu = result.boundaries.flatMap((b) => Array.from(b.mu));
  const svg = renderFieldMapSvg({
    values: shadePhi ? result.orderParameter : result.density,
    nx: columns,
    ny: rows,
    title,
    xAxis: { label: 'zJ/U', origin: 0, step: dz },
    yAxis: { label: 'mu/U', origin: muMin, step: dmu },
    colorBarLabel: shadePhi ? 'order parameter phi' : 'density n',
    colorMap: shadePhi ? 'ember' : 'glacier',
    pixelsPerSite: Math.max(1, Math.floor(600 / Math.max(columns, rows))),
    overlays: [{ x: edgeZ, y: edgeMu }],
  });
  const png = svgToPng(svg);

  const boundaryFilling: number[] = [];
  const boundaryMu: number[] = [];
  const boundaryZ: number[] = [];
  for (const b of result.boundaries) {
    for (let k = 0; k < b.mu.length; k++) {
      boundaryFilling.push(b.filling);
      boundaryMu.push(b.mu[k]);
      boundaryZ.push(b.zJ[k]);
    }
  }
  const header = [
    `tiercake ${toolVersion()} homogeneous Gutzwiller mean-field phase map, energies in units of U`,
    `k_B T/U = ${temperature}, nmax = ${nmax}; z = coordination number`,
  ];
  const boundaryCsv = toCsv(
    [
      { name: 'filling', values: boundaryFilling },
      { name: 'mu_over_U', values: boundaryMu },
      { name: 'zJ_over_U', values: boundaryZ },
    ],
    [
      ...header,
      temperature > 0
        ? 'edge of the superfluid, zJ chi(mu, T) = 1, grouped by the integer interval of mu/U (filling)'
        : 'Mott-lobe boundary zJ_c(mu) = 1/chi(mu) for each filling n (n - 1 < mu/U < n)',
    ],
  );
  const gridZ = new Float64Array(columns * rows);
  const gridMu = new Float64Array(columns * rows);
  for (let c = 0; c < columns; c++) for (let r = 0; r < rows; r++) {
    gridZ[c * rows + r] = result.zJ[c];
    gridMu[c * rows + r] = result.mu[r];
  }
  const gridCsv = toCsv(
    [
      { name: 'zJ_over_U', values: gridZ },
      { name: 'mu_over_U', values: gridMu },
      { name: 'phi', values: result.orderParameter },
      { name: 'density', values: result.density },
    ],
    header,
  );
  // Filling 0 (the empty lattice) has an edge but no tip.
  const lobes = result.boundaries.filter((b) => b.filling > 0);
  const tipsCsv = toCsv(
    [
      { name: 'filling', values: lobes.map((b) => b.filling) },
      { name: 'tip_mu_over_U', values: lobes.map((b) => b.tipMu) },
      { name: 'tip_zJ_over_U', values: lobes.map((b) => b.tipZJ) },
    ],
    [...header, 'largest zJ/U of each computed boundary curve (the lobe tip at T = 0)'],
  );

  const outDir = resolve(options.out);
  const folder = new OutputFolder(outDir);
  try {
    folder.write('phase_map.png', png);
    folder.write('lobe_boundaries.csv', boundaryCsv);
    folder.write('lobe_tips.csv', tipsCsv);
    folder.write('phase_map_grid.csv', gridCsv);
    folder.write(
      'report.html',
      renderReportHtml({
        title: 'tiercake — homogeneous phase map',
        subtitle: title,
        createdIso: new Date().toISOString(),
        status: [{ level: 'ok', text: `${columns} × ${rows} grid in ${seconds.toFixed(2)} s` }],
        sections: [
          { heading: 'Map', blocks: [{ kind: 'figure', svg, caption: 'Line: computed edge of the superfluid (zJ chi = 1), all fillings in one curve.' }] },
          {
            heading: 'Lobe tips',
            blocks: [
              {
                kind: 'table',
                columns: [{ header: 'filling n' }, { header: 'mu/U at tip' }, { header: 'zJ/U at tip' }],
                rows: lobes.map((b) => [b.filling, b.tipMu, b.tipZJ]),
              },
            ],
          },
          { heading: 'Cautions', blocks: [{ kind: 'cautionList', items: [MEAN_FIELD_CAUTION] }] },
        ],
        footer: `tiercake ${toolVersion()}`,
      }),
    );
    folder.commit();
  } catch (err) {
    folder.discard();
    throw err;
  }
  const tips = lobes.map((b) => `n=${b.filling}: zJ/U=${b.tipZJ.toFixed(5)} at mu/U=${b.tipMu.toFixed(4)}`).join('; ');
  process.stdout.write(`phase map ${columns}x${rows} in ${seconds.toFixed(2)} s; lobe tips ${tips}\nresults in ${outDir}\n`);
  return ExitCode.done;
}

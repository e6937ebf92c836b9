// Files of `tiercake diagram`: the phase map as a PNG, CSV files of the grid, of the lobe
// boundaries and of the lobe tips, and report.html. Writers only: the map comes from
// src/solver/phaseMap.ts.

import { csvTable } from '../formats/csvTable.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { renderReportHtml } from '../report/renderReport.js';
import { MEAN_FIELD_CAUTION } from '../report/cautions.js';
import type { phaseMap, PhaseMapRequest } from '../solver/phaseMap.js';
import type { OutputFolder } from './outputFolder.js';
import { toolVersion } from './toolVersion.js';

/** The map's grid and what colours it. */
export interface DiagramSettings extends Omit<PhaseMapRequest, 'boundaryPoints'> {
  shade: 'phi' | 'density';
}

export type PhaseMapResult = ReturnType<typeof phaseMap>;

/** Boundaries with filling > 0 (the empty lattice has an edge but no tip). */
export function lobesOf(result: PhaseMapResult): PhaseMapResult['boundaries'] {
  return result.boundaries.filter((b) => b.filling > 0);
}

export function diagramTitle(s: DiagramSettings): string {
  return s.temperature > 0 ? `Mean-field phase map at k_B T = ${s.temperature} U` : 'Mean-field phase map at T = 0';
}

/** Stage the files of a phase map in `folder` (the caller commits it). */
export function writeDiagramFiles(result: PhaseMapResult, s: DiagramSettings, seconds: number, folder: OutputFolder): void {
  const { zJMax, muMin, muMax, columns, rows, temperature, nmax } = s;
  const dz = zJMax / (columns - 1);
  const dmu = (muMax - muMin) / (rows - 1);
  const shadePhi = s.shade === 'phi';
  const title = diagramTitle(s);
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
  const creator = `tiercake ${toolVersion()}`;
  const common = [`k_B T/U = ${temperature}, nmax = ${nmax}; z = coordination number; energies in units of U`];
  const boundary = csvTable(
    'lobe_boundaries.csv',
    [
      { name: 'filling', values: boundaryFilling, unit: 'atoms per site', datatype: 'integer', description: 'filling n of the lobe (n - 1 < mu/U < n); 0 is the edge of the empty lattice' },
      { name: 'mu_over_U', values: boundaryMu, unit: '1', description: 'chemical potential over U' },
      { name: 'zJ_over_U', values: boundaryZ, unit: '1', description: 'coordination number times hopping, over U, at the edge of the superfluid' },
    ],
    {
      title: 'homogeneous Gutzwiller mean-field phase boundary',
      description:
        temperature > 0
          ? 'edge of the superfluid, zJ chi(mu, T) = 1, grouped by the integer interval of mu/U (filling)'
          : 'Mott-lobe boundary zJ_c(mu) = 1/chi(mu) for each filling n (n - 1 < mu/U < n)',
      creator,
      notes: common,
    },
  );
  const gridZ = new Float64Array(columns * rows);
  const gridMu = new Float64Array(columns * rows);
  for (let c = 0; c < columns; c++) for (let r = 0; r < rows; r++) {
    gridZ[c * rows + r] = result.zJ[c];
    gridMu[c * rows + r] = result.mu[r];
  }
  const grid = csvTable(
    'phase_map_grid.csv',
    [
      { name: 'zJ_over_U', values: gridZ, unit: '1', description: 'coordination number times hopping, over U' },
      { name: 'mu_over_U', values: gridMu, unit: '1', description: 'chemical potential over U' },
      { name: 'phi', values: result.orderParameter, unit: 'sqrt(atoms per site)', description: 'homogeneous order parameter <b>' },
      { name: 'density', values: result.density, unit: 'atoms per site', description: 'homogeneous density <n>' },
    ],
    { title: 'homogeneous Gutzwiller mean-field phase map', description: 'order parameter and density on the (zJ/U, mu/U) grid, one row per grid point', creator, notes: common },
  );
  const lobes = lobesOf(result);
  const tips = csvTable(
    'lobe_tips.csv',
    [
      { name: 'filling', values: lobes.map((b) => b.filling), unit: 'atoms per site', datatype: 'integer', description: 'filling n of the Mott lobe' },
      { name: 'tip_mu_over_U', values: lobes.map((b) => b.tipMu), unit: '1', description: 'mu/U at the lobe tip' },
      { name: 'tip_zJ_over_U', values: lobes.map((b) => b.tipZJ), unit: '1', description: 'zJ/U at the lobe tip (largest zJ/U of the lobe)' },
    ],
    { title: 'Mott-lobe tips of the homogeneous mean field', description: 'largest zJ/U of each computed boundary curve (the lobe tip at T = 0)', creator, notes: common },
  );

  folder.write('phase_map.png', png);
  for (const table of [boundary, tips, grid]) {
    folder.write(table.file, table.csv);
    folder.write(table.metadataFile, table.metadata);
  }
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
}

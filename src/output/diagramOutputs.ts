// Files of `tiercake diagram`: the phase map as a PNG, CSV files of the grid, of the lobe
// boundaries and of the lobe tips, and report.html. Writers only: the map comes from
// src/solver/phaseMap.ts.

import { csvTable } from '../formats/csvTable.js';
import { renderFieldMapSvg } from '../figures/fieldMapSvg.js';
import { svgToPng } from '../figures/svgToPng.js';
import { renderReportHtml } from '../report/renderReport.js';
import { MEAN_FIELD_CAUTION } from '../report/cautions.js';
import type { phaseMap, PhaseMapRequest } from '../solver/phaseMap.js';
import { monteCarloTip, type ClusterLobe } from '../solver/cluster/clusterLobeSet.js';
import type { OutputFolder } from './outputFolder.js';
import type { OverlayLine } from '../figures/gridFrame.js';
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
/** Lobes of cluster mean field drawn beside the single-site map. */
export interface DiagramClusterLobes {
  shape: number[];
  lobes: ClusterLobe[];
}

export function writeDiagramFiles(result: PhaseMapResult, s: DiagramSettings, seconds: number, folder: OutputFolder, cluster: DiagramClusterLobes | null = null): void {
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
    overlays: [{ x: edgeZ, y: edgeMu }, ...clusterOverlays(cluster, muMin, muMax)],
  });
  const png = svgToPng(svg);

  const edges = result.boundaries;
  const creator = `tiercake ${toolVersion()}`;
  const common = [`k_B T/U = ${temperature}, nmax = ${nmax}; z = coordination number; energies in units of U`];
  const boundary = csvTable(
    'lobe_boundaries.csv',
    [
      { name: 'filling', values: perEdgePoint(edges, (b) => b.filling), unit: 'atoms per site', datatype: 'integer', description: 'filling n of the lobe (n - 1 < mu/U < n); 0 is the edge of the empty lattice' },
      { name: 'mu_over_U', values: perEdgePoint(edges, (b, k) => b.mu[k]), unit: '1', description: 'chemical potential over U' },
      { name: 'zJ_over_U', values: perEdgePoint(edges, (b, k) => b.zJ[k]), unit: '1', description: 'coordination number times hopping, over U, at the edge of the superfluid' },
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

  const clusterTable = cluster === null ? null : clusterLobeTable(cluster, creator);
  folder.write('phase_map.png', png);
  for (const table of [boundary, tips, grid, ...(clusterTable === null ? [] : [clusterTable])]) {
    folder.write(table.file, table.csv);
    folder.write(table.metadataFile, table.metadata);
  }
  folder.write(
    'report.html',
    renderReportHtml({
      title: 'tiercake — homogeneous phase map',
      subtitle: title,
      createdIso: new Date().toISOString(),
      status: [
        { level: 'ok', text: `${columns} × ${rows} grid in ${seconds.toFixed(2)} s` },
        ...(cluster !== null && cluster.lobes.some((b) => !b.converged)
          ? [{ level: 'warning' as const, text: 'some cluster lobe points did not converge (cluster_lobes.csv, column converged)' }]
          : []),
      ],
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
        ...(cluster === null ? [] : [clusterSection(cluster, result)]),
        { heading: 'Cautions', blocks: [{ kind: 'cautionList', items: [MEAN_FIELD_CAUTION] }] },
      ],
      footer: `tiercake ${toolVersion()}`,
    }),
  );
}

/** Dashed cluster lobes, and the Monte Carlo tip as a dotted vertical line across the n = 1 interval. */
function clusterOverlays(cluster: DiagramClusterLobes | null, muMin: number, muMax: number) {
  if (cluster === null) return [];
  const lines: OverlayLine[] = cluster.lobes.map((b) => ({ x: b.zJ, y: b.mu, color: [120, 220, 255], dashPx: [6, 4] }));
  const qmc = monteCarloTip(cluster.shape.length);
  if (qmc !== null && muMax > 0 && muMin < 1) {
    lines.push({ x: [qmc.zJOverU, qmc.zJOverU], y: [Math.max(0, muMin), Math.min(1, muMax)], color: [255, 255, 255], dashPx: [2, 3] });
  }
  return lines;
}

/** One value per edge point of every lobe, lobe after lobe: a column of a lobe table. */
function perEdgePoint<L extends { mu: ArrayLike<number> }>(lobes: readonly L[], value: (lobe: L, k: number) => number): number[] {
  const column: number[] = [];
  for (const lobe of lobes) for (let k = 0; k < lobe.mu.length; k++) column.push(value(lobe, k));
  return column;
}

function clusterLobeTable(cluster: DiagramClusterLobes, creator: string) {
  const lobes = cluster.lobes;
  return csvTable(
    'cluster_lobes.csv',
    [
      { name: 'filling', values: perEdgePoint(lobes, (b) => b.filling), unit: 'atoms per site', datatype: 'integer', description: 'filling n of the lobe' },
      { name: 'nmax', values: perEdgePoint(lobes, (b) => b.nmax), unit: 'atoms per site', datatype: 'integer', description: 'truncation of the cluster problem for this lobe' },
      { name: 'mu_over_U', values: perEdgePoint(lobes, (b, k) => b.mu[k]), unit: '1', description: 'chemical potential over U' },
      { name: 'zJ_over_U', values: perEdgePoint(lobes, (b, k) => b.zJ[k]), unit: '1', description: `coordination number (${2 * cluster.shape.length}) times hopping over U at the edge of the Mott lobe` },
      { name: 'level_crossing', values: perEdgePoint(lobes, (b, k) => b.levelCrossing[k]), unit: '1', datatype: 'integer', description: '1 where the edge is a level crossing of the cluster ground state, 0 where the Mott state becomes unstable to the mean field' },
    ],
    {
      title: `cluster mean-field Mott lobes, ${cluster.shape.join('x')} clusters`,
      description: `T = 0 lobe boundaries of cluster mean field with ${cluster.shape.join('x')} clusters on the ${cluster.shape.length === 2 ? 'square' : cluster.shape.length === 3 ? 'simple-cubic' : 'chain'} lattice (exact clusters, mean fields between them)`,
      creator,
      notes: cluster.lobes.map((b) => `n = ${b.filling}: tip zJ/U = ${b.tipZJ} at mu/U = ${b.tipMu} (nmax ${b.nmax}${b.converged ? '' : ', NOT CONVERGED'})`),
    },
  );
}

function clusterSection(cluster: DiagramClusterLobes, result: PhaseMapResult) {
  const single = new Map(lobesOf(result).map((b) => [b.filling, b.tipZJ]));
  const qmc = monteCarloTip(cluster.shape.length);
  const z = 2 * cluster.shape.length;
  const rows = cluster.lobes.map((b) => {
    const s = single.get(b.filling);
    return [b.filling, b.tipZJ, z / b.tipZJ, s === undefined ? null : z / s, b.filling === 1 && qmc !== null ? qmc.criticalUOverJ : null];
  });
  return {
    heading: `Cluster mean field (${cluster.shape.join('×')} clusters)`,
    blocks: [
      {
        kind: 'paragraph' as const,
        text:
          `Dashed: the Mott lobes of cluster mean field with ${cluster.shape.join('×')} clusters on the ${qmc?.lattice ?? 'chain'} lattice (z = ${z}), solved exactly inside each cluster. ` +
          (qmc !== null
            ? `Dotted vertical line: the n = 1 tip from quantum Monte Carlo, (U/J)c = ${qmc.criticalUOverJ} (${qmc.source}). Larger clusters move the cluster tip toward it.`
            : 'No Monte Carlo reference is drawn for a chain.'),
      },
      {
        kind: 'table' as const,
        columns: [{ header: 'filling n' }, { header: 'cluster tip zJ/U' }, { header: 'cluster (U/J)c' }, { header: 'single-site (U/J)c' }, { header: 'Monte Carlo (U/J)c' }],
        rows,
      },
    ],
  };
}

// The lines `tiercake diagram` prints: grid and time, the lobe tips of the single-site map
// (fillings n >= 1) and of the cluster lobes when there are any, the output folder. Pure text.

import type { ClusterLobe } from '../solver/cluster/clusterLobeSet.js';
import type { PhaseMapResult } from '../output/diagramOutputs.js';
import { lobesOf } from '../output/diagramOutputs.js';

const tipList = (tips: ReadonlyArray<{ filling: number; tipZJ: number; tipMu: number }>): string =>
  tips.map((b) => `n=${b.filling}: zJ/U=${b.tipZJ.toFixed(5)} at mu/U=${b.tipMu.toFixed(4)}`).join('; ');

export function diagramSummaryLines(
  result: PhaseMapResult,
  grid: { columns: number; rows: number },
  cluster: { shape: readonly number[]; lobes: readonly ClusterLobe[] } | null,
  seconds: number,
  outDir: string,
): string[] {
  return [
    `phase map ${grid.columns}x${grid.rows} in ${seconds.toFixed(2)} s; lobe tips ${tipList(lobesOf(result))}`,
    ...(cluster === null ? [] : [`cluster ${cluster.shape.join('x')} lobe tips ${tipList(cluster.lobes)}`]),
    `results in ${outDir}`,
  ];
}

// The per-point output folders of `scan --keep-points`: each finished point is written, as
// `tiercake solve` writes it (camera pictures and report included), into the scan's work
// folder (scanWork.ts, `<out>.partial/points/point-NNNNNN/`), and copied into the results
// as `points/point-NNNNNN/` when the scan (or the shard, or the merge of shards) commits.

import { join } from 'node:path';
import type { SolveArtifacts } from '../pipeline/solveScenario.js';
import { solvePictures } from '../pipeline/solvePictures.js';
import { renderReportHtml } from '../report/renderReport.js';
import { buildSolveReport } from '../report/solveReport.js';
import { scenarioHash } from '../scenario/scenarioHash.js';
import { cameraPictureFiles } from './cameraOutputs.js';
import { writeOutputFolder, type OutputFolder } from './outputFolder.js';
import { checkOutputTarget } from './outputTarget.js';
import { copyFolderInto, pointFolderName } from './scanWork.js';
import { writeSolveFiles } from './solveOutputs.js';

/** Write one kept point's folder at `path` (the work folder's pointFolder(point)). */
export async function writeKeptPoint(path: string, a: SolveArtifacts): Promise<void> {
  const target = checkOutputTarget(path, { option: '--keep-points', force: false, inputs: [] });
  const pictures = cameraPictureFiles(solvePictures(a));
  await writeOutputFolder(target, { command: 'scan point', scenarioHash: scenarioHash(a.scenario) }, (folder) => {
    const createdIso = new Date().toISOString();
    writeSolveFiles(a, pictures, folder, (images, imaging) => renderReportHtml(buildSolveReport(a, images, createdIso, imaging)));
  });
}

/** Stage the kept folders of `points` into `folder` as points/point-NNNNNN/; `source` gives each one's folder now. */
export function copyKeptPoints(folder: OutputFolder, points: Iterable<number>, source: (point: number) => string): void {
  for (const p of points) copyFolderInto(folder, source(p), `points/${pointFolderName(p)}`);
}

/** Where a scan shard folder keeps point p's folder. */
export function shardKeptPoint(shardPath: string, point: number): string {
  return join(shardPath, 'points', pointFolderName(point));
}

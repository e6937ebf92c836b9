// The output folder of a finished `solve`: camera pictures (solvePictures), every warning of
// the run (runWarnings), then fields, profiles, images, summary.json and report.html staged
// and committed together under the scenario's hash ('whole', with the landscape files).

import { writeOutputFolder, type CommitReport } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { writeSolveFiles } from './solveOutputs.js';
import { cameraPictureFiles } from './cameraOutputs.js';
import { renderReportHtml } from '../report/renderReport.js';
import { buildSolveReport } from '../report/solveReport.js';
import { solvePictures } from '../pipeline/solvePictures.js';
import { solveWarnings, type RunWarning } from '../pipeline/runWarnings.js';
import type { SolveArtifacts } from '../pipeline/solveScenario.js';
import { landscapeFileHashes, scenarioHash } from '../scenario/scenarioHash.js';

export interface SolveFolderResult {
  commit: CommitReport | null;
  /** every warning of the run, as summary.json and the report list them */
  warnings: RunWarning[];
  files: string[];
}

export async function writeSolveFolder(target: OutputTarget, artifacts: SolveArtifacts, createdIso: () => string = () => new Date().toISOString()): Promise<SolveFolderResult> {
  const pictureSet = solvePictures(artifacts);
  const pictures = cameraPictureFiles(pictureSet);
  const warnings = solveWarnings(artifacts, pictureSet.notices);
  const hash = scenarioHash(artifacts.scenario, 'whole', landscapeFileHashes(artifacts.resolved));
  let files: string[] = [];
  const { commit } = await writeOutputFolder(target, { command: 'solve', scenarioHash: hash }, (folder) => {
    const created = createdIso();
    files = writeSolveFiles(artifacts, pictures, folder, (images, imaging) => renderReportHtml(buildSolveReport(artifacts, images, created, imaging, warnings)), warnings);
  });
  return { commit, warnings, files };
}

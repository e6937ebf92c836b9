// The output folder of a finished `evolve`: evolution.csv, spectrum, snapshots, plots,
// summary.json and report.html (evolveOutputs.ts) staged and committed together under the
// scenario's hash.

import { writeOutputFolder, type CommitReport } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { writeEvolveFiles } from './evolveOutputs.js';
import { renderReportHtml } from '../report/renderReport.js';
import { buildEvolveReport } from '../report/evolveReport.js';
import type { EvolveArtifacts } from '../pipeline/evolveScenario.js';
import { scenarioHash } from '../scenario/scenarioHash.js';

export async function writeEvolveFolder(
  target: OutputTarget,
  a: EvolveArtifacts,
  createdIso: () => string = () => new Date().toISOString(),
): Promise<{ commit: CommitReport | null; files: string[] }> {
  let files: string[] = [];
  const { commit } = await writeOutputFolder(target, { command: 'evolve', scenarioHash: scenarioHash(a.prepared.scenario) }, (folder) => {
    const created = createdIso();
    files = writeEvolveFiles(a, folder, (images, frames) => renderReportHtml(buildEvolveReport(a, images, frames, created)));
  });
  return { commit, files };
}

// The output folder of a finished `compare`: the files of compareOutputs.ts and the report
// (src/report/compareReport.ts) staged and committed together under the hash of the
// scenario as run (scenarioHash.ts, with the files its landscape reads).

import { writeCompareFiles, type CompareProvenance } from './compareOutputs.js';
import { writeOutputFolder, type CommitReport } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { toolVersion } from './toolVersion.js';
import type { CompareFit } from '../pipeline/compareFit.js';
import type { CompareReadings } from '../pipeline/compareReadings.js';
import { buildCompareReport } from '../report/compareReport.js';
import { renderReportHtml } from '../report/renderReport.js';
import { landscapeFileHashes, scenarioHash } from '../scenario/scenarioHash.js';

export async function writeCompareFolder(
  target: OutputTarget,
  result: CompareFit,
  provenance: CompareProvenance,
  readings: Pick<CompareReadings, 'eos' | 'thermometry'>,
  createdIso: () => string = () => new Date().toISOString(),
): Promise<CommitReport | null> {
  const { prepared } = result;
  const { eos, thermometry } = readings;
  const { imagePath } = provenance;
  const created = createdIso();
  const { commit } = await writeOutputFolder(target, { command: 'compare', scenarioHash: scenarioHash(prepared.scenario, 'whole', landscapeFileHashes(prepared.resolved)) }, (folder) =>
    writeCompareFiles(result, provenance, { eos, thermometry }, folder, (images) =>
      renderReportHtml(buildCompareReport(result, { imagePath, images, createdIso: created, toolVersion: toolVersion(), provenance, eos, thermometry })),
    ),
  );
  return commit;
}

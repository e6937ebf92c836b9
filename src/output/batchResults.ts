// The result folder of a finished ensemble or scan, as one run (`ensemble`, `scan`) or as
// the merge of its shards (`merge`) writes it: the files of ensembleOutputs.ts or
// scanOutputs.ts and the report, whose provenance line says how the result was produced.
// Staged and committed through outputFolder.ts.

import { renderReportHtml } from '../report/renderReport.js';
import { buildEnsembleReport } from '../report/ensembleReport.js';
import { buildScanReport } from '../report/scanReport.js';
import { writeEnsembleFiles, type EnsembleOutcome } from './ensembleOutputs.js';
import { writeOutputFolder, type CommitReport, type OutputFolder } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { writeScanFiles, type ScanOutcome } from './scanOutputs.js';

export async function writeEnsembleResult(target: OutputTarget, command: 'ensemble' | 'merge', o: EnsembleOutcome, provenanceLine: string): Promise<CommitReport | null> {
  const createdIso = new Date().toISOString();
  const { commit } = await writeOutputFolder(target, { command, scenarioHash: o.scenarioHash }, (folder) =>
    writeEnsembleFiles(o, folder, (images) => renderReportHtml(buildEnsembleReport(o, images, createdIso, [provenanceLine]))),
  );
  return commit;
}

/** `keptPoints` stages the --keep-points folders first (scanKeptPoints.ts). */
export async function writeScanResult(
  target: OutputTarget,
  command: 'scan' | 'merge',
  o: ScanOutcome,
  provenanceLine: string,
  keptPoints: ((folder: OutputFolder) => void) | null,
): Promise<CommitReport | null> {
  const createdIso = new Date().toISOString();
  const { commit } = await writeOutputFolder(target, { command, scenarioHash: o.scenarioHash }, (folder) => {
    keptPoints?.(folder);
    writeScanFiles(o, folder, (images) => renderReportHtml(buildScanReport(o, images, createdIso, [provenanceLine])));
  });
  return commit;
}

// `tiercake merge` of scan shards (written by `tiercake scan --shard`): checks that they
// belong to one scan and hold every chain once (src/output/scanShard.ts), then writes
// exactly the files a single `tiercake scan` run writes (only `provenance` in summary.json
// and the report's time stamp differ). Called by merge.ts when the shards are scan shards.

import { resolve } from 'node:path';
import { writeOutputFolder } from '../../output/outputFolder.js';
import { renderReportHtml } from '../../report/renderReport.js';
import { buildScanReport } from '../../report/scanReport.js';
import { checkScanShardSet, type LoadedScanShard } from '../../output/scanShard.js';
import { writeScanFiles, type ScanOutcome } from '../../output/scanOutputs.js';
import { copyFolderInto } from '../../output/scanWork.js';
import { chainPoints } from '../../pipeline/scan/scanPlan.js';
import type { Scenario } from '../../scenario/scenarioSchema.js';
import { ExitCode } from '../../scenario/inputError.js';
import { outputTarget, reportCommit } from '../outputOption.js';
import { pointFolderName, scanDoneLines } from './scan.js';
import { join } from 'node:path';

export async function mergeScanShards(shards: readonly LoadedScanShard[], paths: readonly string[], o: { out?: string; force?: boolean; quiet?: boolean }): Promise<number> {
  const { plan, rows } = checkScanShardSet(shards);
  const h = shards[0].header;
  const outDir = resolve(o.out ?? `out/${h.scenarioName}-scan`);
  const target = outputTarget(o.out ?? outDir, { force: o.force ?? false, inputs: [...paths] });
  const outcome: ScanOutcome = {
    scenario: h.scenario as unknown as Scenario,
    scenarioHash: h.scenarioHash,
    scanHash: h.scanHash,
    plan,
    hold: h.hold,
    energyUnit: h.energyUnit,
    keepPoints: h.keepPoints,
    rows,
    provenance: {
      kind: 'merged shards',
      shards: shards.map((s) => ({
        folder: s.path,
        shard: `${s.header.shard.index}/${s.header.shard.count}`,
        chains: s.header.chains,
        threads: s.header.run.threads,
        seconds: s.header.run.seconds,
        resumedPoints: s.header.run.resumedPoints,
      })),
    },
  };
  const used = shards.filter((s) => s.header.chains.length > 0);
  const seconds = used.reduce((t, s) => t + s.header.run.seconds, 0);
  const line = `merge of ${used.length} scan shard${used.length === 1 ? '' : 's'} (${shards.length} given); compute time ${seconds.toFixed(1)} s in total`;
  const createdIso = new Date().toISOString();
  const { commit } = await writeOutputFolder(target, { command: 'merge', scenarioHash: h.scenarioHash }, (folder) => {
    if (h.keepPoints) {
      for (const s of shards) {
        for (const c of s.header.chains) for (const p of chainPoints(plan, c)) copyFolderInto(folder, join(s.path, 'points', pointFolderName(p)), `points/${pointFolderName(p)}`);
      }
    }
    writeScanFiles(outcome, folder, (images) => renderReportHtml(buildScanReport(outcome, images, createdIso, [line])));
  });
  reportCommit(commit);
  if (!o.quiet) process.stdout.write(`${scanDoneLines(outcome, null).join('\n')} (merged ${shards.length} shards)\n  results in ${outDir}\n`);
  return rows.some((r) => !r.converged) ? ExitCode.notConverged : ExitCode.done;
}

// What a `scan` run writes beyond its work folder: the identity its files carry, each
// finished point as it comes (the work folder `<out>.partial`, scanWork.ts, and with
// --keep-points the point's own folder), and at the end the rows of the points this
// process solved, committed as a shard's partial result for `tiercake merge`
// (scanShard.ts) or as the scan's result (batchResults.ts); the work folder is removed
// only once the result is in place.

import { writeScanResult } from './batchResults.js';
import type { CommitReport, OutputFolder } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { effectiveHold, scanSetupHash } from './scanIdentity.js';
import { copyKeptPoints, writeKeptPoint } from './scanKeptPoints.js';
import type { ScanOutcome } from './scanOutputs.js';
import { writeScanShard, type ScanShardIdentity } from './scanShard.js';
import { recordScanPoint, type ScanWork } from './scanWork.js';
import type { ScanPointResult } from '../pipeline/scan/runScan.js';
import { chainPoints } from '../pipeline/scan/scanPlan.js';
import type { ScanRow } from '../pipeline/scan/scanRow.js';
import type { ScanSetup } from '../pipeline/scan/scanSetup.js';

/** What fixes a scan's files (the same for a complete run and for each of its shards). */
export function scanRunIdentity(setup: ScanSetup, energyUnit: string): ScanShardIdentity {
  const { plan } = setup;
  return { scenario: setup.base.scenario, scenarioHash: setup.scenarioHash, scanHash: scanSetupHash(setup), plan, hold: effectiveHold(plan, setup.hold), energyUnit, keepPoints: setup.keepPoints };
}

/** Keep one finished point: its own folder first (--keep-points), then its row in the work folder. */
export async function keepScanPoint(work: ScanWork, id: ScanShardIdentity, r: ScanPointResult): Promise<void> {
  if (id.keepPoints) await writeKeptPoint(work.pointFolder(r.point), r.artifacts);
  recordScanPoint(work, id.plan, r);
}

/** The rows of the points of `chains`, read back from the work folder; every one must be there. */
export function scanRunRows(work: ScanWork, id: ScanShardIdentity, chains: readonly number[]): ScanRow[] {
  const wanted = new Set(chains.flatMap((c) => chainPoints(id.plan, c)));
  const rows = work.rows().filter((r) => wanted.has(r.point));
  if (rows.length !== wanted.size) throw new Error(`scan: ${rows.length} rows for ${wanted.size} points`);
  return rows;
}

/** What was committed: a shard's partial result (`shard` as given), or the whole scan's result. */
export type ScanCommitted<S> = { kind: 'shard'; commit: CommitReport | null; shard: S } | { kind: 'complete'; commit: CommitReport | null; outcome: ScanOutcome };

/**
 * Commit the result of the rows (scanRunRows) at `target`, then remove the work folder.
 * `provenanceLine` is the report's line on how a complete run's result was produced.
 */
export async function commitScanRun<S extends { index: number; count: number }>(
  target: OutputTarget,
  work: ScanWork,
  id: ScanShardIdentity,
  run: { chains: readonly number[]; rows: ScanRow[]; shard: S | null; threads: number; seconds: number },
  provenanceLine: string,
): Promise<ScanCommitted<S>> {
  const { rows, shard } = run;
  const kept = id.keepPoints ? (p: number): string => work.pointFolder(p) : null;
  const runInfo = { threads: run.threads, seconds: run.seconds, resumedPoints: work.resumedPoints };
  if (shard) {
    const commit = await writeScanShard(target, id, { index: shard.index, count: shard.count }, run.chains, rows, runInfo, kept);
    work.remove();
    return { kind: 'shard', commit, shard };
  }
  const outcome: ScanOutcome = { ...id, rows, provenance: { kind: 'single run', ...runInfo } };
  const points = kept ? (folder: OutputFolder): void => copyKeptPoints(folder, rows.map((r) => r.point), kept) : null;
  const commit = await writeScanResult(target, 'scan', outcome, provenanceLine, points);
  work.remove();
  return { kind: 'complete', commit, outcome };
}

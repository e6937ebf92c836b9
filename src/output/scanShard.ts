// The self-describing partial result of one scan shard (written and committed with its
// kept points), and reading it back; which scan shards `tiercake merge` may combine, and
// the outcome of one scan they merge into.
//
// A shard folder (`<collect>/shard-k-of-K/`, the same names as ensemble shards) holds
//   shard.json                 header: format tag and version, tool version, scenario (as
//                              run) and its SHA-256, the scan's identity hash
//                              (scanIdentity.ts), axes, chain length, hold, shard index
//                              and count, the chains held, and one row per point
//   points/point-NNNNNN/       per-point output folders (--keep-points)
// Rows are JSON numbers written by Number::toString (scanRecords.ts): bit for bit.
// Shards merge when they share the tool version and the scan identity and together hold
// every chain exactly once, each with the rows of exactly its points; every refusal is an
// InputError naming the shard (index of K, folder, scenario hash) and what to do.

import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import * as z from 'zod';
import { writeOutputFolder, type CommitReport, type OutputFolder } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import type { ScanOutcome } from './scanOutputs.js';
import { copyKeptPoints, shardKeptPoint } from './scanKeptPoints.js';
import { InputError } from '../scenario/inputError.js';
import { chainPoints, planScan, shardChains, type ScanPlan } from '../pipeline/scan/scanPlan.js';
import type { ScanRow } from '../pipeline/scan/scanRow.js';
import { blockCoverage, formatBlockList } from '../pipeline/ensemble/blockPlan.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { ScanAxisSchema, ScanRowSchema, scanRowFromJson, scanRowToJson } from './scanRecords.js';
import { shardFolderName } from './shardSet.js';
import { SHARD_HEADER_FILE } from './ensembleShard.js';
import { Sha256HexSchema, ToolStampSchema, toolStamp } from './recordFields.js';

export const SCAN_SHARD_FORMAT = 'tiercake-scan-shard';
export const SCAN_SHARD_FORMAT_VERSION = 1;

export const ScanShardHeaderSchema = z.strictObject({
  format: z.literal(SCAN_SHARD_FORMAT),
  formatVersion: z.literal(SCAN_SHARD_FORMAT_VERSION),
  tool: ToolStampSchema,
  scenarioName: z.string(),
  scenarioHash: Sha256HexSchema,
  scanHash: Sha256HexSchema,
  scenario: z.record(z.string(), z.unknown()),
  axes: z.array(ScanAxisSchema).min(1).max(2),
  hold: z.enum(['trap', 'atoms']).nullable(),
  chainLength: z.int().min(1),
  realisations: z.int().min(1).default(1),
  chainCount: z.int().min(1),
  pointCount: z.int().min(1),
  energyUnit: z.string(),
  keepPoints: z.boolean(),
  shard: z.strictObject({ index: z.int().min(0), count: z.int().min(1) }),
  chains: z.array(z.int().min(0)),
  rows: z.array(ScanRowSchema),
  run: z.strictObject({ threads: z.int().min(1), seconds: z.number(), resumedPoints: z.int().min(0) }),
});

export type ScanShardHeader = z.infer<typeof ScanShardHeaderSchema>;

/** What a scan shard records about the scan it belongs to: the outcome without its rows and provenance. */
export type ScanShardIdentity = Omit<ScanOutcome, 'rows' | 'provenance'>;

export function writeScanShardHeader(
  folder: OutputFolder,
  id: ScanShardIdentity,
  shard: { index: number; count: number },
  chains: readonly number[],
  rows: readonly ScanRow[],
  run: ScanShardHeader['run'],
): void {
  const header: ScanShardHeader = {
    format: SCAN_SHARD_FORMAT,
    formatVersion: SCAN_SHARD_FORMAT_VERSION,
    tool: toolStamp(),
    scenarioName: id.scenario.name,
    scenarioHash: id.scenarioHash,
    scanHash: id.scanHash,
    scenario: id.scenario as unknown as Record<string, unknown>,
    axes: id.plan.axes.map((a) => ({ path: a.path, values: [...a.values], spacing: a.spacing })),
    hold: id.hold,
    chainLength: id.plan.chainLength,
    realisations: id.plan.realisations,
    chainCount: id.plan.chainCount,
    pointCount: id.plan.pointCount,
    energyUnit: id.energyUnit,
    keepPoints: id.keepPoints,
    shard,
    chains: [...chains],
    rows: rows.map(scanRowToJson),
    run,
  };
  folder.write(SHARD_HEADER_FILE, `${JSON.stringify(header, null, 1)}\n`);
}

/**
 * Commit a finished scan shard at `target`: its header and, with --keep-points, the kept
 * point folders of its rows (`keptPoint` gives where each one is now).
 */
export async function writeScanShard(
  target: OutputTarget,
  id: ScanShardIdentity,
  shard: { index: number; count: number },
  chains: readonly number[],
  rows: readonly ScanRow[],
  run: ScanShardHeader['run'],
  keptPoint: ((point: number) => string) | null,
): Promise<CommitReport | null> {
  const { commit } = await writeOutputFolder(target, { command: 'scan shard', scenarioHash: id.scenarioHash }, (folder) => {
    if (keptPoint) copyKeptPoints(folder, rows.map((r) => r.point), keptPoint);
    writeScanShardHeader(folder, id, shard, chains, rows, run);
  });
  return commit;
}

export interface LoadedScanShard {
  path: string;
  header: ScanShardHeader;
}

/** A parsed shard.json whose format is the scan shard's. */
export function parseScanShardHeader(path: string, parsed: unknown): LoadedScanShard {
  const file = join(path, SHARD_HEADER_FILE);
  const version = (parsed as Record<string, unknown>).formatVersion;
  if (version !== SCAN_SHARD_FORMAT_VERSION) {
    throw new InputError(`merge ${JSON.stringify(file)}: scan shard format version ${String(version)}, this tiercake reads version ${SCAN_SHARD_FORMAT_VERSION}; merge with the tiercake that wrote it`);
  }
  const result = ScanShardHeaderSchema.safeParse(parsed);
  if (!result.success) {
    const first = result.error.issues[0];
    throw new InputError(`merge ${JSON.stringify(file)}: not a tiercake scan shard header (${first.path.join('.') || 'top level'}: ${first.message})`);
  }
  return { path, header: result.data };
}

function describe(s: LoadedScanShard): string {
  return `shard ${s.header.shard.index} of ${s.header.shard.count} (${JSON.stringify(s.path)}, scenario ${s.header.scenarioHash.slice(0, 12)})`;
}

/** The scan's plan, checked: same scan in every shard, every chain once, rows matching their chains. */
export function checkScanShardSet(shards: readonly LoadedScanShard[]): { plan: ScanPlan; rows: ScanRow[] } {
  const first = shards[0];
  const checks: Array<{ what: string; of: (s: LoadedScanShard) => unknown; fix: string }> = [
    { what: 'tiercake version', of: (s) => s.header.tool.version, fix: 'run every shard with the same tiercake version' },
    { what: 'scenario (SHA-256 of the scenario as run)', of: (s) => s.header.scenarioHash, fix: 'merge only shards of the same scenario file with the same --set overrides' },
    { what: 'scan (axes, values, chain length, hold, --keep-points)', of: (s) => s.header.scanHash, fix: 'give every shard the same --vary, --log, --chain-length, --fixed and --keep-points' },
  ];
  for (const check of checks) {
    const expected = check.of(first);
    const other = shards.find((s) => check.of(s) !== expected);
    if (other) {
      throw new InputError(
        `merge: ${describe(other)} belongs to a different scan than ${describe(first)}: ${check.what} is ${JSON.stringify(check.of(other))} there but ${JSON.stringify(expected)} here; ` +
          `${check.fix}, or leave that shard out`,
      );
    }
  }
  const seen = new Set<string>();
  for (const s of shards) {
    const key = resolve(s.path);
    if (seen.has(key)) throw new InputError(`merge: the shard folder ${JSON.stringify(s.path)} is given twice; give each shard once`);
    seen.add(key);
  }
  const h = first.header;
  const plan = planScan(h.axes, h.chainLength, h.realisations);
  if (plan.chainCount !== h.chainCount || plan.pointCount !== h.pointCount) {
    throw new InputError(`merge ${describe(first)}: header says ${h.pointCount} points in ${h.chainCount} chains, but its axes make ${plan.pointCount} in ${plan.chainCount}; the shard is damaged, run it again`);
  }
  const held = shards.flatMap((s) => s.header.chains);
  const coverage = blockCoverage({ realisations: plan.chainCount, blockSize: 1, blockCount: plan.chainCount }, held);
  const problems: string[] = [];
  if (coverage.outOfRange.length > 0) problems.push(`chains ${formatBlockList(coverage.outOfRange)} are outside the scan (chains 0 to ${plan.chainCount - 1})`);
  if (coverage.duplicated.length > 0) {
    const lines = coverage.duplicated.slice(0, 6).map(({ block }) => `chain ${block} is in ${shards.filter((s) => s.header.chains.includes(block)).map(describe).join(' and ')}`);
    problems.push(`${lines.join('; ')}${coverage.duplicated.length > 6 ? '; ...' : ''}; leave out the extra shards`);
  }
  if (coverage.missing.length > 0) {
    const counts = [...new Set(shards.map((s) => s.header.shard.count))];
    const owners = new Set<string>();
    for (const c of coverage.missing) {
      for (const k of counts) {
        const owner = shardOwning(plan, c, k);
        if (owner !== null) owners.add(`shard ${owner} of ${k} (folder ${shardFolderName({ index: owner, count: k })})`);
      }
    }
    problems.push(
      `${[...owners].join(', ')} ${owners.size === 1 ? 'is' : 'are'} missing: ${coverage.missing.length === 1 ? 'chain' : 'chains'} ${formatBlockList(coverage.missing)} of the scan's ${plan.chainCount} ` +
        `(scenario ${h.scenarioHash.slice(0, 12)}); run the missing shards (or wait for them to finish) and merge again`,
    );
  }
  if (problems.length > 0) throw new InputError(`merge: the scan shards do not cover the scan exactly once: ${problems.join('; ')}`);
  const rows: ScanRow[] = [];
  for (const s of shards) {
    const expected = s.header.chains.flatMap((c) => chainPoints(plan, c)).sort((a, b) => a - b);
    const got = s.header.rows.map((r) => r.point).sort((a, b) => a - b);
    if (expected.length !== got.length || expected.some((p, k) => p !== got[k])) {
      throw new InputError(`merge ${describe(s)}: its rows are not the points of its chains ${formatBlockList(s.header.chains)}; the shard is damaged, run it again`);
    }
    for (const r of s.header.rows) rows.push(scanRowFromJson(r));
  }
  rows.sort((a, b) => a.point - b.point);
  return { plan, rows };
}

/** Which shard of K holds chain c (shardChains's split), or null. */
function shardOwning(plan: ScanPlan, chain: number, count: number): number | null {
  for (let k = 0; k < count; k++) if (shardChains(plan, k, count).includes(chain)) return k;
  return null;
}

/**
 * The shards as scan shards when their headers say so (null when they are ensemble
 * shards); a mixture is refused naming the shard of the other kind.
 */
export function readScanShards(folders: readonly string[]): LoadedScanShard[] | null {
  const formats = folders.map((f) => {
    try {
      const parsed: unknown = JSON.parse(readFileSync(join(f, SHARD_HEADER_FILE), 'utf8'));
      return { folder: f, parsed, scan: parsed !== null && typeof parsed === 'object' && (parsed as Record<string, unknown>).format === SCAN_SHARD_FORMAT };
    } catch {
      return { folder: f, parsed: null, scan: false };
    }
  });
  const scans = formats.filter((f) => f.scan);
  if (scans.length === 0) return null;
  const other = formats.find((f) => !f.scan);
  if (other) {
    throw new InputError(
      `merge: ${JSON.stringify(other.folder)} is not a scan shard but ${JSON.stringify(scans[0].folder)} is; merge the shards of one scan (or of one ensemble) at a time`,
    );
  }
  return scans.map((f) => parseScanShardHeader(f.folder, f.parsed));
}

/** The checked set of shards as the outcome of one scan (`provenance` lists the shards). */
export function mergedScanOutcome(shards: readonly LoadedScanShard[]): ScanOutcome {
  const { plan, rows } = checkScanShardSet(shards);
  const h = shards[0].header;
  return {
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
}

/** Stage the kept point folders of every shard's chains into the merged `folder`. */
export function copyShardKeptPoints(folder: OutputFolder, shards: readonly LoadedScanShard[], plan: ScanPlan): void {
  for (const s of shards) copyKeptPoints(folder, s.header.chains.flatMap((c) => chainPoints(plan, c)), (p) => shardKeptPoint(s.path, p));
}

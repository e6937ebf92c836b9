// Where the shards of a job array stand, read from the collecting folder alone (no
// scheduler accounting): for each shard k of K
//   done     shard-k-of-K/shard.json is complete and belongs to the expected work
//            (scenario hash, and the ensemble's realisations and block size or the scan's
//            identity); counts its points or realisations that did not converge
//   foreign  a complete shard folder of other work (another scenario or setup): it must
//            be run again, merge would refuse it
//   started  no result yet, but the shard's staging folder (.shard-k-of-K.tmp-*, written
//            while an ensemble shard runs and while any shard commits) or the partial
//            results of a scan shard (shard-k-of-K.partial) exist: running, or stopped
//            before it finished (a scan shard then continues where it stopped)
//   missing  nothing of it: not started, cancelled before it ran, or failed at once

import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { SHARD_FORMAT, SHARD_HEADER_FILE } from './ensembleShard.js';
import { SCAN_SHARD_FORMAT } from './scanShard.js';
import { SCAN_WORK_FILE } from './scanWork.js';
import { shardFolderName } from './shardSet.js';
import { formatBlockList } from '../pipeline/ensemble/blockPlan.js';

export interface ShardExpectation {
  scenarioHash: string | null;
  /** scan shards: the scan's identity hash */
  scanHash: string | null;
  /** ensemble shards: realisation count and block size */
  ensemble: { realisations: number; blockSize: number } | null;
}

/**
 * What the shards of a bare collecting folder are compared with: the identity of the first
 * complete shard of K (its scenario hash, and its scan setup or realisations and block size),
 * so a shard of other work in the same folder reads "foreign", not "done"; all null when none.
 */
export function firstShardExpectation(shardDir: string, count: number): ShardExpectation {
  for (let k = 0; k < count; k++) {
    const folder = join(shardDir, shardFolderName({ index: k, count }));
    const header = existsSync(join(folder, SHARD_HEADER_FILE)) ? readHeader(folder) : null;
    if (header === null) continue;
    return {
      scenarioHash: header.scenarioHash,
      scanHash: header.format === SCAN_SHARD_FORMAT ? (header.scanHash ?? null) : null,
      ensemble: header.format === SHARD_FORMAT ? { realisations: header.realisations as number, blockSize: header.blockSize as number } : null,
    };
  }
  return { scenarioHash: null, scanHash: null, ensemble: null };
}

export type ShardState =
  | { index: number; kind: 'done'; folder: string; notConverged: number; seconds: number }
  | { index: number; kind: 'foreign'; folder: string; reason: string }
  | { index: number; kind: 'started'; folder: string; lastWrittenMs: number; detail: string }
  | { index: number; kind: 'missing' };

interface HeaderSummary {
  format: string;
  scenarioHash: string;
  scanHash?: string;
  realisations?: number;
  blockSize?: number;
  notConverged: number;
  seconds: number;
}

function readHeader(folder: string): HeaderSummary | null {
  try {
    const h = JSON.parse(readFileSync(join(folder, SHARD_HEADER_FILE), 'utf8')) as Record<string, unknown>;
    if (h.format === SHARD_FORMAT) {
      const blocks = (h.blocks as Array<{ records: Array<{ converged: boolean }> }>) ?? [];
      return {
        format: SHARD_FORMAT,
        scenarioHash: String(h.scenarioHash),
        realisations: Number(h.realisations),
        blockSize: Number(h.blockSize),
        notConverged: blocks.flatMap((b) => b.records).filter((r) => !r.converged).length,
        seconds: Number((h.run as { seconds?: number })?.seconds ?? NaN),
      };
    }
    if (h.format === SCAN_SHARD_FORMAT) {
      const rows = (h.rows as Array<{ converged: boolean }>) ?? [];
      return {
        format: SCAN_SHARD_FORMAT,
        scenarioHash: String(h.scenarioHash),
        scanHash: String(h.scanHash),
        notConverged: rows.filter((r) => !r.converged).length,
        seconds: Number((h.run as { seconds?: number })?.seconds ?? NaN),
      };
    }
  } catch {
    return null;
  }
  return null;
}

/** Newest modification time of a folder and the files directly in it (and one level down), ms. */
function lastWritten(folder: string): number {
  let newest = statSync(folder).mtimeMs;
  const visit = (dir: string, depth: number): void => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const full = join(dir, e.name);
      try {
        newest = Math.max(newest, statSync(full).mtimeMs);
      } catch {
        continue;
      }
      if (e.isDirectory() && depth > 0) visit(full, depth - 1);
    }
  };
  visit(folder, 1);
  return newest;
}

export function shardStates(shardDir: string, count: number, expect: ShardExpectation): ShardState[] {
  const entries = existsSync(shardDir) ? readdirSync(shardDir) : [];
  const states: ShardState[] = [];
  for (let k = 0; k < count; k++) {
    const name = shardFolderName({ index: k, count });
    const folder = join(shardDir, name);
    const header = existsSync(join(folder, SHARD_HEADER_FILE)) ? readHeader(folder) : null;
    if (header !== null) {
      const reasons: string[] = [];
      if (expect.scenarioHash !== null && header.scenarioHash !== expect.scenarioHash) reasons.push(`scenario ${header.scenarioHash.slice(0, 12)}, expected ${expect.scenarioHash.slice(0, 12)}`);
      if (expect.scanHash !== null && header.scanHash !== expect.scanHash) reasons.push(header.format === SCAN_SHARD_FORMAT ? 'a different scan setup' : 'an ensemble shard, expected a scan shard');
      if (expect.ensemble !== null) {
        if (header.format !== SHARD_FORMAT) reasons.push('a scan shard, expected an ensemble shard');
        else if (header.realisations !== expect.ensemble.realisations || header.blockSize !== expect.ensemble.blockSize) {
          reasons.push(`${header.realisations} realisations in blocks of ${header.blockSize}, expected ${expect.ensemble.realisations} in blocks of ${expect.ensemble.blockSize}`);
        }
      }
      states.push(reasons.length > 0 ? { index: k, kind: 'foreign', folder, reason: reasons.join('; ') } : { index: k, kind: 'done', folder, notConverged: header.notConverged, seconds: header.seconds });
      continue;
    }
    const staging = entries.filter((e) => e.startsWith(`.${name}.tmp-`)).map((e) => join(shardDir, e));
    const partial = join(shardDir, `${name}.partial`);
    const started = [...staging, ...(existsSync(partial) ? [partial] : [])];
    if (started.length === 0) {
      states.push({ index: k, kind: 'missing' });
      continue;
    }
    const newest = Math.max(...started.map(lastWritten));
    let detail = '';
    if (existsSync(join(partial, SCAN_WORK_FILE))) {
      const done = existsSync(join(partial, 'points')) ? readdirSync(join(partial, 'points')).filter((f) => /^point-\d+\.json$/.test(f)).length : 0;
      detail = `${done} point${done === 1 ? '' : 's'} done`;
    } else if (staging.length > 0) {
      const blocks = existsSync(join(staging[0], 'blocks')) ? readdirSync(join(staging[0], 'blocks')).length : 0;
      detail = `${blocks} block${blocks === 1 ? '' : 's'} staged`;
    }
    states.push({ index: k, kind: 'started', folder: started[0], lastWrittenMs: newest, detail });
  }
  return states;
}

/** Shard counts K that the names in a collecting folder show (shard-k-of-K, also staging and partial folders). */
export function shardCountsIn(shardDir: string): number[] {
  if (!existsSync(shardDir)) return [];
  const counts = new Set<number>();
  for (const e of readdirSync(shardDir)) {
    const m = /^\.?shard-\d+-of-(\d+)(\.partial|\.tmp-.*)?$/.exec(e);
    if (m) counts.add(Number(m[1]));
  }
  return [...counts].sort((a, b) => a - b);
}

/** "0-3,7": shard lists for messages and for sbatch --array. */
export function indexList(indices: readonly number[]): string {
  return formatBlockList(indices).replace(/, /g, ',');
}

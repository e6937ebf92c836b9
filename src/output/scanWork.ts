// The partial results of a running scan, kept point by point so that an interrupted or
// killed scan (a batch system's time limit, a cancelled job) continues where it stopped:
// run the same command again and the points already done are skipped.
//
// The work folder sits next to the scan's output folder, `<out>.partial` (for a shard:
// `<collect>/shard-k-of-K.partial`), and holds
//   work.json                        format tag, tool version, the scan's identity hash
//                                    (scanIdentity.ts) and what it stands for
//   points/point-NNNNNN.json         one finished point: its row and the start data of
//                                    its solution (mu, nmax, k_B T, dN/dmu)
//   points/point-NNNNNN.phi.npy      the point's order parameter, kept for the last two
//                                    finished points of a chain that is not complete (what
//                                    the chain's next point starts from)
//   points/point-NNNNNN/             the point's own output folder (--keep-points)
// A point's JSON is written last, through a temporary name and a rename, so a point is
// either done with all its files or not done. A work folder of a different scan is
// refused (its identity differs), never mixed in. The folder is removed once the scan's
// results are in place.

import { existsSync, lstatSync, mkdirSync, readdirSync, readFileSync, renameSync, rmdirSync, rmSync, unlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import * as z from 'zod';
import { decodeNpy, encodeNpy, NpyFormatError } from '../formats/npy.js';
import { InputError } from '../scenario/inputError.js';
import type { DonePoint, ScanPointResult, WarmStart } from '../pipeline/scan/runScan.js';
import { chainPoints, type ScanPlan } from '../pipeline/scan/scanPlan.js';
import type { ScanRow } from '../pipeline/scan/scanRow.js';
import { scanRowFromJson, scanRowToJson, ScanRowSchema } from './scanRecords.js';
import { removeOwnedFolder, type OutputFolder } from './outputFolder.js';
import { Sha256HexSchema, ToolStampSchema, toolStamp } from './recordFields.js';

export const SCAN_WORK_FORMAT = 'tiercake-scan-work';
export const SCAN_WORK_FILE = 'work.json';

const WorkHeaderSchema = z.strictObject({
  format: z.literal(SCAN_WORK_FORMAT),
  formatVersion: z.literal(1),
  tool: ToolStampSchema,
  scanHash: Sha256HexSchema,
  describes: z.string(),
  points: z.int().min(1),
});

const PointSchema = z.strictObject({
  row: ScanRowSchema,
  warm: z.strictObject({ mu: z.number(), nmax: z.int().min(1), kT: z.number(), atomSlope: z.number().nullable(), shape: z.array(z.int().min(1)) }),
});

/** `<out>.partial`: the work folder of the output folder `finalPath`. */
export function scanWorkPath(finalPath: string): string {
  return `${finalPath}.partial`;
}

/** `point-000017`: the name of a point's files here, and of its kept folder in the results (`points/<name>/`). */
export function pointFolderName(point: number): string {
  return `point-${String(point).padStart(6, '0')}`;
}
const pointName = pointFolderName;

export interface ScanWork {
  path: string;
  /** points done when the folder was opened (a resumed run) */
  resumedPoints: number;
  done(point: number): DonePoint | undefined;
  /** the folder a kept point's own outputs go to (--keep-points) */
  pointFolder(point: number): string;
  /**
   * Record a finished point. `keepSolution`: its phi is kept for the chain's next points;
   * `release`: points whose phi is no longer needed (deleted after this point is recorded).
   */
  record(row: ScanRow, warm: WarmStart, shape: readonly number[], keepSolution: boolean, release: readonly number[]): void;
  /** rows of all points done, by point index */
  rows(): ScanRow[];
  /** delete the folder (only the files it writes) */
  remove(): void;
}

function writeAtomic(path: string, text: string | Uint8Array): void {
  const tmp = `${path}.tmp-${process.pid}`;
  writeFileSync(tmp, text);
  renameSync(tmp, path);
}

/**
 * Open (or create) the work folder of a scan. `scanHash` identifies the scan; a folder
 * holding another scan's points is refused, naming the option that chose it.
 */
export function openScanWork(path: string, scanHash: string, describes: string, pointCount: number, option = '--out'): ScanWork {
  let st;
  try {
    st = lstatSync(path);
  } catch {
    st = null;
  }
  const headerFile = join(path, SCAN_WORK_FILE);
  if (st !== null) {
    if (!st.isDirectory()) throw new InputError(`${option}: ${path} is in the way of the scan's partial results (it is not a folder); move it away`);
    let header: z.infer<typeof WorkHeaderSchema> | null = null;
    try {
      const parsed = WorkHeaderSchema.safeParse(JSON.parse(readFileSync(headerFile, 'utf8')));
      header = parsed.success ? parsed.data : null;
    } catch {
      header = null;
    }
    if (header === null) {
      const empty = readdirSync(path).length === 0;
      if (!empty) throw new InputError(`${option}: ${path} exists but holds no partial scan of tiercake (${SCAN_WORK_FILE} missing or unreadable); move it away`);
    } else if (header.scanHash !== scanHash) {
      throw new InputError(
        `${option}: ${path} holds the partial results of a different scan (${header.describes}; tiercake ${header.tool.version}); ` +
          'finish that scan with its own command, or remove the folder, or choose another --out',
      );
    }
  }
  try {
    mkdirSync(join(path, 'points'), { recursive: true });
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'EACCES' || code === 'EPERM' || code === 'EROFS' || code === 'ENOTDIR' || code === 'ENOSPC') {
      throw new InputError(`${option}: cannot create the scan's partial-results folder ${path} (${code}); choose a folder you may write to`);
    }
    throw err;
  }
  if (!existsSync(headerFile)) {
    writeAtomic(headerFile, `${JSON.stringify({ format: SCAN_WORK_FORMAT, formatVersion: 1, tool: toolStamp(), scanHash, describes, points: pointCount }, null, 1)}\n`);
  }

  const doneRows = new Map<number, { json: z.infer<typeof PointSchema>; file: string }>();
  for (const name of readdirSync(join(path, 'points'))) {
    const m = /^point-(\d{6,})\.json$/.exec(name);
    if (!m) continue;
    const file = join(path, 'points', name);
    let parsed;
    try {
      parsed = PointSchema.safeParse(JSON.parse(readFileSync(file, 'utf8')));
    } catch {
      parsed = null;
    }
    // A damaged record is solved again (the point is simply not done).
    if (parsed?.success && parsed.data.row.point === Number(m[1]) && parsed.data.row.point < pointCount) doneRows.set(parsed.data.row.point, { json: parsed.data, file });
  }
  const phiFile = (point: number): string => join(path, 'points', `${pointName(point)}.phi.npy`);

  return {
    path,
    resumedPoints: doneRows.size,
    done(point) {
      const entry = doneRows.get(point);
      if (!entry) return undefined;
      const w = entry.json.warm;
      let warm: WarmStart | null = null;
      if (existsSync(phiFile(point))) {
        try {
          const decoded = decodeNpy(new Uint8Array(readFileSync(phiFile(point))), phiFile(point));
          const sites = w.shape.reduce((a, b) => a * b, 1);
          if (decoded.data.length === sites) warm = { phi: decoded.data, mu: w.mu, nmax: w.nmax, kT: w.kT, atomSlope: w.atomSlope ?? NaN };
        } catch (err) {
          if (!(err instanceof NpyFormatError)) throw err;
        }
      }
      return { row: scanRowFromJson(entry.json.row), warm };
    },
    pointFolder(point) {
      return join(path, 'points', pointName(point));
    },
    record(row, warm, shape, keepSolution, release) {
      if (keepSolution) writeAtomic(phiFile(row.point), encodeNpy(warm.phi, shape));
      const json = {
        row: scanRowToJson(row),
        warm: { mu: warm.mu, nmax: warm.nmax, kT: warm.kT, atomSlope: Number.isNaN(warm.atomSlope) ? null : warm.atomSlope, shape: [...shape] },
      };
      const file = join(path, 'points', `${pointName(row.point)}.json`);
      writeAtomic(file, `${JSON.stringify(json)}\n`);
      doneRows.set(row.point, { json, file });
      for (const p of release) if (existsSync(phiFile(p))) unlinkSync(phiFile(p));
    },
    rows() {
      return [...doneRows.keys()].sort((a, b) => a - b).map((p) => scanRowFromJson((doneRows.get(p) as { json: z.infer<typeof PointSchema> }).json.row));
    },
    remove() {
      const points = join(path, 'points');
      for (const name of existsSync(points) ? readdirSync(points) : []) {
        const full = join(points, name);
        if (/^point-\d{6,}\.(json|phi\.npy)$/.test(name)) unlinkSync(full);
        else if (/^point-\d{6,}$/.test(name)) removeOwnedFolder(full);
        else if (/^point-\d{6,}\.(json|phi\.npy)\.tmp-\d+$/.test(name)) rmSync(full, { force: true });
        // the staging folder of a kept point's outputs, left by a killed run (outputFolder.ts)
        else if (/^\.point-\d{6,}\.tmp-[0-9]+-[0-9a-z]+$/.test(name)) rmSync(full, { recursive: true, force: true });
      }
      for (const dir of [points]) {
        try {
          rmdirSync(dir);
        } catch {
          // something else is in it: keep it
        }
      }
      if (existsSync(headerFile)) unlinkSync(headerFile);
      try {
        rmdirSync(path);
      } catch {
        // not empty: a file tiercake did not write; keep it
      }
    },
  };
}

/**
 * Stage every file under `source` (a finished point folder) into `folder` at `prefix`,
 * its own marker included, so the copied point folder still says what wrote it.
 */
export function copyFolderInto(folder: OutputFolder, source: string, prefix: string): void {
  const walk = (dir: string, rel: string): void => {
    for (const entry of readdirSync(dir, { withFileTypes: true }).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))) {
      const full = join(dir, entry.name);
      const name = rel ? `${rel}/${entry.name}` : entry.name;
      if (entry.isDirectory()) walk(full, name);
      else if (entry.isFile()) folder.write(`${prefix}/${name}`, new Uint8Array(readFileSync(full)));
    }
  };
  walk(source, '');
}

/**
 * Record a point `runScan` finished, keeping its solution while the chain's next points
 * may start from it: a point starts from the two before it, so the one two back is
 * released, and at the end of a chain the last two are.
 */
export function recordScanPoint(work: ScanWork, plan: ScanPlan, r: ScanPointResult): void {
  const points = chainPoints(plan, r.chain);
  const release = r.lastOfChain ? points.slice(Math.max(0, r.position - 2), r.position) : r.position >= 2 ? [points[r.position - 2]] : [];
  work.record(r.row, r.warm, r.artifacts.resolved.geometry.shape, !r.lastOfChain, release);
}

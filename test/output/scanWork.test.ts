// The partial results of a running scan (src/output/scanWork.ts): a point recorded is done
// when the folder is opened again, with its row and (while its chain needs it) its order
// parameter bit for bit; a folder of another scan, a file in the way, or a folder that is
// not ours is refused naming the option; a damaged point is simply not done; the phi of a
// point is released once no later point of its chain starts from it (a point starts from
// the two before it: src/pipeline/scan/runScan.ts), counted here by hand for a chain of 4.
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openScanWork, pointFolderName, recordScanPoint, scanWorkPath, SCAN_WORK_FILE } from '../../src/output/scanWork.js';
import { planScan } from '../../src/pipeline/scan/scanPlan.js';
import type { ScanPointResult, WarmStart } from '../../src/pipeline/scan/runScan.js';
import type { SolveArtifacts } from '../../src/pipeline/solveScenario.js';
import { InputError } from '../../src/scenario/inputError.js';
import { madeUpRow } from '../helpers/scanRows.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scanwork-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const hashA = 'a'.repeat(64);
const hashB = 'b'.repeat(64);
const plan = planScan([{ path: 'hubbard.hopping', values: [0.01, 0.02, 0.03, 0.04, 0.05], spacing: 'list' }], 4);
const warm = (p: number): WarmStart => ({ phi: Float64Array.from([0.1 + p, 1 / 3, 5e-324, 0.7]), mu: 0.5 + p, nmax: 4, kT: 0, atomSlope: p === 0 ? NaN : 2.5 });
const phiFiles = (path: string): string[] => readdirSync(join(path, 'points')).filter((f) => f.endsWith('.phi.npy')).sort();

describe('scan work folder', () => {
  it('names the work folder after the output folder and points with six digits', () => {
    expect(scanWorkPath('/x/out/layer-scan')).toBe('/x/out/layer-scan.partial');
    expect(pointFolderName(17)).toBe('point-000017');
    expect(pointFolderName(1234567)).toBe('point-1234567');
  });

  it('a recorded point is done when the folder is opened again, bit for bit', () => {
    const path = join(dir, 'resume.partial');
    const work = openScanWork(path, hashA, 'test scan', plan.pointCount);
    expect(work.resumedPoints).toBe(0);
    expect(existsSync(join(path, SCAN_WORK_FILE))).toBe(true);
    work.record(madeUpRow(plan, 0), warm(0), [2, 2], true, []);
    work.record(madeUpRow(plan, 1), warm(1), [2, 2], false, []);
    const again = openScanWork(path, hashA, 'test scan', plan.pointCount);
    expect(again.resumedPoints).toBe(2);
    const done0 = again.done(0);
    expect(done0?.row).toEqual(madeUpRow(plan, 0));
    expect([...(done0?.warm?.phi ?? [])]).toEqual([...warm(0).phi]);
    expect(Number.isNaN(done0?.warm?.atomSlope)).toBe(true);
    expect(done0?.warm?.mu).toBe(0.5);
    // point 1 was recorded without its solution: done, but nothing to start from
    expect(again.done(1)?.warm).toBeNull();
    expect(again.done(2)).toBeUndefined();
    expect(again.rows().map((r) => r.point)).toEqual([0, 1]);
  });

  it('refuses another scan, a file in the way and a folder that is not ours, naming the option', () => {
    const path = join(dir, 'other.partial');
    openScanWork(path, hashA, 'scan A', plan.pointCount);
    expect(() => openScanWork(path, hashB, 'scan B', plan.pointCount)).toThrow(/--out: .* holds the partial results of a different scan \(scan A;/);
    const file = join(dir, 'file.partial');
    writeFileSync(file, 'x');
    expect(() => openScanWork(file, hashA, 'scan A', plan.pointCount, '--keep-points')).toThrow(InputError);
    expect(() => openScanWork(file, hashA, 'scan A', plan.pointCount, '--keep-points')).toThrow(/^--keep-points: .* is not a folder/);
    const foreign = join(dir, 'foreign.partial');
    mkdirSync(foreign);
    writeFileSync(join(foreign, 'notes.txt'), 'mine');
    expect(() => openScanWork(foreign, hashA, 'scan A', plan.pointCount)).toThrow(/holds no partial scan of tiercake/);
  });

  it('a damaged point record is not done (it is solved again)', () => {
    const path = join(dir, 'damaged.partial');
    const work = openScanWork(path, hashA, 'scan', plan.pointCount);
    work.record(madeUpRow(plan, 2), warm(2), [2, 2], false, []);
    writeFileSync(join(path, 'points', `${pointFolderName(3)}.json`), '{"row": 1');
    const again = openScanWork(path, hashA, 'scan', plan.pointCount);
    expect(again.resumedPoints).toBe(1);
    expect(again.done(3)).toBeUndefined();
  });

  it('keeps each phi while the chain still starts from it (chain of 4, counted by hand)', () => {
    const path = join(dir, 'release.partial');
    const work = openScanWork(path, hashA, 'scan', plan.pointCount);
    const artifacts = { resolved: { geometry: { shape: [2, 2] } } } as unknown as SolveArtifacts;
    const result = (p: number, position: number, last: boolean): ScanPointResult => ({ point: p, chain: 0, position, row: madeUpRow(plan, p), artifacts, warm: warm(p), overrides: [], lastOfChain: last });
    const name = (p: number): string => `${pointFolderName(p)}.phi.npy`;
    recordScanPoint(work, plan, result(0, 0, false));
    recordScanPoint(work, plan, result(1, 1, false));
    expect(phiFiles(path)).toEqual([name(0), name(1)]);
    // point 3 starts from points 1 and 2: point 0 is no longer needed
    recordScanPoint(work, plan, result(2, 2, false));
    expect(phiFiles(path)).toEqual([name(1), name(2)]);
    // the chain's last point: nothing starts from any of them
    recordScanPoint(work, plan, result(3, 3, true));
    expect(phiFiles(path)).toEqual([]);
    expect(openScanWork(path, hashA, 'scan', plan.pointCount).resumedPoints).toBe(4);
  });

  it('remove deletes what it wrote and keeps a folder holding a file it did not write', () => {
    const clean = join(dir, 'clean.partial');
    const work = openScanWork(clean, hashA, 'scan', plan.pointCount);
    work.record(madeUpRow(plan, 0), warm(0), [2, 2], true, []);
    work.remove();
    expect(existsSync(clean)).toBe(false);
    const kept = join(dir, 'kept.partial');
    const other = openScanWork(kept, hashA, 'scan', plan.pointCount);
    writeFileSync(join(kept, 'mine.txt'), 'x');
    other.remove();
    expect(readdirSync(kept)).toEqual(['mine.txt']);
  });
});

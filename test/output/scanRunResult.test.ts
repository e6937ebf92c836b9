// The end of a scan run (src/output/scanRunResult.ts) and the merge of scan shards
// (src/output/shardMerge.ts). 5 points in chains of 2 make chains {0,1}, {2,3}, {4}
// (counted by hand); rows are made up (test/helpers/scanRows.ts; the scenario, a 3 x 2
// layer, that of test/helpers/madeUpEnsemble.ts), recorded into the work
// folder as a run records them. The rows read back are those of the chains asked for, in
// point order, and a missing point is an error; the identity's hold is kept only with a
// characteristicDensity axis (the --fixed option's rule); a complete run's summary.json
// holds the rows and provenance, and the work folder is gone; two shards merged give the
// complete run's rows, the merged folder gets the scan's default name out/<name>-scan.
// Mutations tried: filtering the rows with `!wanted.has` (the rows and the count check
// fail); `resumedPoints: 0` -> the run's thread count in the provenance (summary.json fails).
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { commitScanRun, keepScanPoint, scanRunIdentity, scanRunRows } from '../../src/output/scanRunResult.js';
import { mergeShards } from '../../src/output/shardMerge.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { openScanWork, scanWorkPath } from '../../src/output/scanWork.js';
import { planScan, shardChains } from '../../src/pipeline/scan/scanPlan.js';
import type { ScanPointResult } from '../../src/pipeline/scan/runScan.js';
import type { ScanSetup } from '../../src/pipeline/scan/scanSetup.js';
import type { SolveArtifacts } from '../../src/pipeline/solveScenario.js';
import { madeUpRow } from '../helpers/scanRows.js';
import { madeUpEnsemble } from '../helpers/madeUpEnsemble.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-scanrun-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const plan = planScan([{ path: 'hubbard.hopping', values: [0.01, 0.02, 0.03, 0.04, 0.05], spacing: 'list' }], 2);
const setup = { plan, hold: 'trap', base: { scenario: madeUpEnsemble().identity.scenario }, scenarioHash: '1'.repeat(64), keepPoints: false } as unknown as ScanSetup;
const id = scanRunIdentity(setup, 'U');
const artifacts = { resolved: { geometry: { shape: [2, 2] } } } as unknown as SolveArtifacts;
const warm = (p: number) => ({ phi: Float64Array.from([0.1 + p, 0.2, 0.3, 0.4]), mu: 0.5, nmax: 4, kT: 0, atomSlope: 1 });
const result = (p: number, position: number, last: boolean): ScanPointResult => ({ point: p, chain: Math.floor(p / 2), position, row: madeUpRow(plan, p, { chemicalPotential: 0.1 + 0.2 + p }), artifacts, warm: warm(p), overrides: [], lastOfChain: last });
const target = (path: string) => checkOutputTarget(path, { option: '--out' });
const chainOf = [[0, 1], [2, 3], [4]];

/** A run over `chains` at `path`: every point of them kept in the work folder. */
async function recorded(path: string, chains: number[]) {
  const work = openScanWork(scanWorkPath(path), id.scanHash, 'test scan', plan.pointCount);
  for (const c of chains) for (const [position, p] of chainOf[c].entries()) await keepScanPoint(work, id, result(p, position, position === chainOf[c].length - 1));
  return work;
}

describe('scan run result', () => {
  it('identity: the setup as its files carry it; no hold without a characteristicDensity axis', () => {
    expect(id).toMatchObject({ scenarioHash: '1'.repeat(64), plan, hold: null, energyUnit: 'U', keepPoints: false });
    expect(id.scanHash).toMatch(/^[0-9a-f]{64}$/);
  });

  it('rows of the chains asked for, in point order; a missing point is an error', async () => {
    const work = await recorded(join(dir, 'rows'), [1, 2]);
    expect(scanRunRows(work, id, [1, 2]).map((r) => r.point)).toEqual([2, 3, 4]);
    expect(scanRunRows(work, id, [2]).map((r) => r.point)).toEqual([4]);
    expect(() => scanRunRows(work, id, [0, 1])).toThrow('scan: 2 rows for 4 points');
  });

  it('a complete run writes rows and provenance and removes the work folder; two shards merge into the same rows', async () => {
    const path = join(dir, 'complete');
    const work = await recorded(path, [0, 1, 2]);
    const rows = scanRunRows(work, id, [0, 1, 2]);
    const committed = await commitScanRun(target(path), work, id, { chains: [0, 1, 2], rows, shard: null, threads: 3, seconds: 2.5 }, 'one run, by hand');
    if (committed.kind !== 'complete') throw new Error('expected a complete result');
    const summary = JSON.parse(readFileSync(join(path, 'summary.json'), 'utf8'));
    expect(summary.provenance).toEqual({ kind: 'single run', threads: 3, seconds: 2.5, resumedPoints: 0 });
    expect(readFileSync(join(path, 'report.html'), 'utf8')).toContain('one run, by hand');
    expect(existsSync(scanWorkPath(path))).toBe(false);

    const collect = join(dir, 'shards');
    for (const index of [0, 1]) {
      const shard = { index, count: 2, source: 'test' };
      const chains = shardChains(plan, index, 2);
      const shardPath = join(collect, `shard-${index}-of-2`);
      const shardWork = await recorded(shardPath, chains);
      const done = await commitScanRun(target(shardPath), shardWork, id, { chains, rows: scanRunRows(shardWork, id, chains), shard, threads: 1, seconds: 1 }, 'not used by a shard');
      expect(done.kind === 'shard' && done.shard).toBe(shard);
      expect(existsSync(scanWorkPath(shardPath))).toBe(false);
    }
    const asked: string[] = [];
    const merged = await mergeShards([collect], (name) => {
      asked.push(name);
      return target(join(dir, 'merged'));
    });
    expect(asked).toEqual(['out/merge-layer-scan']);
    if (merged.kind !== 'scan') throw new Error('expected a scan merge');
    expect(merged.shardCount).toBe(2);
    expect(merged.outcome.rows).toEqual(committed.outcome.rows);
    expect(merged.outcome.rows[3].chemicalPotential).toBe(0.1 + 0.2 + 3);
  });
});

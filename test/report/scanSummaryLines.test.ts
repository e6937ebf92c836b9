// The terminal lines of `scan` and of the merge of scan shards
// (src/report/scanSummaryLines.ts), for made-up rows: each line written out here in full.
import { describe, expect, it } from 'vitest';
import { scanDoneLines, scanPointLine, scanShardLines } from '../../src/report/scanSummaryLines.js';
import type { ScanOutcome } from '../../src/output/scanOutputs.js';
import type { ScanPointResult } from '../../src/pipeline/scan/runScan.js';
import { planScan } from '../../src/pipeline/scan/scanPlan.js';
import type { Scenario } from '../../src/scenario/scenarioSchema.js';
import { madeUpRow } from '../helpers/scanRows.js';

const plan = planScan([{ path: 'hubbard.hopping', values: [0.01, 0.02, 0.03], spacing: 'list' }, { path: 'trap.coefficient', values: [0.1, 0.2], spacing: 'list' }], 2);
const rows = [0, 1, 2, 3, 4, 5].map((p) => madeUpRow(plan, p, { converged: p !== 4 }));

describe('scan summary lines', () => {
  it('one line per finished point', () => {
    const r = { point: 3, row: rows[3] } as ScanPointResult;
    expect(scanPointLine(plan, r, 2, 6, 'U')).toBe('tiercake scan: point 2/6 (#3, hubbard.hopping=0.02 trap.coefficient=0.2): converged, 103 sweeps (warm start), N 1030.00, mu 0.53000 U');
    const bad = { point: 4, row: rows[4] } as ScanPointResult;
    expect(scanPointLine(plan, bad, 5, 6, 'Hz')).toContain('#4, hubbard.hopping=0.03 trap.coefficient=0.1): NOT CONVERGED, 104 sweeps (cold start)');
  });

  it('the summary of a scan, with or without its time', () => {
    const o = { scenario: { name: 'layer' } as unknown as Scenario, plan, rows } as ScanOutcome;
    // sweeps: 100 + p summed over p = 0..5 = 615
    expect(scanDoneLines(o, 12.345)).toEqual(['layer: scan of hubbard.hopping x trap.coefficient, 6 points in 12.3 s, 615 sweeps, 1 NOT CONVERGED']);
    expect(scanDoneLines({ ...o, rows: rows.slice(0, 2) }, null)).toEqual(['layer: scan of hubbard.hopping x trap.coefficient, 2 points, 201 sweeps, all converged']);
  });

  it('the summary of a shard, and of a shard without chains', () => {
    const shard = { index: 1, count: 2, source: 'SLURM_ARRAY_TASK_ID' };
    expect(scanShardLines('layer', shard, plan, [1, 2], rows.slice(2), 4, '/c/shard-1-of-2', '/c', 'node dist/main.js')).toEqual([
      'layer: scan shard 1 of 2 (index from SLURM_ARRAY_TASK_ID): 4 points in chains 1-2 of 3 in 4.0 s, 1 NOT CONVERGED',
      '  partial result in /c/shard-1-of-2',
      '  merge when every shard is done: node dist/main.js merge /c --out <folder>',
    ]);
    expect(scanShardLines('layer', { ...shard, count: 5, index: 4 }, plan, [], [], 0, '/c/s', '/c', 'tiercake')[0]).toBe('layer: scan shard 4 of 5 (index from SLURM_ARRAY_TASK_ID): no chains (only 3 chains for 5 shards) in 0.0 s');
  });
});

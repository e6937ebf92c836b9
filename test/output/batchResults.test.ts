// The result folders of a finished scan or ensemble (src/output/batchResults.ts): the files
// of scanOutputs.ts / ensembleOutputs.ts, the marker naming the command that wrote them
// (`scan`/`ensemble` for one run, `merge` for merged shards) with the outcome's scenario
// hash, the kept point folders, and the report carrying the
// provenance line it was given. Outcomes made up (test/helpers).
import { mkdtempSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeEnsembleResult, writeScanResult } from '../../src/output/batchResults.js';
import { scanCsv, scanSummary, type ScanOutcome } from '../../src/output/scanOutputs.js';
import type { EnsembleOutcome } from '../../src/output/ensembleOutputs.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { readMarker } from '../../src/output/outputMarker.js';
import { copyKeptPoints } from '../../src/output/scanKeptPoints.js';
import { combineBlocks } from '../../src/pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../../src/pipeline/ensemble/ensembleStatistics.js';
import { planScan } from '../../src/pipeline/scan/scanPlan.js';
import { madeUpRow } from '../helpers/scanRows.js';
import { madeUpEnsemble } from '../helpers/madeUpEnsemble.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-batchresults-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const marker = (path: string): { command: string; scenarioHash: string; files: string[] } => readMarker(path) as { command: string; scenarioHash: string; files: string[] };

describe('writeScanResult', () => {
  it('writes the scan files and the report with its provenance line, and the kept points', async () => {
    const plan = planScan([{ path: 'hubbard.hopping', values: [0.01, 0.02], spacing: 'list' }], 8);
    const outcome: ScanOutcome = {
      scenario: madeUpEnsemble().identity.scenario,
      scenarioHash: '5'.repeat(64),
      scanHash: '6'.repeat(64),
      plan,
      hold: null,
      energyUnit: 'U',
      keepPoints: true,
      rows: [madeUpRow(plan, 0), madeUpRow(plan, 1)],
      provenance: { kind: 'merged shards', shards: [] },
    };
    const kept = join(dir, 'kept');
    mkdirSync(kept);
    writeFileSync(join(kept, 'summary.json'), '{}');
    const path = join(dir, 'scan');
    await writeScanResult(checkOutputTarget(path, { option: '--out' }), 'merge', outcome, 'merge of 2 scan shards (2 given); compute time 3.0 s in total', (f) => copyKeptPoints(f, [1], () => kept));
    const m = marker(path);
    expect(m.command).toBe('merge');
    expect(m.scenarioHash).toBe('5'.repeat(64));
    expect(m.files).toEqual(expect.arrayContaining(['points/point-000001/summary.json', 'scan.csv', 'summary.json', 'report.html']));
    expect(readFileSync(join(path, 'scan.csv'), 'utf8')).toBe(scanCsv(outcome));
    expect(JSON.parse(readFileSync(join(path, 'summary.json'), 'utf8'))).toEqual(JSON.parse(JSON.stringify(scanSummary(outcome))));
    expect(readFileSync(join(path, 'report.html'), 'utf8')).toContain('merge of 2 scan shards (2 given); compute time 3.0 s in total');
  });
});

describe('writeEnsembleResult', () => {
  it('writes the ensemble files under the command that made them', async () => {
    const { identity, partial } = madeUpEnsemble();
    const total = combineBlocks([0, 1, 2, 3].map(partial), identity.bins);
    const outcome: EnsembleOutcome = { ...identity, total, stats: ensembleStatistics(total), provenance: { kind: 'single run', threads: 1, parallelOver: 'realisations', seconds: 1 } };
    const path = join(dir, 'ensemble');
    await writeEnsembleResult(checkOutputTarget(path, { option: '--out' }), 'ensemble', outcome, 'one run, 1 thread, parallel over realisations, 1.0 s');
    const m = marker(path);
    expect(m.command).toBe('ensemble');
    expect(m.scenarioHash).toBe(identity.scenarioHash);
    expect(m.files).toContain('summary.json');
    expect(JSON.parse(readFileSync(join(path, 'summary.json'), 'utf8')).ensemble).toMatchObject({ realisations: 7, blockSize: 2, blocks: 4 });
    expect(readFileSync(join(path, 'report.html'), 'utf8')).toContain('one run, 1 thread, parallel over realisations, 1.0 s');
  });
});

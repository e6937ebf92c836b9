// The per-point folders of `scan --keep-points` (src/output/scanKeptPoints.ts): a point's
// folder is what `tiercake solve` writes for its solution (summary.json and report, the
// marker saying `scan point` with the point's scenario hash), a file in its way is refused
// naming --keep-points, and kept folders are staged into a result as
// points/point-NNNNNN/ with every file (their own marker included) byte for byte.
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { copyKeptPoints, shardKeptPoint, writeKeptPoint } from '../../src/output/scanKeptPoints.js';
import { OutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { OUTPUT_MARKER, readMarker } from '../../src/output/outputMarker.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { scenarioHash } from '../../src/scenario/scenarioHash.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-keptpoints-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const file = join(dir, 'dot.json');
writeFileSync(file, JSON.stringify({ name: 'dot', energyUnit: 'U', truncation: { nmax: 3 }, lattice: { shape: [6, 6] }, hubbard: { hopping: 0.03 }, trap: { coefficient: 0.05 }, particles: { chemicalPotential: 0.6 } }));

describe('kept point folders', () => {
  it('a point is written as solve writes it, and refused when a file is in the way', async () => {
    const artifacts = await solveScenario(prepareScenario(file), { threads: 1 });
    const path = join(dir, 'work', 'points', 'point-000003');
    await writeKeptPoint(path, artifacts);
    const marker = readMarker(path) as { command: string; scenarioHash: string; files: string[] };
    expect(marker.command).toBe('scan point');
    expect(marker.scenarioHash).toBe(scenarioHash(artifacts.scenario));
    expect(marker.files).toContain('summary.json');
    expect(marker.files).toContain('report.html');
    writeFileSync(join(dir, 'in-the-way'), 'x');
    await expect(writeKeptPoint(join(dir, 'in-the-way'), artifacts)).rejects.toThrow(/^--keep-points /);
  });

  it('stages kept folders into a result under points/, byte for byte', () => {
    const shard = join(dir, 'shard-0-of-1');
    for (const p of [4, 12]) {
      mkdirSync(join(shardKeptPoint(shard, p), 'images'), { recursive: true });
      writeFileSync(join(shardKeptPoint(shard, p), 'images', 'a.png'), Uint8Array.from([p, 0, 255]));
      writeFileSync(join(shardKeptPoint(shard, p), OUTPUT_MARKER), `{"point": ${p}}`);
    }
    expect(shardKeptPoint(shard, 12)).toBe(join(shard, 'points', 'point-000012'));
    const folder = new OutputFolder(checkOutputTarget(join(dir, 'result'), { option: '--out' }), { command: 'scan', scenarioHash: 'a'.repeat(64) });
    copyKeptPoints(folder, [12, 4], (p) => shardKeptPoint(shard, p));
    expect(folder.written()).toEqual([`points/point-000012/${OUTPUT_MARKER}`, 'points/point-000012/images/a.png', `points/point-000004/${OUTPUT_MARKER}`, 'points/point-000004/images/a.png']);
    const result = folder.commit().path;
    expect([...readFileSync(join(result, 'points', 'point-000012', 'images', 'a.png'))]).toEqual([12, 0, 255]);
  });
});

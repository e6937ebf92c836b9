// Files of `tiercake diagram` (src/output/diagramOutputs.ts): the CSV files carry the map's
// numbers unchanged, and the tips listed are those of the fillings n >= 1, at the analytic
// mean-field tips zJ/U = 2n + 1 - 2 sqrt(n(n + 1)) (van Oosten, van der Straten & Stoof,
// PRA 63, 053601 (2001)) to the grid's resolution.

import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { diagramTitle, lobesOf, writeDiagramFiles, type DiagramSettings } from '../../src/output/diagramOutputs.js';
import { writeOutputFolder } from '../../src/output/outputFolder.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { phaseMap } from '../../src/solver/phaseMap.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-diagram-out-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const rowsOf = (text: string): number[][] => text.split('\n').filter((l) => l && !l.startsWith('#')).slice(1).map((l) => l.split(',').map(Number));

describe('diagram files', () => {
  it('tips of n >= 1 at the analytic values; the grid CSV holds the map', async () => {
    const s: DiagramSettings = { zJMax: 0.2, muMin: 0, muMax: 2, columns: 20, rows: 30, temperature: 0, nmax: 6, shade: 'density' };
    const result = phaseMap({ ...s, boundaryPoints: 200 });
    const lobes = lobesOf(result);
    expect(lobes.map((b) => b.filling)).toEqual([1, 2]);
    const out = join(dir, 'map');
    await writeOutputFolder(checkOutputTarget(out, { option: '--out' }), { command: 'diagram', scenarioHash: null }, (folder) => writeDiagramFiles(result, s, 0.1, folder));
    const tips = rowsOf(readFileSync(join(out, 'lobe_tips.csv'), 'utf8'));
    for (const [n, , zJ] of tips) expect(Math.abs(zJ - (2 * n + 1 - 2 * Math.sqrt(n * (n + 1))))).toBeLessThan(1e-3);
    const grid = rowsOf(readFileSync(join(out, 'phase_map_grid.csv'), 'utf8'));
    expect(grid.length).toBe(20 * 30);
    // Row c * rows + r holds zJ[c], mu[r], phi, density.
    expect(grid[3 * 30 + 7]).toEqual([result.zJ[3], result.mu[7], result.orderParameter[3 * 30 + 7], result.density[3 * 30 + 7]]);
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain(diagramTitle(s));
    expect(diagramTitle({ ...s, temperature: 0.1 })).toBe('Mean-field phase map at k_B T = 0.1 U');
  });

  it('lobe_boundaries.csv: one row per boundary point, lobe after lobe, on the analytic T = 0 boundary', async () => {
    // Outside reference: the single-site mean-field Mott boundary at T = 0 (van Oosten, van der
    // Straten & Stoof, PRA 63, 053601 (2001)), with x = mu/U in (n - 1, n):
    //   zJ/U = (n - x)(x - n + 1) / (x + 1).
    const s: DiagramSettings = { zJMax: 0.2, muMin: 0, muMax: 2, columns: 8, rows: 8, temperature: 0, nmax: 6, shade: 'density' };
    const result = phaseMap({ ...s, boundaryPoints: 50 });
    const out = join(dir, 'edges');
    await writeOutputFolder(checkOutputTarget(out, { option: '--out' }), { command: 'diagram', scenarioHash: null }, (folder) => writeDiagramFiles(result, s, 0.1, folder));
    const rows = rowsOf(readFileSync(join(out, 'lobe_boundaries.csv'), 'utf8'));
    // hand count: the points of every lobe, in the order of the lobes
    expect(rows.length).toBe(result.boundaries.reduce((t, b) => t + b.mu.length, 0));
    expect(rows.map((r) => r[0])).toEqual(result.boundaries.flatMap((b) => Array.from(b.mu, () => b.filling)));
    let checked = 0;
    for (const [n, x, zJ] of rows) {
      if (n < 1 || !(x > n - 1 && x < n)) continue;
      expect(Math.abs(zJ - ((n - x) * (x - n + 1)) / (x + 1))).toBeLessThan(1e-6);
      checked++;
    }
    expect(checked).toBeGreaterThan(20);
  });
});

// The lines of `diagram` (src/report/diagramSummaryLines.ts): the tips of the fillings n >= 1
// (the empty lattice's edge has none), at the analytic single-site tips
// zJ/U = 2n + 1 - 2 sqrt(n(n + 1)) at mu/U = sqrt(n(n + 1)) - 1 (van Oosten, van der Straten
// & Stoof, PRA 63, 053601 (2001)) as printed, the cluster line only with cluster lobes.
import { describe, expect, it } from 'vitest';
import { diagramSummaryLines } from '../../src/report/diagramSummaryLines.js';
import { diagramMap } from '../../src/pipeline/diagramMap.js';

describe('diagramSummaryLines', () => {
  it('single-site tips at the analytic values, the folder last', () => {
    const { result } = diagramMap({ zJMax: 0.2, muMin: -0.2, muMax: 2.5, columns: 4, rows: 4, temperature: 0, nmax: 10, cluster: null });
    const lines = diagramSummaryLines(result, { columns: 4, rows: 4 }, null, 1.234, '/d');
    expect(lines).toHaveLength(2);
    // tip of lobe n at mu/U = sqrt(n(n + 1)) - 1
    const tip = (n: number) => `n=${n}: zJ/U=${(2 * n + 1 - 2 * Math.sqrt(n * (n + 1))).toFixed(5)} at mu/U=${(Math.sqrt(n * (n + 1)) - 1).toFixed(4)}`;
    expect(lines[0]).toBe(`phase map 4x4 in 1.23 s; lobe tips ${tip(1)}; ${tip(2)}; ${tip(3)}`);
    expect(lines[1]).toBe('results in /d');
  });

  it('a cluster line with the cluster tips', () => {
    const { result } = diagramMap({ zJMax: 0.2, muMin: 0, muMax: 1, columns: 2, rows: 2, temperature: 0, nmax: 8, cluster: null });
    const lobe = { filling: 1, tipZJ: 0.2, tipMu: 0.4, nmax: 3 } as never;
    const lines = diagramSummaryLines(result, { columns: 2, rows: 2 }, { shape: [2, 2], lobes: [lobe] }, 0, '/d');
    expect(lines[1]).toBe('cluster 2x2 lobe tips n=1: zJ/U=0.20000 at mu/U=0.4000');
    expect(lines).toHaveLength(3);
  });
});

// The work of `diagram` (src/pipeline/diagramMap.ts), against outside references:
// - the n = 1 lobe boundary of homogeneous single-site mean field, zJ_c/U = mu(1-mu)/(1+mu),
//   with its tip at mu/U = sqrt(2) - 1, zJ/U = 3 - 2 sqrt(2) (van Oosten, van der Straten &
//   Stoof, PRA 63, 053601 (2001));
// - cluster lobes: the callback reports every filling of the mu range, once each;
// - refusals name the option: a truncation below mu + 1, weight on |nmax> over the map, a
//   cluster at T > 0, a cluster whose Fock space does not fit.
import { describe, expect, it } from 'vitest';
import { checkDiagramCluster, checkDiagramTruncation, DIAGRAM_BOUNDARY_POINTS, diagramMap } from '../../src/pipeline/diagramMap.js';

const request = { zJMax: 0.2, muMin: 0, muMax: 1.5, columns: 8, rows: 8, temperature: 0, nmax: 6, cluster: null };

describe('diagramMap', () => {
  it('the n = 1 boundary is zJ/U = mu(1 - mu)/(1 + mu), its tip at mu = sqrt(2) - 1', () => {
    const { result, lobes } = diagramMap(request);
    expect(lobes).toBeNull();
    const one = result.boundaries.find((b) => b.filling === 1)!;
    expect(one.mu.length).toBe(DIAGRAM_BOUNDARY_POINTS);
    let checked = 0;
    for (let k = 0; k < one.mu.length; k++) {
      const mu = one.mu[k];
      if (!(mu > 0 && mu < 1)) continue;
      expect(Math.abs(one.zJ[k] - (mu * (1 - mu)) / (1 + mu))).toBeLessThan(1e-6);
      checked++;
    }
    expect(checked).toBeGreaterThan(100);
    expect(Math.abs(one.tipZJ - (3 - 2 * Math.SQRT2))).toBeLessThan(1e-8);
    expect(Math.abs(one.tipMu - (Math.SQRT2 - 1))).toBeLessThan(1e-4);
    expect(result.orderParameter.length).toBe(64);
  });

  it('cluster lobes for every filling of the mu range', () => {
    const seen: number[] = [];
    const { lobes } = diagramMap({ ...request, columns: 2, rows: 2, cluster: [2] }, (n) => seen.push(n));
    expect(seen).toEqual([1, 2]);
    expect(lobes!.map((l) => l.filling)).toEqual([1, 2]);
  });

  it('refusals name the option', () => {
    expect(() => checkDiagramTruncation(3, 2.5)).toThrow('--nmax: 3 is too small for mu/U up to 2.5; use at least 6');
    expect(() => checkDiagramTruncation(4, 2.5)).not.toThrow();
    // deep in the superfluid at nmax 4 the top state carries weight
    expect(() => diagramMap({ ...request, zJMax: 3, muMax: 2.5, nmax: 4 })).toThrow(/^--nmax: the weight on \|nmax> reaches .* raise --nmax$/);
    expect(() => checkDiagramCluster([2, 2], 0.1)).toThrow(/^--cluster: the cluster lobes are computed at T = 0/);
    expect(() => checkDiagramCluster([16, 16], 0)).toThrow(/^--cluster: a 16x16 cluster needs more than/);
    expect(() => checkDiagramCluster([2, 2], 0)).not.toThrow();
  });
});

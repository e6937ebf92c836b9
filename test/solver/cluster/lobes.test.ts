// Mott lobes of uniform cluster mean-field theory against outside references:
// - the 1x1 cluster is single-site mean field: zJ_c/U = (n - x)(x - n + 1)/(1 + x),
//   x = mu/U, tip (U/zJ)_c = 1/(3 - 2 sqrt 2) = 5.83 at n = 1 (van Oosten, van der
//   Straten & Stoof, PRA 63, 053601 (2001));
// - at T > 0 the 1x1 edge is zJ_c = 1/chi(T) with the closed-form single-site
//   susceptibility chi = sum_n p_n [(n+1)/(E_{n+1} - E_n) + n/(E_{n-1} - E_n)],
//   E_n = U n(n-1)/2 - mu n, p_n the Boltzmann weights (second-order perturbation theory
//   of each level; the finite-temperature mean-field boundary of Buonsante & Vezzani,
//   arXiv:cond-mat/0405254);
// - the n = 1 critical point of the square lattice lies between single-site mean field
//   (U/J)_c = 23.3 and quantum Monte Carlo 16.74 (Capogrosso-Sansone et al., PRA 77,
//   015602 (2008)) and moves toward the latter as the cluster grows (1x1, 2x1, 2x2); on
//   the cubic lattice 2x2x2 lies between 34.98 and the QMC 29.34 (Capogrosso-Sansone,
//   Prokof'ev & Svistunov, PRB 75, 134302 (2007));
// - the linear criterion agrees with the onset of phi in the self-consistent solution.
import { describe, expect, it } from 'vitest';
import { clusterCriticalHopping, clusterLobeBoundary, clusterLobeTip, createLobeWorkspace } from '../../../src/solver/cluster/clusterLobes.js';
import { solveHomogeneousCluster } from '../../../src/solver/cluster/homogeneousCluster.js';

const singleSite = (n: number, x: number): number => ((n - x) * (x - n + 1)) / (1 + x);

describe('single-site cluster', () => {
  it('boundary equals (n - x)(x - n + 1)/(1 + x) for n = 1, 2 (1e-9); tip U/zJ = 5.83', () => {
    for (const n of [1, 2]) {
      const b = clusterLobeBoundary([1, 1], 6, n, 9);
      for (let k = 0; k < 9; k++) {
        expect(Math.abs(b.zJ[k] - singleSite(n, b.mu[k]))).toBeLessThan(1e-9);
        expect(b.levelCrossing[k]).toBe(0);
      }
      expect(Math.abs(b.tipZJ - (2 * n + 1 - 2 * Math.sqrt(n * (n + 1))))).toBeLessThan(1e-9);
      expect(Math.abs(b.tipMu - (Math.sqrt(n * (n + 1)) - 1))).toBeLessThan(1e-4);
    }
    const tip = clusterLobeTip(createLobeWorkspace([1], 4, 1));
    expect(Math.abs(1 / tip.zJOverU - 5.83)).toBeLessThan(5e-3);
  });

  it('T > 0: the superfluid edge equals 1/chi(T) of the closed-form single-site susceptibility (1e-7)', () => {
    const nmax = 6;
    const ws = createLobeWorkspace([1, 1], nmax, 1);
    for (const [x, T] of [[0.4, 0.05], [0.7, 0.1], [1.3, 0.2]]) {
      const E = (n: number): number => 0.5 * n * (n - 1) - x * n;
      let z = 0;
      let chi = 0;
      for (let n = 0; n <= nmax; n++) {
        const p = Math.exp(-(E(n) - E(Math.round(Math.max(0, Math.ceil(x))))) / T);
        let c = 0;
        if (n < nmax) c += (n + 1) / (E(n + 1) - E(n));
        if (n > 0) c += n / (E(n - 1) - E(n));
        z += p;
        chi += p * c;
      }
      chi /= z;
      const r = clusterCriticalHopping(ws, x, T);
      expect(r.converged).toBe(true);
      expect(Math.abs(r.zJOverU - 1 / chi)).toBeLessThan(1e-7);
    }
  });
});

describe('square and cubic lattice, n = 1', () => {
  it('(U/J)_c: 1x1 > 2x1 > 2x2, all between QMC 16.74 and single-site 23.3; insensitive to nmax 3 -> 4', () => {
    const values = [[1, 1], [2, 1], [2, 2]].map((shape) => clusterLobeTip(createLobeWorkspace(shape, 4, 1), 1e-5).uOverJ);
    expect(Math.abs(values[0] - 4 / (3 - 2 * Math.SQRT2))).toBeLessThan(1e-6); // 23.31
    expect(values[1]).toBeLessThan(values[0]);
    expect(values[2]).toBeLessThan(values[1]);
    for (const v of values) {
      expect(v).toBeGreaterThan(16.74);
      expect(v).toBeLessThan(23.32);
    }
    const nmax3 = clusterLobeTip(createLobeWorkspace([2, 2], 3, 1), 1e-5).uOverJ;
    expect(Math.abs(nmax3 - values[2]) / values[2]).toBeLessThan(1e-3);
  });

  it('cubic lattice: 2x2x2 lies between QMC 29.34 and single-site 34.98', () => {
    const tip = clusterLobeTip(createLobeWorkspace([2, 2, 2], 3, 1), 1e-3);
    expect(tip.converged).toBe(true);
    expect(tip.uOverJ).toBeGreaterThan(29.34);
    expect(tip.uOverJ).toBeLessThan(34.98);
  });
});

describe('linear criterion against the self-consistent solution', () => {
  it('2x2 at mu/U = 0.4: phi vanishes 3% below J_c and is finite 3% above', () => {
    const ws = createLobeWorkspace([2, 2], 3, 1);
    const jc = clusterCriticalHopping(ws, 0.4).hoppingOverU;
    const below = solveHomogeneousCluster({ shape: [2, 2], hopping: 0.97 * jc, interactionU: 1, mu: 0.4, temperature: 0, nmax: 3, tolerance: 1e-10 });
    const above = solveHomogeneousCluster({ shape: [2, 2], hopping: 1.03 * jc, interactionU: 1, mu: 0.4, temperature: 0, nmax: 3, tolerance: 1e-10 });
    expect(below.converged && above.converged).toBe(true);
    expect(below.meanPhi).toBeLessThan(1e-8);
    expect(Math.abs(below.meanDensity - 1)).toBeLessThan(1e-8);
    expect(above.meanPhi).toBeGreaterThan(0.05);
  });

  it('T -> 0 limit: the thermal criterion (full space, finite differences) equals the Mott-sector criterion (CG)', () => {
    const ws = createLobeWorkspace([2, 1], 4, 1);
    const zero = clusterCriticalHopping(ws, 0.45);
    const cold = clusterCriticalHopping(ws, 0.45, 1e-3);
    expect(Math.abs(cold.hoppingOverU - zero.hoppingOverU) / zero.hoppingOverU).toBeLessThan(1e-7);
  });
});

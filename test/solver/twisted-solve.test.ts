// The twisted-phase Gutzwiller solver (src/solver/twist):
// - without a twist it reproduces the existing real solver (src/solver/latticeSolve.ts),
//   phi, n and the grand potential, to 1e-10: a regression check of the complex sweep and of
//   the product-state expression of Omega against sum_i (Omega_i + psi_i phi_i);
// - a total twist of 2 pi around a periodic ring is a gauge transformation
//   phi_x -> e^{i 2 pi x / L} phi_x of the untwisted problem (Peierls substitution, common
//   practice), so Omega and |phi_i| are those of the untwisted solution;
// - Omega(q) is even in q (complex conjugation maps the q solution onto the -q one: time
//   reversal of a real Hamiltonian, common practice).
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel, type LatticeModel } from '../../src/lattice/latticeModel.js';
import { boxDisorder } from '../../src/lattice/boxDisorder.js';
import { createSolverState } from '../../src/solver/solverState.js';
import { createSweepExecutor } from '../../src/solver/sweepExecutor.js';
import { solveLattice } from '../../src/solver/latticeSolve.js';
import { solveTwisted } from '../../src/solver/twist/twistedSolve.js';
import { addHarmonicTrap, latticeCentre } from '../../src/lattice/harmonicTrap.js';

function disorderedModel(shape: number[], periodic: boolean[], J: number, W: number, seed: string): LatticeModel {
  const g = createLatticeGeometry(shape, periodic);
  const m = uniformModel(g, 1, J, 6);
  m.eps.set(boxDisorder(g.siteCount, W, seed));
  return m;
}

async function realSolve(model: LatticeModel, mu: number, temperature: number) {
  const phi0 = new Float64Array(model.geometry.siteCount).fill(0.5);
  const state = createSolverState(model, phi0, { thermal: temperature > 0 });
  const result = await solveLattice(model, state, createSweepExecutor(state, null, 1), {
    mode: { kind: 'mu', mu },
    temperature,
    tolerance: 1e-13,
    maxSweeps: 100_000,
    accelerate: false,
  });
  return { state, result };
}

describe('twisted solver without twist', () => {
  const cases: Array<{ name: string; model: () => LatticeModel; mu: number; T: number }> = [
    { name: '2D periodic, disordered, T = 0', model: () => disorderedModel([8, 6], [true, true], 0.04, 0.6, 'tw-a'), mu: 0.45, T: 0 },
    { name: '3D mixed boundaries, disordered, T = 0', model: () => disorderedModel([4, 4, 6], [true, false, true], 0.03, 0.4, 'tw-b'), mu: 1.3, T: 0 },
    { name: '2D periodic, disordered, T > 0', model: () => disorderedModel([6, 6], [true, true], 0.05, 0.5, 'tw-c'), mu: 0.6, T: 0.08 },
    {
      name: '2D open, trapped, T = 0',
      model: () => {
        const g = createLatticeGeometry([10, 10], [false, false]);
        const m = uniformModel(g, 1, 0.05, 6);
        addHarmonicTrap(g, { coefficient: [0.02, 0.02], centre: latticeCentre(g) }, m.eps);
        return m;
      },
      mu: 0.8,
      T: 0,
    },
  ];
  for (const c of cases) {
    it(`agrees with the real solver to 1e-10: ${c.name}`, async () => {
      const model = c.model();
      const { state, result } = await realSolve(model, c.mu, c.T);
      expect(result.converged).toBe(true);
      const tw = solveTwisted(model, {
        mu: c.mu,
        temperature: c.T,
        twistPerBond: model.geometry.shape.map(() => 0),
        tolerance: 1e-13,
        maxSweeps: 100_000,
        initialRe: new Float64Array(model.geometry.siteCount).fill(0.5),
      });
      expect(tw.converged).toBe(true);
      let maxPhi = 0;
      let maxN = 0;
      for (let i = 0; i < model.geometry.siteCount; i++) {
        maxPhi = Math.max(maxPhi, Math.abs(tw.phiRe[i] - state.fields.phi[i]), Math.abs(tw.phiIm[i]));
        maxN = Math.max(maxN, Math.abs(tw.density[i] - state.measure.density[i]));
      }
      expect(maxPhi).toBeLessThan(1e-10);
      expect(maxN).toBeLessThan(1e-10);
      expect(Math.abs(tw.grandPotential - result.totals.grandPotential)).toBeLessThan(1e-10 * Math.max(1, Math.abs(result.totals.grandPotential)));
      expect(Math.abs(tw.atoms - result.totals.atoms)).toBeLessThan(1e-9);
    });
  }
});

describe('twist symmetries', () => {
  it('a total twist of 2 pi around a ring returns the untwisted Omega and |phi|', () => {
    const model = disorderedModel([12, 6], [true, true], 0.05, 0.5, 'tw-ring');
    const N = model.geometry.siteCount;
    const base = solveTwisted(model, { mu: 0.5, temperature: 0, twistPerBond: [0, 0], tolerance: 1e-13, maxSweeps: 100_000, initialRe: new Float64Array(N).fill(0.5) });
    const L = 12;
    const q = (2 * Math.PI) / L;
    // start from the gauge-transformed untwisted field with a perturbation, so the sweeps have to relax
    const re = new Float64Array(N);
    const im = new Float64Array(N);
    for (let i = 0; i < N; i++) {
      const x = Math.floor(i / 6);
      const a = (1 + 0.2 * Math.sin(i)) * Math.hypot(base.phiRe[i], base.phiIm[i]);
      re[i] = a * Math.cos(q * x);
      im[i] = a * Math.sin(q * x);
    }
    const twisted = solveTwisted(model, { mu: 0.5, temperature: 0, twistPerBond: [q, 0], tolerance: 1e-13, maxSweeps: 100_000, initialRe: re, initialIm: im });
    expect(twisted.converged).toBe(true);
    expect(Math.abs(twisted.grandPotential - base.grandPotential)).toBeLessThan(1e-10 * Math.abs(base.grandPotential));
    for (let i = 0; i < N; i++) {
      expect(Math.abs(Math.hypot(twisted.phiRe[i], twisted.phiIm[i]) - Math.hypot(base.phiRe[i], base.phiIm[i]))).toBeLessThan(1e-10);
    }
  });

  it('Omega(q) is even in q and quadratic at small q', () => {
    const model = disorderedModel([8, 8], [true, true], 0.05, 0.4, 'tw-even');
    const N = model.geometry.siteCount;
    const start = new Float64Array(N).fill(0.5);
    const omega = (q: number) =>
      solveTwisted(model, { mu: 0.55, temperature: 0, twistPerBond: [q, 0], tolerance: 1e-13, maxSweeps: 100_000, initialRe: start }).grandPotential;
    const o0 = omega(0);
    const rows = [0.02, 0.04, 0.08].map((q) => ({ q, plus: omega(q) - o0, minus: omega(-q) - o0 }));
    for (const r of rows) {
      expect(r.plus).toBeGreaterThan(0);
      expect(Math.abs(r.plus - r.minus)).toBeLessThan(1e-9 * r.plus + 1e-12);
    }
    // quadratic: (Omega(q) - Omega(0)) / q^2 nearly constant, deviations O(q^2)
    const c = rows.map((r) => r.plus / (r.q * r.q));
    expect(Math.abs(c[1] / c[0] - 1)).toBeLessThan(0.01);
    expect(Math.abs(c[2] / c[0] - 1)).toBeLessThan(0.04);
    // and the O(q^2) deviation scales as q^2: (c2 - c0) / (c1 - c0) ~ (0.08^2 - 0.02^2)/(0.04^2 - 0.02^2) = 5
    expect((c[2] - c[0]) / (c[1] - c[0])).toBeGreaterThan(4.5);
    expect((c[2] - c[0]) / (c[1] - c[0])).toBeLessThan(5.5);
  });
});

// Finite temperature: the atomic limit in closed form, the infinite-temperature entropy,
// the superfluid-to-normal transition against an independent linearised condition, and
// the fixed-entropy round trip.
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel } from '../../src/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../../src/lattice/harmonicTrap.js';
import { createSolverState } from '../../src/solver/solverState.js';
import { createSweepExecutor } from '../../src/solver/sweepExecutor.js';
import { solveLattice, initialOrderParameter } from '../../src/solver/latticeSolve.js';
import { runLattice } from '../../src/solver/runLattice.js';
import { solveHomogeneousAtDensity } from '../../src/solver/homogeneous.js';

describe('atomic limit J = 0 at T > 0', () => {
  it('density, entropy and number variance equal the grand-canonical single-site sums at every site', async () => {
    // Z_i = sum_n exp(-(U n(n-1)/2 - (mu - eps_i) n)/kT): standard grand-canonical statistics.
    const geometry = createLatticeGeometry([21, 21], [false, false]);
    const nmax = 9;
    const model = uniformModel(geometry, 1, 0, nmax);
    addHarmonicTrap(geometry, { coefficient: [0.01, 0.01], centre: latticeCentre(geometry) }, model.eps);
    const mu = 2.2;
    const kT = 0.25;
    const state = createSolverState(model, initialOrderParameter(model, mu), { thermal: true });
    const r = await solveLattice(model, state, createSweepExecutor(state, null, 1), {
      mode: { kind: 'mu', mu }, temperature: kT, tolerance: 1e-12, maxSweeps: 100, accelerate: true,
    });
    expect(r.converged).toBe(true);
    for (let i = 0; i < geometry.siteCount; i++) {
      let Z = 0, n1 = 0, n2 = 0, e = 0;
      for (let n = 0; n <= nmax; n++) {
        const en = 0.5 * n * (n - 1) - (mu - model.eps[i]) * n;
        const w = Math.exp(-en / kT);
        Z += w; n1 += n * w; n2 += n * n * w; e += en * w;
      }
      n1 /= Z; n2 /= Z; e /= Z;
      expect(Math.abs(state.measure.density[i] - n1)).toBeLessThan(1e-12);
      expect(Math.abs(state.measure.densitySq[i] - n1 * n1 - (n2 - n1 * n1))).toBeLessThan(1e-11);
      expect(Math.abs(state.measure.entropy[i] - (Math.log(Z) + e / kT))).toBeLessThan(1e-11);
      expect(state.fields.phi[i]).toBe(0);
    }
  });

  it('high temperature: entropy per site tends to ln(nmax + 1) and the order parameter vanishes', async () => {
    // All nmax + 1 Fock states equally likely when kT >> U nmax^2 (Boltzmann counting).
    const geometry = createLatticeGeometry([8, 8], [true, true]);
    const model = uniformModel(geometry, 1, 0.05, 6);
    const state = createSolverState(model, new Float64Array(64).fill(0.5));
    const r = await solveLattice(model, state, createSweepExecutor(state, null, 1), {
      mode: { kind: 'mu', mu: 3 }, temperature: 1e5, tolerance: 1e-12, maxSweeps: 1000, accelerate: true,
    });
    expect(r.converged).toBe(true);
    for (let i = 0; i < 64; i++) {
      expect(Math.abs(state.measure.entropy[i] - Math.log(7))).toBeLessThan(1e-3);
      expect(state.fields.phi[i]).toBeLessThan(1e-10);
    }
  });
});

describe('thermal sweeps with a stored spectrum', () => {
  it('give the same field as the full QL path at every sweep (to 1e-10)', async () => {
    // Same self-consistency, two site solvers: the warm path (Hellmann-Feynman prediction +
    // Laguerre refinement of each eigenvalue) against implicit QL from scratch.
    const geometry = createLatticeGeometry([24, 24], [false, false]);
    const model = uniformModel(geometry, 1, 0.03, 6);
    addHarmonicTrap(geometry, { coefficient: [0.006, 0.006], centre: latticeCentre(geometry) }, model.eps);
    for (const kT of [0.02, 0.1, 0.4]) {
      const warm = createSolverState(model, initialOrderParameter(model, 1.8), { thermal: true });
      const cold = createSolverState(model, initialOrderParameter(model, 1.8));
      const ew = createSweepExecutor(warm, null, 1);
      const ec = createSweepExecutor(cold, null, 1);
      for (let sweep = 0; sweep < 25; sweep++) {
        for (const colour of [0, 1]) {
          await ew.sweep(colour, 1.8, kT);
          await ec.sweep(colour, 1.8, kT);
        }
        let worst = 0;
        for (let i = 0; i < geometry.siteCount; i++) worst = Math.max(worst, Math.abs(warm.fields.phi[i] - cold.fields.phi[i]));
        // Both site solvers agree to ~1e-14 per update; the iteration carries such rounding
        // differences along, so the fields are compared at 1e-10.
        expect(worst).toBeLessThan(1e-10);
      }
    }
  });
});

describe('superfluid to normal transition', () => {
  // Independent condition: in the normal state (phi = 0) each site is thermal in the Fock
  // basis, p_n ~ exp(-E_n/kT), E_n = U n(n-1)/2 - mu n. Second-order perturbation theory in
  // psi (V = -psi (b + b^+)) gives the static response of <b>:
  //   chi(T, mu) = sum_n p_n [ (n+1)/(E_{n+1} - E_n) + n/(E_{n-1} - E_n) ],
  // and the normal state is unstable when zJ chi >= 1 (mean-field criterion, as used for the
  // finite-temperature phase diagram by Gerbier, PRL 99, 120405 (2007)). At fixed density
  // n = 1, mu(T) follows from the thermal atomic-limit density.
  const nmax = 8;
  const weights = (mu: number, kT: number): number[] => {
    const w: number[] = [];
    let z = 0;
    for (let n = 0; n <= nmax; n++) {
      const x = Math.exp(-(0.5 * n * (n - 1) - mu * n) / kT);
      w.push(x);
      z += x;
    }
    return w.map((x) => x / z);
  };
  const atomicDensity = (mu: number, kT: number): number => weights(mu, kT).reduce((s, p, n) => s + p * n, 0);
  const chi = (mu: number, kT: number): number => {
    const p = weights(mu, kT);
    const E = (n: number): number => 0.5 * n * (n - 1) - mu * n;
    let c = 0;
    for (let n = 0; n <= nmax; n++) {
      if (n < nmax) c += (p[n] * (n + 1)) / (E(n + 1) - E(n));
      if (n > 0) c += (p[n] * n) / (E(n - 1) - E(n));
    }
    return c;
  };
  const bisect = (f: (x: number) => number, lo: number, hi: number): number => {
    let flo = f(lo);
    for (let k = 0; k < 200; k++) {
      const mid = 0.5 * (lo + hi);
      const fm = f(mid);
      if (fm > 0 === flo > 0) { lo = mid; flo = fm; } else hi = mid;
    }
    return 0.5 * (lo + hi);
  };

  it('T_c at J = 0.1 U, n = 1 (z = 6) matches the bisection on the linearised condition', () => {
    const zJ = 0.6;
    const muAt = (kT: number): number => bisect((mu) => atomicDensity(mu, kT) - 1, -5, 5);
    const tcReference = bisect((kT) => zJ * chi(muAt(kT), kT) - 1, 0.05, 5);
    // tiercake: the order parameter at fixed density vanishes above T_c.
    const phiAt = (kT: number): number =>
      solveHomogeneousAtDensity({ zJ, interactionU: 1, temperature: kT, nmax, density: 1 }).phi;
    let lo = 0.5 * tcReference;
    let hi = 1.5 * tcReference;
    expect(phiAt(lo)).toBeGreaterThan(0);
    expect(phiAt(hi)).toBe(0);
    for (let k = 0; k < 40; k++) {
      const mid = 0.5 * (lo + hi);
      if (phiAt(mid) > 0) lo = mid;
      else hi = mid;
    }
    expect(Math.abs(0.5 * (lo + hi) - tcReference) / tcReference).toBeLessThan(1e-5);
    // and T_c grows with J (weak coupling side)
    const tcSmaller = bisect((kT) => 0.4 * chi(muAt(kT), kT) - 1, 0.01, 5);
    expect(tcSmaller).toBeLessThan(tcReference);
  });
});

describe('fixed entropy per atom', () => {
  it('round trip: solve at T, read S/N, solve at that S/N, recover T to 1e-6', async () => {
    const geometry = createLatticeGeometry([24, 24], [false, false]);
    const model = uniformModel(geometry, 1, 0.02, 6);
    addHarmonicTrap(geometry, { coefficient: [0.008, 0.008], centre: latticeCentre(geometry) }, model.eps);
    const common = {
      model,
      chemical: { kind: 'atoms' as const, atoms: 500, relativeTolerance: 1e-10 },
      tolerance: 1e-11,
      maxSweeps: 100000,
      accelerate: true,
      truncation: { automatic: false, topWeightMax: 1e-3, nmaxLimit: 6 },
      compressibility: false,
    };
    const kT = 0.12;
    const forward = await runLattice({ ...common, thermal: { kind: 'temperature', kT } }, (s) => createSweepExecutor(s, null, 1));
    const sPerAtom = forward.solve.totals.entropy / forward.solve.totals.atoms;
    expect(sPerAtom).toBeGreaterThan(0.05);
    const back = await runLattice(
      { ...common, thermal: { kind: 'entropy', entropyPerAtom: sPerAtom, relativeTolerance: 1e-11 } },
      (s) => createSweepExecutor(s, null, 1),
    );
    expect(back.converged).toBe(true);
    expect(Math.abs(back.temperature - kT) / kT).toBeLessThan(1e-6);
  });
});

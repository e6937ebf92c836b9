// Invariants of the time-dependent Gutzwiller equations under a static Hamiltonian (they are
// Hamiltonian equations with H_i Hermitian: Jaksch et al., PRL 89, 040402 (2002)): the
// mean-field energy, the atom number and every site's norm are constants of motion; the
// static ground state is a stationary point (phi_i constant), and its energy is the one the
// static solver reports. Tolerances: 1e-8 relative on energy and atoms (the brief); norms
// 1e-9 for the adaptive integrator at tolerance 1e-11 (its error accumulates over ~1e4 steps).
// The splitting is unitary site by site (norms to 1e-12) and conserves the grand energy
// E - mu N of its gauge exactly (to 1e-11; see redBlackSplitting.ts), while E and N
// separately carry its truncation error (order 4 at step 0.05: below 1e-8).
import { describe, expect, it } from 'vitest';
import { trappedModel } from './fixtures.js';
import { staticGroundState } from '../../src/dynamics/staticGround.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { createDrive } from '../../src/dynamics/drive.js';
import { rampSchedule } from '../../src/dynamics/rampSchedule.js';
import { evolve, type IntegratorOptions } from '../../src/dynamics/evolve.js';
import { copyState, maxNormError } from '../../src/dynamics/gutzwillerState.js';
import { createObservableWorkspace, evolutionTotals } from '../../src/dynamics/dynamicObservables.js';
import { hamiltonianActionRange, meanFieldRange, orderParameterRange } from '../../src/dynamics/equationsOfMotion.js';
import { createExponentialWorkspace, propagateColourRange } from '../../src/dynamics/siteExponential.js';
import { errorNormRange } from '../../src/dynamics/rungeKuttaKernels.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

describe('constants of motion', async () => {
  const model = trappedModel([10, 10], 0.06, 0.04, 7);
  const ground = await staticGroundState({ model, chemical: { kind: 'mu', mu: 1.5 } });

  it('the initial energy equals the static solver energy (1e-10 relative)', () => {
    const frame = frameFromModel(model, { mu: ground.mu });
    const totals = evolutionTotals(ground.state, frame, createObservableWorkspace(frame.siteCount));
    expect(Math.abs(totals.energy - ground.energy) / Math.abs(ground.energy)).toBeLessThan(1e-10);
    expect(Math.abs(totals.atoms - ground.atoms) / ground.atoms).toBeLessThan(1e-12);
  });

  it('the ground state is stationary: phi_i constant to 1e-8 over t = 20/U', async () => {
    const frame = frameFromModel(model, { mu: ground.mu });
    const state = copyState(ground.state);
    const n = frame.siteCount;
    const re = new Float64Array(n);
    const im = new Float64Array(n);
    let worst = 0;
    await evolve({
      state,
      frame,
      outputTimes: [5, 10, 20],
      integrator: { kind: 'dormand-prince', absoluteTolerance: 1e-11, relativeTolerance: 1e-11 },
      onOutput: () => {
        orderParameterRange(state.amplitudes, state.states, frame.sqrtN, re, im, 0, n);
        for (let i = 0; i < n; i++) worst = Math.max(worst, Math.hypot(re[i] - ground.phi[i], im[i]));
      },
    });
    expect(worst).toBeLessThan(1e-8);
  });

  interface Case {
    name: string;
    integrator: IntegratorOptions;
    /** relative, on E and on N separately */
    energy: number;
    /** relative, on E - mu N */
    grand: number;
    norm: number;
  }
  const cases: Case[] = [
    { name: 'dormand-prince', integrator: { kind: 'dormand-prince', absoluteTolerance: 1e-11, relativeTolerance: 1e-11 }, energy: 1e-8, grand: 1e-8, norm: 1e-9 },
    { name: 'splitting order 4', integrator: { kind: 'splitting', step: 0.05, order: 4 }, energy: 1e-8, grand: 1e-11, norm: 1e-12 },
    { name: 'splitting order 2', integrator: { kind: 'splitting', step: 0.05 }, energy: 1e-3, grand: 1e-11, norm: 1e-12 },
  ];
  for (const { name, integrator, energy: tolerance, grand, norm: normTolerance } of cases) {
    it(`${name}: after a hopping quench 0.06 -> 0.1, E and N conserved to ${tolerance}, E - mu N to ${grand}, norms to ${normTolerance}`, async () => {
      const frame = frameFromModel(model, { mu: ground.mu });
      const drive = createDrive(frame, { hoppingFactor: rampSchedule({ path: 'hopping', points: [[0, 0.1 / 0.06]] }) });
      const state = copyState(ground.state);
      const ws = createObservableWorkspace(frame.siteCount);
      const energies: number[] = [];
      const atoms: number[] = [];
      let norm = 0;
      const result = await evolve({
        state,
        frame,
        drive,
        outputTimes: [0, 2, 5, 10, 20],
        integrator,
        onOutput: () => {
          const t = evolutionTotals(state, frame, ws);
          energies.push(t.energy);
          atoms.push(t.atoms);
          norm = Math.max(norm, maxNormError(state));
        },
      });
      expect(result.status).toBe('done');
      const grandEnergy = energies.map((e, k) => e - ground.mu * atoms[k]);
      for (const e of energies) expect(Math.abs(e - energies[0]) / Math.abs(energies[0])).toBeLessThan(tolerance);
      for (const a of atoms) expect(Math.abs(a - atoms[0]) / atoms[0]).toBeLessThan(tolerance);
      for (const g of grandEnergy) expect(Math.abs(g - grandEnergy[0]) / Math.abs(grandEnergy[0])).toBeLessThan(grand);
      expect(norm).toBeLessThan(normTolerance);
      // the quench does something: the energy differs from that of the ground state at J = 0.06
      expect(Math.abs(energies[0] - ground.energy)).toBeGreaterThan(1e-3 * Math.abs(ground.energy));
    });
  }
});

describe('any split of the sites gives bit-identical results', () => {
  it('derivative, colour propagation and error norm over ranges [0, a), [a, b), [b, n)', () => {
    const model = trappedModel([7, 9], 0.07, 0.05, 5);
    const frame = frameFromModel(model, { mu: 1.2 });
    const n = frame.siteCount;
    const S = frame.states;
    const rng = seededRandom('split-check');
    const y = Float64Array.from({ length: 2 * n * S }, () => rng.uniform() - 0.5);
    const whole = new Float64Array(y.length);
    const parts = new Float64Array(y.length);
    const phiRe = new Float64Array(n);
    const phiIm = new Float64Array(n);
    const psiRe = new Float64Array(n);
    const psiIm = new Float64Array(n);
    orderParameterRange(y, S, frame.sqrtN, phiRe, phiIm, 0, n);
    meanFieldRange(frame, phiRe, phiIm, psiRe, psiIm, -1, 0, n);
    hamiltonianActionRange(frame, y, psiRe, psiIm, whole, 0, n);
    const cuts = [0, 13, 40, n];
    const phiRe2 = new Float64Array(n);
    const phiIm2 = new Float64Array(n);
    const psiRe2 = new Float64Array(n);
    const psiIm2 = new Float64Array(n);
    for (let k = 0; k < 3; k++) orderParameterRange(y, S, frame.sqrtN, phiRe2, phiIm2, cuts[k], cuts[k + 1]);
    for (let k = 2; k >= 0; k--) {
      meanFieldRange(frame, phiRe2, phiIm2, psiRe2, psiIm2, -1, cuts[k], cuts[k + 1]);
      hamiltonianActionRange(frame, y, psiRe2, psiIm2, parts, cuts[k], cuts[k + 1]);
    }
    expect(Array.from(parts)).toEqual(Array.from(whole));
    expect(whole.some((v) => v !== 0)).toBe(true);

    const a = Float64Array.from(y);
    const b = Float64Array.from(y);
    const work = createExponentialWorkspace(frame.nmax);
    propagateColourRange(frame, a, psiRe, psiIm, 1, 0.3, work, 0, n);
    for (let k = 0; k < 3; k++) propagateColourRange(frame, b, psiRe, psiIm, 1, 0.3, work, cuts[k], cuts[k + 1]);
    expect(Array.from(b)).toEqual(Array.from(a));
    expect(a.some((v, m) => v !== y[m])).toBe(true);

    const weights = Float64Array.of(0.3, -0.7);
    const full = errorNormRange(y, a, 0.1, weights, [whole, y], 2, 1e-8, 1e-8, 0, y.length);
    let split = 0;
    for (const [s, e] of [[0, 101], [101, 333], [333, y.length]]) split = Math.max(split, errorNormRange(y, a, 0.1, weights, [whole, y], 2, 1e-8, 1e-8, s, e));
    expect(split).toBe(full);
  });
});

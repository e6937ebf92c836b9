// Is the ramp slow enough? A trapped 2D cloud is ramped from the superfluid (zJ/U = 0.32) to
// the Mott side (zJ/U = 0.08, below the mean-field tip 0.172: Sheshadri et al., EPL 22, 257
// (1993)) with a linear hopping ramp of duration tau, then compared with the ground state at
// the final hopping and the same atom number (adiabaticity.ts). By the adiabatic theorem the
// excess energy must vanish as tau grows and a sudden change must leave a large one; in mean
// field the gap closes at the transition, so the approach is algebraic, not exponential.
// Asserted: excess energy per atom, site infidelity and n = 1 shell defects decrease with
// tau, the slowest ramp is within 1% of U per atom and called adiabatic, the fastest is not.
// Measured (14x14, 159 atoms, fourth-order splitting at 0.1/U): excess energy per atom
// 0.052 U (tau = 1/U), 0.0133 U (10/U), 7.2e-4 U (100/U); mean site infidelity 0.20, 0.085,
// 0.017.
import { describe, expect, it } from 'vitest';
import { trappedModel } from './fixtures.js';
import { staticGroundState } from '../../src/dynamics/staticGround.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { createDrive } from '../../src/dynamics/drive.js';
import { rampSchedule } from '../../src/dynamics/rampSchedule.js';
import { evolve } from '../../src/dynamics/evolve.js';
import { copyState } from '../../src/dynamics/gutzwillerState.js';
import { siteSnapshot } from '../../src/dynamics/dynamicObservables.js';
import { adiabaticityVerdict, type AdiabaticityVerdict } from '../../src/dynamics/adiabaticity.js';

describe('hopping ramp from superfluid to Mott insulator in a trap', async () => {
  const shape = [14, 14];
  const Jstart = 0.08;
  const Jend = 0.02;
  const initialModel = trappedModel(shape, Jstart, 0.04, 7);
  const finalModel = trappedModel(shape, Jend, 0.04, 7);
  const initial = await staticGroundState({ model: initialModel, chemical: { kind: 'mu', mu: 1.4 } });
  const final = await staticGroundState({ model: finalModel, chemical: { kind: 'atoms', atoms: initial.atoms } });
  const finalFrame = frameFromModel(finalModel, { mu: final.mu });
  const snap = siteSnapshot(final.state, finalFrame);
  const shells = new Int32Array(snap.density.length);
  for (let i = 0; i < shells.length; i++) {
    const k = Math.round(snap.density[i]);
    if (k >= 1 && Math.abs(snap.density[i] - k) < 0.05 && snap.condensateDensity[i] < 0.02 * snap.density[i]) shells[i] = k;
  }

  const verdicts = new Map<number, AdiabaticityVerdict>();
  const durations = [1, 10, 100];
  for (const tau of durations) {
    it(`ramp over tau = ${tau}/U`, async () => {
      const frame = frameFromModel(initialModel, { mu: initial.mu });
      const drive = createDrive(frame, { hoppingFactor: rampSchedule({ path: 'hopping', points: [[0, 1], [tau, Jend / Jstart]] }) });
      const state = copyState(initial.state);
      const result = await evolve({ state, frame, drive, outputTimes: [tau], integrator: { kind: 'splitting', step: 0.1, order: 4 } });
      expect(result.status).toBe('done');
      // the frame at the end is the final Hamiltonian
      expect(frame.hopScale[2] * frame.hopUniform[2]).toBeCloseTo(Jend, 14);
      const verdict = adiabaticityVerdict({ final: state, frame, ground: final.state, shellFilling: shells, energyScale: 1 });
      expect(verdict.warnings).toEqual([]);
      verdicts.set(tau, verdict);
    });
  }

  it('the excess energy falls with tau; slow is adiabatic, fast is not', () => {
    expect(final.converged && initial.converged).toBe(true);
    expect(shells.some((k) => k === 1)).toBe(true);
    const excess = durations.map((t) => verdicts.get(t)!.excessEnergyPerAtom);
    const infidelity = durations.map((t) => verdicts.get(t)!.meanInfidelity);
    const shellOne = durations.map((t) => verdicts.get(t)!.shells.find((x) => x.filling === 1)!.excessDefectsPerSite);
    for (let k = 1; k < excess.length; k++) {
      expect(excess[k]).toBeLessThan(excess[k - 1]);
      expect(infidelity[k]).toBeLessThan(infidelity[k - 1]);
      expect(shellOne[k]).toBeLessThan(shellOne[k - 1]);
    }
    expect(excess[excess.length - 1]).toBeGreaterThanOrEqual(-1e-9);
    expect(verdicts.get(100)!.adiabatic).toBe(true);
    expect(verdicts.get(1)!.adiabatic).toBe(false);
    expect(excess[0]).toBeGreaterThan(10 * excess[excess.length - 1]);
  });
});

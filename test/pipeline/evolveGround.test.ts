// The static states of `evolve` (src/pipeline/evolveGround.ts), against outside references:
// - a uniform periodic lattice: the ground state is the homogeneous mean-field solution at
//   every site (src/solver/homogeneous.ts, checked against the analytic lobe of van Oosten,
//   van der Straten & Stoof, PRA 63, 053601 (2001)), solved to 1e-11 and self-consistent
//   (the amplitudes reproduce phi), at fixed mu and at the atom number of that solution;
// - J = 0 (Schrodinger equation of one site, analytic): every site is the Fock state
//   n = ceil(mu/U) (here mu = 1.5 U: n = 2), |c_2| = 1, phi = 0;
// - modelOfFrame: J and U of the frame are the base values times the frame's factors (the
//   definition of the frame's scale factors, dynamicsFrame.ts), eps is copied.
import { describe, expect, it } from 'vitest';
import { validateScenario } from '../../src/scenario/loadScenario.js';
import { resolveScenario } from '../../src/scenario/resolveScenario.js';
import type { ScenarioInput } from '../../src/scenario/scenarioSchema.js';
import { GROUND_TOLERANCE, groundState, modelOfFrame } from '../../src/pipeline/evolveGround.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { solveHomogeneous } from '../../src/solver/homogeneous.js';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel } from '../../src/lattice/latticeModel.js';

const resolved = (input: Partial<ScenarioInput>) =>
  resolveScenario(validateScenario({ name: 'ground', energyUnit: 'U', truncation: { nmax: 7 }, solver: { tolerance: 1e-8 }, ...input } as ScenarioInput, 'test scenario'));

describe('groundState', () => {
  const r = resolved({ lattice: { shape: [4, 4], boundary: 'periodic' }, hubbard: { hopping: 0.05 }, particles: { chemicalPotential: 0.5 } });
  const exact = solveHomogeneous({ zJ: 4 * 0.05, interactionU: 1, mu: 0.5, temperature: 0, nmax: 7 });

  it('uniform periodic lattice at fixed mu: the homogeneous solution at every site, solved tighter than the scenario asks', async () => {
    expect(exact.phi).toBeGreaterThan(0.1);
    const g = await groundState({ resolved: r, model: r.model, chemical: { kind: 'mu', mu: 0.5 }, automaticTruncation: true, pool: null, threads: 1 });
    expect(g.outcome.converged).toBe(true);
    for (let i = 0; i < 16; i++) {
      expect(Math.abs(g.fields.orderParameter[i] - exact.phi)).toBeLessThan(1e-9);
      expect(Math.abs(g.fields.density[i] - exact.density)).toBeLessThan(1e-9);
    }
    // the start must be stationary: its amplitudes give back its phi
    expect(g.amplitudes.maxOrderResidual).toBeLessThan(1e-9);
    expect(GROUND_TOLERANCE).toBe(1e-11);
  });

  it('at the atom number of that solution it finds the same mu', async () => {
    const g = await groundState({ resolved: r, model: r.model, chemical: { kind: 'atoms', atoms: 16 * exact.density, relativeTolerance: 1e-10 }, automaticTruncation: false, pool: null, threads: 1 });
    expect(Math.abs(g.outcome.solve.mu - 0.5)).toBeLessThan(1e-6);
    expect(g.outcome.model.nmax).toBe(7);
  });

  it('J = 0 at mu = 1.5 U: every site is the Fock state |2>', async () => {
    // the scenario schema wants J > 0: the model handed in has J = 0 (as a quench to J = 0 builds it)
    const zero = resolved({ lattice: { shape: [3], boundary: 'open' }, hubbard: { hopping: 0.05 }, particles: { chemicalPotential: 1.5 } });
    const g = await groundState({ resolved: zero, model: { ...zero.model, hopping: [0] }, chemical: { kind: 'mu', mu: 1.5 }, automaticTruncation: false, pool: null, threads: 1 });
    const y = g.amplitudes.state.amplitudes;
    const S = g.amplitudes.state.states;
    for (let i = 0; i < 3; i++) {
      expect(g.fields.density[i]).toBeCloseTo(2, 12);
      expect(g.fields.orderParameter[i]).toBeCloseTo(0, 12);
      expect(Math.hypot(y[2 * (i * S + 2)], y[2 * (i * S + 2) + 1])).toBeCloseTo(1, 12);
    }
  });
});

describe('modelOfFrame', () => {
  it('scales J per axis and U by the frame factors, copies eps', () => {
    const base = uniformModel(createLatticeGeometry([3, 2], [false, false]), 2, 0.1, 4);
    const bonds = Float64Array.of(0.1, 0.2, 0.3, 0.4, 0.5, 0.6);
    base.hopping = [bonds, 0.1];
    const frame = frameFromModel(base, { mu: 0 });
    // 2D: physical axis d is internal axis 1 + d
    frame.hopScale[1] = 0.5;
    frame.hopScale[2] = 3;
    frame.interactionScale = 1.5;
    frame.eps[4] = 7;
    const m = modelOfFrame(frame, base);
    expect(Array.from(m.hopping[0] as Float64Array)).toEqual(Array.from(bonds, (j) => 0.5 * j));
    expect(m.hopping[1]).toBeCloseTo(0.3, 15);
    expect(m.interactionU).toBe(3);
    expect(m.eps[4]).toBe(7);
    frame.eps[4] = 0;
    expect(m.eps[4]).toBe(7);
    expect(m.nmax).toBe(4);
    expect(m.geometry).toBe(base.geometry);
  });
});

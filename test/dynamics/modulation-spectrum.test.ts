// Modulation spectroscopy of a uniform superfluid in linear response. A uniform hopping
// modulation J(t) = J0 (1 + A sin 2 pi f t) couples to the k = 0 modes; at first order in A
// the energy absorbed in a time T is a sinc^2 resonance at the k = 0 gapped (amplitude) mode
// of the linearised Gutzwiller equations (linearisedSpectrum.ts, ml-matrix eigenvalues), and
// it grows as A^2 (linear response: Kubo; the Fermi golden rule). Asserted on a grid of step
// 1/(4T): the peak lies within one step of omega_amp / 2 pi, the sinc^2 zeros at f0 +- 1/T
// (below 1e-3 of the peak; measured 1.4e-4), the side lobe beyond them, and doubling A (0.002
// -> 0.004) multiplies the absorption by 4 within 2% (measured 3.978: the A^4 correction).
import { describe, expect, it } from 'vitest';
import { uniformPeriodic } from './fixtures.js';
import { staticGroundState } from '../../src/dynamics/staticGround.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { modulationSpectrum, hoppingModulationDrives } from '../../src/dynamics/modulationSpectrum.js';
import { linearisedFrequencies } from './linearisedSpectrum.js';

describe('modulation spectrum of a uniform superfluid', () => {
  it('2D, zJ/U = 0.4, mu/U = 0.5: absorption peaks at the k = 0 amplitude mode', async () => {
    const J = 0.1;
    const mu = 0.5;
    const model = uniformPeriodic([4, 4], J, 6);
    const ground = await staticGroundState({ model, chemical: { kind: 'mu', mu } });
    const S = model.nmax + 1;
    const c0 = new Float64Array(S);
    for (let n = 0; n < S; n++) c0[n] = ground.state.amplitudes[2 * n];
    const omegaAmp = linearisedFrequencies(c0, 1, J, mu, 4, 4)[0];
    const fAmp = omegaAmp / (2 * Math.PI);
    const duration = 80;
    const step = 0.25 / duration;
    const frequencies = Array.from({ length: 17 }, (_, m) => fAmp + (m - 8) * step);
    const frame = frameFromModel(model, { mu: ground.mu });
    const integrator = { kind: 'dormand-prince' as const, absoluteTolerance: 1e-11, relativeTolerance: 1e-11 };
    const spectrum = await modulationSpectrum({
      initial: ground.state,
      frame,
      driveFor: hoppingModulationDrives(0.002),
      frequencies,
      duration,
      integrator,
    });
    const absorbed = spectrum.points.map((p) => p.energyAbsorbed);
    let peak = 0;
    for (let m = 1; m < absorbed.length; m++) if (absorbed[m] > absorbed[peak]) peak = m;
    expect(Math.abs(frequencies[peak] - fAmp)).toBeLessThanOrEqual(step * 1.0001);
    expect(absorbed[peak]).toBeGreaterThan(0);
    // two resolution widths (1/T) away
    expect(absorbed[peak]).toBeGreaterThan(20 * Math.max(absorbed[0], absorbed[16]));
    // the sinc^2 line shape of a resonance driven for a time T vanishes at f - f0 = +-1/T
    expect(Math.max(absorbed[4], absorbed[12])).toBeLessThan(1e-3 * absorbed[peak]);
    expect(absorbed[2]).toBeGreaterThan(10 * absorbed[4]); // first side lobe
    expect(spectrum.points.every((p) => p.status === 'done')).toBe(true);

    const doubled = await modulationSpectrum({
      initial: ground.state,
      frame,
      driveFor: hoppingModulationDrives(0.004),
      frequencies: [frequencies[8]],
      duration,
      integrator,
    });
    expect(Math.abs(doubled.points[0].energyAbsorbed / absorbed[8] / 4 - 1)).toBeLessThan(0.02);
  });
});

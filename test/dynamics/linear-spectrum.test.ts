// Small oscillations of a uniform superfluid against the linearised Gutzwiller spectrum.
// Linearising i dc_n/dt = (H c)_n around the stationary state c0 e^{-i lambda t} with a
// perturbation a_n cos(k.r_i) gives (sum over neighbours: sum_j cos(k.r_j) = gamma_k cos(k.r_i),
// gamma_k = 2 sum_d cos k_d):
//   i da_n/dt = (d_n - lambda) a_n - Psi0 (sqrt(n) a_{n-1} + sqrt(n+1) a_{n+1})
//               - J gamma_k (dphi sqrt(n) c0_{n-1} + dphi^* sqrt(n+1) c0_{n+1}),
//   dphi = sum_m sqrt(m+1) (c0_m a_{m+1} + a_m^* c0_{m+1}),
// a real-linear map on (Re a, Im a) whose eigenvalues are +-i omega (the Bogoliubov-like
// spectrum of the Gutzwiller equations: e.g. Krutitsky & Navez, PRA 84, 033602 (2011)). It is
// built in linearisedSpectrum.ts from this formula, independently of the code under test, and
// diagonalised with ml-matrix's general EigenvalueDecomposition. The simulation starts from the ground state
// plus 1e-4 cos(k x) times a generic vector; the site-density wave sum_i cos(k x_i) n_i(t) is
// fitted with four sinusoids in a window below the fifth branch. Tolerance 1e-5 relative:
// measured 1e-8 to 1e-6 (the weakest branch has 1-3% of the sound wave's amplitude and the
// branches above the window leave a residual of 1e-3 to 1e-2), nonlinear shifts are ~1e-8 and
// the integrator runs at 1e-12.
import { describe, expect, it } from 'vitest';
import { uniformPeriodic } from './fixtures.js';
import { staticGroundState } from '../../src/dynamics/staticGround.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { evolve } from '../../src/dynamics/evolve.js';
import { copyState } from '../../src/dynamics/gutzwillerState.js';
import { fitOscillation } from '../../src/dynamics/oscillationFit.js';
import { linearisedFrequencies } from './linearisedSpectrum.js';

describe('small oscillations of a uniform superfluid', () => {
  const cases = [
    { name: '1D chain L = 16, zJ/U = 0.3, mu/U = 0.5, k = pi/4', shape: [16], J: 0.15, mu: 0.5, k: [Math.PI / 4], duration: 400 },
    { name: '2D 8x8, zJ/U = 0.4, mu/U = 1.5, k = (pi/2, pi/4)', shape: [8, 8], J: 0.1, mu: 1.5, k: [Math.PI / 2, Math.PI / 4], duration: 200 },
  ];
  for (const { name, shape, J, mu, k, duration } of cases) {
    it(`${name}: the four lowest fitted frequencies equal the linearised spectrum to 1e-5`, async () => {
      const model = uniformPeriodic(shape, J, 6);
      const L = model.geometry.siteCount;
      const ground = await staticGroundState({ model, chemical: { kind: 'mu', mu } });
      const S = model.nmax + 1;
      const c0 = new Float64Array(S);
      for (let n = 0; n < S; n++) c0[n] = ground.state.amplitudes[2 * n];
      const gammaK = 2 * k.reduce((sum, kd) => sum + Math.cos(kd), 0);
      const reference = linearisedFrequencies(c0, 1, J, mu, gammaK, 2 * shape.length);
      // cos(k.r_i) with r_i the physical coordinates (C order, last axis fastest)
      const wave = new Float64Array(L);
      for (let i = 0; i < L; i++) {
        let r = i;
        let phase = 0;
        for (let d = shape.length - 1; d >= 0; d--) {
          phase += k[d] * (r % shape[d]);
          r = Math.floor(r / shape[d]);
        }
        wave[i] = Math.cos(phase);
      }
      const state = copyState(ground.state);
      const y = state.amplitudes;
      const v = [0.3, -0.5, 0.8, 0.2, -0.4, 0.1, 0.05].slice(0, S);
      for (let i = 0; i < L; i++) {
        const w = 1e-4 * wave[i];
        let norm = 0;
        for (let n = 0; n < S; n++) {
          y[2 * (i * S + n)] += w * v[n];
          y[2 * (i * S + n) + 1] += 0.7 * w * v[S - 1 - n];
          norm += y[2 * (i * S + n)] ** 2 + y[2 * (i * S + n) + 1] ** 2;
        }
        for (let n = 0; n < 2 * S; n++) y[2 * i * S + n] /= Math.sqrt(norm);
      }
      const frame = frameFromModel(model, { mu: ground.mu });
      const count = 10 * duration;
      const times = Array.from({ length: count }, (_, m) => (m * duration) / (count - 1));
      const signal = new Float64Array(count);
      await evolve({
        state,
        frame,
        outputTimes: times,
        integrator: { kind: 'dormand-prince', absoluteTolerance: 1e-12, relativeTolerance: 1e-12 },
        onOutput: ({ index }) => {
          let s = 0;
          for (let i = 0; i < L; i++) {
            let n1 = 0;
            for (let n = 0; n < S; n++) n1 += n * (y[2 * (i * S + n)] ** 2 + y[2 * (i * S + n) + 1] ** 2);
            s += wave[i] * n1;
          }
          signal[index] = s;
        },
      });
      const fit = fitOscillation({ times: Float64Array.from(times), values: signal, modes: 4, maxAngularFrequency: 0.5 * (reference[3] + reference[4]) });
      expect(fit.converged).toBe(true);
      for (let m = 0; m < 4; m++) {
        expect(Math.abs(fit.angularFrequencies[m] - reference[m]) / reference[m]).toBeLessThan(1e-5);
      }
    });
  }
});

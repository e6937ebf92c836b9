// Quench of a trapped superfluid to zero hopping: collapse and revival of the matter-wave
// field with period h/U (Greiner, Mandel, Hansch & Bloch, Nature 419, 51 (2002)). At J = 0
// the sites decouple and each evolves exactly as c_n(t) = c_n(0) exp(-i E_n t) (hbar = 1),
// E_n = U n(n-1)/2 + (eps_i - mu) n, so phi_i(t) = sum_n sqrt(n+1) c_n c_{n+1}
// exp(-i (E_{n+1} - E_n) t) and |phi_i(t)|^2 returns to its initial value at t = 2 pi / U.
// Tolerance 1e-8 on phi (the brief's figure): the adaptive integrator runs at 1e-12
// (its global error is a few times that); the splitting is exact at J = 0 (diagonal H).
import { describe, expect, it } from 'vitest';
import { trappedModel } from './fixtures.js';
import { staticGroundState } from '../../src/dynamics/staticGround.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { createDrive } from '../../src/dynamics/drive.js';
import { rampSchedule, isQuenchAtStart } from '../../src/dynamics/rampSchedule.js';
import { evolve, type IntegratorOptions } from '../../src/dynamics/evolve.js';
import { copyState } from '../../src/dynamics/gutzwillerState.js';
import { orderParameterRange } from '../../src/dynamics/equationsOfMotion.js';

describe('quench to J = 0: collapse and revival', async () => {
  const model = trappedModel([12, 12], 0.06, 0.03, 7);
  const ground = await staticGroundState({ model, chemical: { kind: 'mu', mu: 1.6 } });
  const U = 1;
  const revival = (2 * Math.PI) / U;

  it('starts from a converged superfluid', () => {
    expect(ground.converged).toBe(true);
    expect(ground.maxOrderResidual).toBeLessThan(1e-9);
    let condensed = 0;
    for (const p of ground.phi) condensed += p * p;
    expect(condensed).toBeGreaterThan(5);
  });

  const closedForm = (t: number, phiRe: Float64Array, phiIm: Float64Array): void => {
    const S = model.nmax + 1;
    const y = ground.state.amplitudes;
    for (let i = 0; i < model.geometry.siteCount; i++) {
      let re = 0;
      let im = 0;
      for (let n = 0; n + 1 < S; n++) {
        const c0 = y[2 * (i * S + n)];
        const c1 = y[2 * (i * S + n + 1)];
        const gap = U * n + (model.eps[i] - ground.mu); // E_{n+1} - E_n
        re += Math.sqrt(n + 1) * c0 * c1 * Math.cos(gap * t);
        im -= Math.sqrt(n + 1) * c0 * c1 * Math.sin(gap * t);
      }
      phiRe[i] = re;
      phiIm[i] = im;
    }
  };

  const integrators: Array<[string, IntegratorOptions]> = [
    ['dormand-prince', { kind: 'dormand-prince', absoluteTolerance: 1e-12, relativeTolerance: 1e-12 }],
    ['splitting', { kind: 'splitting', step: 0.05 }],
  ];
  for (const [name, integrator] of integrators) {
    it(`${name}: phi(t) equals the closed form to 1e-8 and |phi|^2 revives at t = h/U`, async () => {
      const frame = frameFromModel(model, { mu: ground.mu });
      const quench = rampSchedule({ path: 'hopping', points: [[0, 0]] });
      expect(isQuenchAtStart(quench, 1)).toBe(true);
      const drive = createDrive(frame, { hoppingFactor: quench });
      const state = copyState(ground.state);
      const n = model.geometry.siteCount;
      const phiRe = new Float64Array(n);
      const phiIm = new Float64Array(n);
      const refRe = new Float64Array(n);
      const refIm = new Float64Array(n);
      const times = Array.from({ length: 21 }, (_, k) => (k * revival) / 10);
      let worst = 0;
      const condensed: number[] = [];
      const result = await evolve({
        state,
        frame,
        drive,
        outputTimes: times,
        integrator,
        onOutput: ({ time }) => {
          orderParameterRange(state.amplitudes, state.states, frame.sqrtN, phiRe, phiIm, 0, n);
          closedForm(time, refRe, refIm);
          let sum = 0;
          for (let i = 0; i < n; i++) {
            worst = Math.max(worst, Math.abs(phiRe[i] - refRe[i]), Math.abs(phiIm[i] - refIm[i]));
            sum += phiRe[i] * phiRe[i] + phiIm[i] * phiIm[i];
          }
          condensed.push(sum);
        },
      });
      expect(result.status).toBe('done');
      expect(worst).toBeLessThan(1e-8);
      // revivals at h/U and 2h/U: every site's |phi|^2 as at t = 0
      expect(Math.abs(condensed[10] - condensed[0]) / condensed[0]).toBeLessThan(1e-8);
      expect(Math.abs(condensed[20] - condensed[0]) / condensed[0]).toBeLessThan(1e-8);
      // collapse in between (the field dephases: a broad number distribution)
      expect(condensed[5]).toBeLessThan(0.5 * condensed[0]);
    });
  }
});

// Norm-preserving integration of the time-dependent Gutzwiller equations by a red-black
// operator splitting. On a bipartite lattice the mean field Psi_i of a red site depends
// only on black sites and vice versa, so the vector field splits as f = f_red + f_black,
// where f_red moves the red sites with the black ones frozen. Each part is linear with a
// constant Psi_i per site, hence solved exactly by c_i <- exp(-i rate H_i tau) c_i
// (siteExponential.ts). The symmetric (Strang) composition
//     S2(h) = red(h/2) black(h) red(h/2)
// is second order (Strang, SIAM J. Numer. Anal. 5, 506 (1968)) and unitary site by site
// (norms kept to rounding). Under a static Hamiltonian each partial flow is the flow of
// K = E - mu N (mu the frame's gauge) in the moving colour's variables, so it conserves K
// exactly (dK/dt = 2 Re sum_red (dK/dc_i)(dc_i/dt) = 0 with dc_i/dt = -i dK/dc_i^*), and S2
// does too, for any step. E and N separately are constants of the full flow only (a partial
// flow moves atoms between the colours), so they carry the truncation error of the scheme
// (measured in test/dynamics/conservation.test.ts). Order 4 composes five S2 steps with
// Suzuki's fractal weights p, p, 1-4p, p, p, p = 1/(4 - 4^(1/3)) (Suzuki, Phys. Lett. A 146,
// 319 (1990)), whose intermediate times all stay inside the step.
//
// With a time-dependent drive each partial flow uses the Hamiltonian at the middle of its
// time slot (t + h/4, t + h/2, t + 3h/4), which keeps the scheme symmetric and second order.
// Steps are fixed: between two targets the interval is cut into equal steps no longer than
// `step`. There is no error estimate; compare two step sizes (bench/dynamicsBench.mjs).

import type { Drive } from './drive.js';
import type { DynamicsRunner } from './dynamicsRunner.js';
import type { GutzwillerState } from './gutzwillerState.js';
import { emptyStatistics, recordStep, type AdvanceStatus, type Stepper } from './stepper.js';

export interface SplittingOptions {
  kind: 'splitting';
  /** largest step, time units of the evolution */
  step: number;
  /** 2 (Strang) or 4 (Suzuki composition); default 2 */
  order?: 2 | 4;
}

const SUZUKI_P = 1 / (4 - Math.cbrt(4));
const SUZUKI = [SUZUKI_P, SUZUKI_P, 1 - 4 * SUZUKI_P, SUZUKI_P, SUZUKI_P];

export function createRedBlackSplitting(state: GutzwillerState, runner: DynamicsRunner, drive: Drive | null, options: SplittingOptions): Stepper {
  const order = options.order ?? 2;
  if (order !== 2 && order !== 4) throw new RangeError(`splitting order: expected 2 or 4, got ${String(order)}`);
  if (!(options.step > 0 && Number.isFinite(options.step))) throw new RangeError(`splitting step: expected a positive step size, got ${options.step}`);
  const y = state.amplitudes;
  const frame = runner.frame;
  const statistics = emptyStatistics();
  const weights = order === 2 ? [1] : SUZUKI;

  const strang = async (t: number, h: number): Promise<void> => {
    if (drive) drive.apply(t + 0.25 * h, frame, false);
    await runner.propagateColour(y, 0, 0.5 * h);
    if (drive) drive.apply(t + 0.5 * h, frame, false);
    await runner.propagateColour(y, 1, h);
    if (drive) drive.apply(t + 0.75 * h, frame, false);
    await runner.propagateColour(y, 0, 0.5 * h);
    statistics.evaluations += 3;
  };

  return {
    statistics,
    invalidate() {},
    async advance(t0, t1): Promise<AdvanceStatus> {
      if (!(t1 > t0)) return { ok: true };
      const count = Math.max(1, Math.ceil((t1 - t0) / options.step - 1e-9));
      const h = (t1 - t0) / count;
      for (let m = 0; m < count; m++) {
        let t = t0 + m * h;
        for (const w of weights) {
          await strang(t, w * h);
          t += w * h;
        }
        recordStep(statistics, h);
      }
      // once per target (not per step): a NaN anywhere spreads to every site within a few steps
      for (let m = 0; m < y.length; m++) {
        if (!Number.isFinite(y[m])) return { ok: false, reason: 'not-finite', message: `the state became non-finite before t = ${t1}` };
      }
      return { ok: true };
    },
  };
}

// The drive of `tiercake evolve`: the scenario's ramps and modulation (already turned into
// functions of time by evolutionPlan.ts) applied to a DynamicsFrame at every right-hand-side
// evaluation (src/dynamics/drive.ts describes the frame's scale factors):
//
//   J_d(t)  = hoppingFactor_d(t) * J(s_d(t)) / J(s_d(0)) * J_d(static)
//   U_i(t)  = interactionFactor(t) * prod_d W4(s_d(t)) / W4(s_d(0)) * U_i(static)
//   eps_i(t) = eps_i(static) + [trap_i(k(t), c(t)) - trap_i(k(0), c(0))] + sum_m (a_m(t) - a_m(0)) u_m,i
//
// s_d: lattice depth along axis d in E_r (laboratory mode; J(s) and W4(s) = int |w|^4 from
// the band structure, tabulated once: src/dynamics/depthTable.ts); trap_i(k, c) =
// sum_d k_d (x_d - c_d)^2; u_m: the site energies of a linear term (disorder, a landscape
// term) at unit amplitude, a_m its amplitude. Written as differences from the static values,
// the Hamiltonian at t = 0 is the static one bit for bit, so a start without a quench is
// exactly stationary. Per-site J and U (beam envelope) are rescaled by the ratio of the
// central depth (envelopeApproximation).

import type { Drive } from '../dynamics/drive.js';
import type { DynamicsFrame } from '../dynamics/dynamicsFrame.js';
import type { TimeFunction } from '../dynamics/timeFunction.js';
import type { LatticeGeometry } from '../lattice/latticeGeometry.js';
import { addHarmonicTrap } from '../lattice/harmonicTrap.js';
import type { LatticeAxisInterpolator } from '../physics/depthInterpolation.js';

export interface LinearSiteTerm {
  /** site energies at unit amplitude, internal energy unit */
  unitField: Float64Array;
  /** amplitude a(t) (the term's own unit) */
  amplitude: TimeFunction;
  /** a(0) of the static scenario */
  staticAmplitude: number;
}

export interface DriveTargets {
  /** factor on J along each physical axis (null: 1) */
  hoppingFactor: Array<TimeFunction | null>;
  /** factor on U (null: 1) */
  interactionFactor: TimeFunction | null;
  /** lattice depth per physical axis, E_r (laboratory mode; null: not driven) */
  depthEr: Array<TimeFunction | null>;
  /** static depth per physical axis, E_r */
  staticDepthEr: number[];
  depthTable: LatticeAxisInterpolator | null;
  /** trap coefficient per physical axis, internal energy per site^2 (null everywhere: the trap is not driven) */
  trapCoefficient: Array<TimeFunction | null>;
  trapCentre: Array<TimeFunction | null>;
  staticTrapCoefficient: number[];
  staticTrapCentre: number[];
  linearTerms: LinearSiteTerm[];
}

function mergedBreakpoints(functions: ReadonlyArray<TimeFunction | null>): number[] {
  const all = functions.flatMap((f) => (f ? [...f.breakpoints] : [])).sort((a, b) => a - b);
  return all.filter((t, k) => k === 0 || t !== all[k - 1]);
}

export function scenarioDrive(frame: DynamicsFrame, geometry: LatticeGeometry, targets: DriveTargets): Drive {
  const dims = geometry.dims;
  const pad = 3 - dims;
  const table = targets.depthTable;
  const depthDriven = targets.depthEr.some((f) => f !== null);
  if (depthDriven && table === null) throw new RangeError('scenarioDrive: a depth ramp needs a depth table');
  const baseJ = targets.staticDepthEr.map((s, d) => (targets.depthEr[d] && table ? table.tunnellingEr(s) : 1));
  const baseW4 = targets.staticDepthEr.map((s, d) => (targets.depthEr[d] && table ? table.integralW4PerSite(s) : 1));
  const trapDriven = targets.trapCoefficient.some((f) => f !== null) || targets.trapCentre.some((f) => f !== null);
  const potentialDriven = trapDriven || targets.linearTerms.length > 0;
  const epsStatic = Float64Array.from(frame.eps);
  const trapStatic = new Float64Array(geometry.siteCount);
  const trapNow = new Float64Array(geometry.siteCount);
  const coefficient = [...targets.staticTrapCoefficient];
  const centre = [...targets.staticTrapCentre];
  if (trapDriven) addHarmonicTrap(geometry, { coefficient: targets.staticTrapCoefficient, centre: targets.staticTrapCentre }, trapStatic);
  const amplitudeChange = new Float64Array(targets.linearTerms.length);
  const siteResolved = frame.interactionArray !== null || frame.hopArrays.some((h) => h !== null);
  const breakpoints = mergedBreakpoints([
    ...targets.hoppingFactor,
    targets.interactionFactor,
    ...targets.depthEr,
    ...targets.trapCoefficient,
    ...targets.trapCentre,
    ...targets.linearTerms.map((t) => t.amplitude),
  ]);

  return {
    breakpoints,
    envelopeApproximation: depthDriven && siteResolved,
    apply(time, f, leftLimit) {
      let u = targets.interactionFactor ? targets.interactionFactor.valueAt(time, leftLimit) : 1;
      for (let d = 0; d < dims; d++) {
        let scale = targets.hoppingFactor[d] ? (targets.hoppingFactor[d] as TimeFunction).valueAt(time, leftLimit) : 1;
        const depth = targets.depthEr[d];
        if (depth && table) {
          const s = depth.valueAt(time, leftLimit);
          scale *= table.tunnellingEr(s) / baseJ[d];
          u *= table.integralW4PerSite(s) / baseW4[d];
        }
        f.hopScale[pad + d] = scale;
      }
      f.interactionScale = u;
      if (!potentialDriven) return;
      const eps = f.eps;
      eps.set(epsStatic);
      if (trapDriven) {
        for (let d = 0; d < dims; d++) {
          coefficient[d] = targets.trapCoefficient[d] ? (targets.trapCoefficient[d] as TimeFunction).valueAt(time, leftLimit) : targets.staticTrapCoefficient[d];
          centre[d] = targets.trapCentre[d] ? (targets.trapCentre[d] as TimeFunction).valueAt(time, leftLimit) : targets.staticTrapCentre[d];
        }
        trapNow.fill(0);
        addHarmonicTrap(geometry, { coefficient, centre }, trapNow);
        for (let i = 0; i < eps.length; i++) eps[i] += trapNow[i] - trapStatic[i];
      }
      for (let m = 0; m < targets.linearTerms.length; m++) {
        const term = targets.linearTerms[m];
        amplitudeChange[m] = term.amplitude.valueAt(time, leftLimit) - term.staticAmplitude;
        const change = amplitudeChange[m];
        if (change === 0) continue;
        const field = term.unitField;
        for (let i = 0; i < eps.length; i++) eps[i] += change * field[i];
      }
    },
  };
}

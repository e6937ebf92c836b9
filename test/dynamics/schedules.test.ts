// Ramp schedules, modulation and the depth drive. Values worked out by hand; the depth drive
// against the direct band-structure calculation at each depth (hubbardFromLab: Jaksch et al.,
// PRL 81, 3108 (1998)), the laboratory time unit against the revival period h/U (Greiner et
// al., Nature 419, 51 (2002)): with U/h in Hz and t in ms, |phi|^2 returns at t = 1000/U ms.
import { describe, expect, it } from 'vitest';
import { rampSchedule, isQuenchAtStart } from '../../src/dynamics/rampSchedule.js';
import { latticeModulation } from '../../src/dynamics/latticeModulation.js';
import { ParameterError } from '../../src/physics/parameterError.js';
import { hubbardFromLab } from '../../src/physics/hubbardParameters.js';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel } from '../../src/lattice/latticeModel.js';
import { frameFromModel, laboratoryRate, bondHopping } from '../../src/dynamics/dynamicsFrame.js';
import { createDrive } from '../../src/dynamics/drive.js';
import { depthTableCovering } from '../../src/dynamics/depthTable.js';
import { groundStateAmplitudes } from '../../src/dynamics/gutzwillerState.js';
import { evolve } from '../../src/dynamics/evolve.js';
import { orderParameterRange } from '../../src/dynamics/equationsOfMotion.js';

describe('ramp schedules', () => {
  it('linear, exponential and s-curve segments at hand-computed points', () => {
    const pts: Array<[number, number]> = [[1, 2], [3, 8]];
    const lin = rampSchedule({ path: 'x', points: pts });
    const exp = rampSchedule({ path: 'x', points: pts, shape: 'exponential' });
    const s = rampSchedule({ path: 'x', points: pts, shape: 's-curve' });
    expect(lin.valueAt(0)).toBe(2); // before the first point: first value
    expect(lin.valueAt(2)).toBe(5);
    expect(lin.valueAt(10)).toBe(8); // after the last: last value
    expect(exp.valueAt(2)).toBeCloseTo(4, 14); // geometric mean of 2 and 8
    expect(exp.valueAt(1.5)).toBeCloseTo(2 * Math.pow(4, 0.25), 14);
    expect(s.valueAt(1.5)).toBeCloseTo(2 + 6 * 0.15625, 14); // x = 1/4: x^2 (3 - 2x) = 5/32
    expect(s.valueAt(2)).toBeCloseTo(5, 14);
    expect(lin.breakpoints).toEqual([1, 3]);
  });

  it('two points at one time make a jump: right-continuous, left limit on request', () => {
    const r = rampSchedule({ path: 'x', points: [[0, 1], [2, 1], [2, 5], [4, 5]] });
    expect(r.valueAt(2)).toBe(5);
    expect(r.valueAt(2, true)).toBe(1);
    expect(r.valueAt(1.999)).toBe(1);
    expect(r.breakpoints).toEqual([0, 2, 4]);
  });

  it('a first point at t = 0 that differs from the static value is a quench', () => {
    expect(isQuenchAtStart(rampSchedule({ path: 'x', points: [[0, 0.5], [1, 1]] }), 1)).toBe(true);
    expect(isQuenchAtStart(rampSchedule({ path: 'x', points: [[0, 1], [1, 0.5]] }), 1)).toBe(false);
  });

  it('bad input names the field', () => {
    expect(() => rampSchedule({ path: 'lattice.depthEr', points: [[1, 2], [0, 3]] })).toThrow(/ramp lattice.depthEr.points\[1\].*decrease/);
    expect(() => rampSchedule({ path: 'j', points: [[0, 1], [1, -1]], shape: 'exponential' })).toThrow(ParameterError);
    expect(() => rampSchedule({ path: 'j', points: [] })).toThrow(/at least one/);
  });

  it('modulation V0 (1 + A sin 2 pi f t): extremes at quarter periods, V0 outside the window', () => {
    const m = latticeModulation({ baseValue: 10, relativeAmplitude: 0.2, frequency: 0.5, startTime: 1, endTime: 5 });
    expect(m.valueAt(0.5)).toBe(10);
    expect(m.valueAt(1.5)).toBeCloseTo(12, 13);
    expect(m.valueAt(2.5)).toBeCloseTo(8, 13);
    expect(m.valueAt(6)).toBe(10);
    expect(m.breakpoints).toEqual([1, 5]);
  });
});

describe('lattice-depth drive', () => {
  it('J(t) and U(t) follow the band structure at the ramped depth (1e-8 relative)', () => {
    const lab = (s: number) => hubbardFromLab({ species: '87Rb', wavelengthNm: 1064, depthEr: [s, s, s] });
    const s0 = 8;
    const base = lab(s0);
    const geometry = createLatticeGeometry([4, 4, 4], [true, true, true]);
    const model = uniformModel(geometry, base.interactionHz, base.latticeAxes[0].tunnellingHz, 4);
    const frame = frameFromModel(model, { mu: 0, rate: laboratoryRate(1e-3) });
    const ramp = rampSchedule({ path: 'laboratory.depthEr', points: [[0, s0], [10, 14]] });
    const drive = createDrive(frame, { latticeDepth: { depthEr: ramp, baseDepthEr: s0, table: depthTableCovering([8, 14]) } });
    for (const t of [0, 2.5, 7.3, 10]) {
      drive.apply(t, frame, false);
      const direct = lab(ramp.valueAt(t));
      for (let axis = 0; axis < 3; axis++) {
        expect(Math.abs(bondHopping(frame, axis, 0) / direct.latticeAxes[0].tunnellingHz - 1)).toBeLessThan(1e-8);
      }
      expect(Math.abs((frame.interactionScale * frame.interactionU) / direct.interactionHz - 1)).toBeLessThan(1e-8);
    }
    expect(drive.envelopeApproximation).toBe(false);
  });

  it('laboratory time unit: at J = 0 |phi|^2 revives at t = 1000 / (U/h in Hz) ms', async () => {
    const Uhz = 730;
    const geometry = createLatticeGeometry([2], [false]);
    const model = uniformModel(geometry, Uhz, 60, 6);
    const mu = 0.6 * Uhz;
    // a superfluid-like start: the site ground state at J = 60 Hz with phi = 0.8 given
    const start = groundStateAmplitudes(model, Float64Array.of(0.8, 0.8), mu).state;
    const frame = frameFromModel({ ...model, hopping: [0] }, { mu, rate: laboratoryRate(1e-3) });
    const phiRe = new Float64Array(2);
    const phiIm = new Float64Array(2);
    const values: number[] = [];
    await evolve({
      state: start,
      frame,
      outputTimes: [0, 500 / Uhz, 1000 / Uhz],
      integrator: { kind: 'dormand-prince', absoluteTolerance: 1e-12, relativeTolerance: 1e-12 },
      onOutput: ({ state }) => {
        orderParameterRange(state.amplitudes, state.states, frame.sqrtN, phiRe, phiIm, 0, 2);
        values.push(phiRe[0] ** 2 + phiIm[0] ** 2);
      },
    });
    expect(Math.abs(values[2] / values[0] - 1)).toBeLessThan(1e-9);
    expect(values[1]).toBeLessThan(0.9 * values[0]);
  });
});

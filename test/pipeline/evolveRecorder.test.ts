// What `evolve` records at an output time (src/pipeline/evolveRecorder.ts), on hand-made
// product states whose observables are written out here from the amplitudes:
//   <n_i> = sum_n n |c_n|^2, phi_i = sum_n sqrt(n) c_{n-1}^* c_n, P_i(n) = |c_n|^2,
//   E = sum_i [U/2 <n(n-1)> + eps_i <n>] - sum_<ij> J (phi_i^* phi_j + c.c.)
// (the mean-field energy of a Gutzwiller product state, no mu term); the Mott shell defects
// from the shell filling k_i given: holes P_i(n < k_i), defects 1 - P_i(k_i). Snapshots and
// animation frames only at the times asked for, once each.
import { describe, expect, it } from 'vitest';
import { validateScenario } from '../../src/scenario/loadScenario.js';
import { resolveScenario } from '../../src/scenario/resolveScenario.js';
import type { ScenarioInput } from '../../src/scenario/scenarioSchema.js';
import { createEvolveRecorder, densityInto } from '../../src/pipeline/evolveRecorder.js';
import { evolveCamera } from '../../src/pipeline/evolvePictures.js';
import { createGutzwillerState, type GutzwillerState } from '../../src/dynamics/gutzwillerState.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';

const resolved = (shape: number[]) =>
  resolveScenario(
    validateScenario(
      { name: 'recorder', energyUnit: 'U', lattice: { shape, boundary: 'open' }, hubbard: { hopping: 0.05 }, particles: { chemicalPotential: 0.5 }, truncation: { nmax: 3 } } as ScenarioInput,
      'test scenario',
    ),
  );

/** Site i: amplitudes (re, im) of |0>, |1>, |2>, |3> before normalisation. */
const sites: Array<Array<[number, number]>> = [
  [[0.3, 0], [0.8, 0.2], [0.4, -0.1], [0, 0]],
  [[0.1, 0.1], [0.9, 0], [0.2, 0.3], [0.05, 0]],
  [[0.6, 0], [0.5, -0.4], [0.1, 0], [0, 0.02]],
];

function handState(): GutzwillerState {
  const s = createGutzwillerState(3, 3);
  sites.forEach((site, i) => {
    const norm = Math.sqrt(site.reduce((a, [re, im]) => a + re * re + im * im, 0));
    site.forEach(([re, im], n) => {
      s.amplitudes[2 * (4 * i + n)] = re / norm;
      s.amplitudes[2 * (4 * i + n) + 1] = im / norm;
    });
  });
  return s;
}

/** The hand formulas of the header, from the state's amplitudes. */
function byHand(s: GutzwillerState, J: number, U: number, eps: Float64Array, shell: Int32Array) {
  const c = (i: number, n: number): [number, number] => [s.amplitudes[2 * (4 * i + n)], s.amplitudes[2 * (4 * i + n) + 1]];
  const p = (i: number, n: number): number => c(i, n)[0] ** 2 + c(i, n)[1] ** 2;
  const out = { density: [] as number[], phi: [] as Array<[number, number]>, energy: 0, atoms: 0, condensed: 0, variance: 0, doublons: 0, multiply: 0, holes: 0, defects: 0 };
  for (let i = 0; i < 3; i++) {
    let n1 = 0;
    let n2 = 0;
    let re = 0;
    let im = 0;
    for (let n = 0; n < 4; n++) {
      n1 += n * p(i, n);
      n2 += n * n * p(i, n);
      out.energy += p(i, n) * (0.5 * U * n * (n - 1) + eps[i] * n);
      if (n >= 1) {
        // conj(c_{n-1}) c_n
        const [ar, ai] = c(i, n - 1);
        const [br, bi] = c(i, n);
        re += Math.sqrt(n) * (ar * br + ai * bi);
        im += Math.sqrt(n) * (ar * bi - ai * br);
      }
      if (n < shell[i]) out.holes += p(i, n);
    }
    if (shell[i] > 0) out.defects += 1 - p(i, shell[i]);
    out.density.push(n1);
    out.phi.push([re, im]);
    out.atoms += n1;
    out.condensed += re * re + im * im;
    out.variance += n2 - n1 * n1;
    out.doublons += p(i, 2);
    out.multiply += p(i, 2) + p(i, 3);
  }
  for (const [a, b] of [[0, 1], [1, 2]]) out.energy -= 2 * J * (out.phi[a][0] * out.phi[b][0] + out.phi[a][1] * out.phi[b][1]);
  return out;
}

describe('evolve recorder', () => {
  it('a row of the series is the hand-computed observables of the state; J and U follow the frame factors', () => {
    const r = resolved([3]);
    const frame = frameFromModel(r.model, { mu: 0.5 });
    frame.eps.set([0.2, -0.1, 0.4]);
    frame.hopScale[2] = 0.5; // 1D: physical axis 0 is internal axis 2
    frame.interactionScale = 2;
    const shell = Int32Array.of(0, 1, 2);
    const rec = createEvolveRecorder({ resolved: r, camera: evolveCamera(r), shellFilling: shell, snapshotTimes: [1], frameTimes: [1], label: (t) => `t = ${t}` });
    const state = handState();
    const want = byHand(state, 0.025, 2, frame.eps, shell);
    rec.record({ time: 0, index: 0, state, frame, statistics: { steps: 5, rejectedSteps: 1 } as never });
    const s = rec.series;
    expect(s.time).toEqual([0]);
    const close = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThan(1e-13);
    close(s.energy[0], want.energy);
    close(s.atoms[0], want.atoms);
    close(s.condensedAtoms[0], want.condensed);
    close(s.numberVariance[0], want.variance);
    close(s.doublons[0], want.doublons);
    close(s.multiplyOccupied[0], want.multiply);
    close(s.holes[0], want.holes);
    close(s.shellDefects[0], want.defects);
    close(s.hopping[0], 0.5 * r.units.hopping);
    close(s.interaction[0], 2 * r.units.interaction);
    expect(s.steps).toEqual([5]);
    expect(s.rejectedSteps).toEqual([1]);
    expect(Number.isNaN(s.visibility[0])).toBe(true); // a chain has no time-of-flight picture
    expect(rec.snapshots).toEqual([]);
    expect(rec.frames).toEqual([]);
    const density = new Float64Array(3);
    densityInto(state, density);
    for (let i = 0; i < 3; i++) close(density[i], want.density[i]);
  });

  it('snapshots and frames at their times only, once each; a chain frame is a profile', () => {
    const r = resolved([3]);
    const frame = frameFromModel(r.model, { mu: 0.5 });
    const rec = createEvolveRecorder({ resolved: r, camera: evolveCamera(r), shellFilling: new Int32Array(3), snapshotTimes: [0, 2], frameTimes: [2], label: (t) => `t = ${t}` });
    const state = handState();
    const want = byHand(state, 0.05, 1, frame.eps, new Int32Array(3));
    for (const time of [0, 1, 2, 2]) rec.record({ time, index: 0, state, frame, statistics: { steps: 0, rejectedSteps: 0 } as never });
    expect(rec.series.time).toEqual([0, 1, 2, 2]);
    expect(rec.snapshots.map((x) => [x.index, x.time])).toEqual([[0, 0], [1, 2]]);
    expect(rec.frames.map((f) => f.time)).toEqual([2]);
    const f = rec.frames[0];
    expect([f.density.nx, f.density.ny]).toEqual([3, 1]);
    for (let i = 0; i < 3; i++) {
      expect(Math.abs(f.density.values[i] - want.density[i])).toBeLessThan(1e-13);
      expect(Math.abs(f.condensate.values[i] - (want.phi[i][0] ** 2 + want.phi[i][1] ** 2))).toBeLessThan(1e-13);
      expect(Math.abs(rec.snapshots[1].fields.phiIm[i] - want.phi[i][1])).toBeLessThan(1e-13);
    }
    expect(f.farField).toBeNull();
  });

  it('a layer: frames are the 2D fields, with a far-field picture', () => {
    const r = resolved([3, 2]);
    const frame = frameFromModel(r.model, { mu: 0.5 });
    const state = createGutzwillerState(6, 3);
    for (let i = 0; i < 6; i++) {
      state.amplitudes[2 * 4 * i] = Math.sqrt(0.5);
      state.amplitudes[2 * (4 * i + 1)] = Math.sqrt(0.5);
    }
    const rec = createEvolveRecorder({ resolved: r, camera: evolveCamera(r), shellFilling: new Int32Array(6), snapshotTimes: [], frameTimes: [0], label: (t) => `t = ${t}` });
    rec.record({ time: 0, index: 0, state, frame, statistics: { steps: 0, rejectedSteps: 0 } as never });
    const f = rec.frames[0];
    expect([f.density.nx, f.density.ny]).toEqual([3, 2]);
    // |phi|^2 = (sqrt(1) c_0 c_1)^2 = 1/4 on every site
    for (const v of f.condensate.values) expect(v).toBeCloseTo(0.25, 14);
    expect(f.farField).not.toBeNull();
    expect(rec.series.visibility[0]).toBeGreaterThan(0);
  });
});

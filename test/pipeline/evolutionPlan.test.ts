// A ramp of a scenario key to a value v must end at the Hamiltonian of the same scenario with
// that key set to v, as the static resolution builds it (resolveScenario: band structure,
// Wannier overlaps, trap curvature, disorder generator, landscape terms): checked for every
// kind of ramp at the end time, and half way for a linear depth ramp against the band
// structure at the intermediate depth (hubbardFromLab). The start must be the static
// Hamiltonian bit for bit (no quench, no drift). Tolerances: 1e-9 relative where both sides
// use the exact band structure and the depth table (Chebyshev interpolation, < 1e-10:
// depthInterpolation.ts); 1e-5 between the nodes for the beam-envelope trap, whose depth
// dependence is tabulated on 41 points and interpolated linearly.
import { describe, expect, it } from 'vitest';
import { validateScenario } from '../../src/scenario/loadScenario.js';
import { resolveScenario } from '../../src/scenario/resolveScenario.js';
import type { ScenarioInput } from '../../src/scenario/scenarioSchema.js';
import { evenlySpacedFrequencies, evolutionPlan, modulationFrequencyGrid } from '../../src/pipeline/evolutionPlan.js';
import { scenarioDrive } from '../../src/pipeline/scenarioDrive.js';
import { copyFrame, frameFromModel, type DynamicsFrame } from '../../src/dynamics/dynamicsFrame.js';
import { hubbardFromLab } from '../../src/physics/hubbardParameters.js';
import { evolveCamera } from '../../src/pipeline/evolvePictures.js';

const labBase: ScenarioInput = {
  name: 'plan-lab',
  energyUnit: 'Hz',
  lattice: { shape: [10, 12] },
  laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 8, transverse: { trapFrequencyHz: 9000 } },
  trap: { frequencyHz: 50 },
  particles: { atoms: 60 },
};
const hubbardBase: ScenarioInput = {
  name: 'plan-hubbard',
  energyUnit: 'U',
  lattice: { shape: [10, 12] },
  hubbard: { hopping: 0.05 },
  trap: { coefficient: 0.02 },
  disorder: { kind: 'box', width: 0, seed: 'plan' },
  landscape: [{ kind: 'gradient', direction: [1, 0], perSite: 0.01 }],
  particles: { atoms: 60 },
};

function resolved(input: ScenarioInput) {
  return resolveScenario(validateScenario(input, 'test scenario'));
}

/** The frame of `input` driven by its evolution section, at time t. */
function drivenFrame(input: ScenarioInput, time: number): { frame: DynamicsFrame; start: DynamicsFrame; base: ReturnType<typeof resolved> } {
  const base = resolved(input);
  const plan = evolutionPlan(base);
  const start = frameFromModel(base.model, { mu: 0, rate: plan.rate });
  const drive = scenarioDrive(start, base.geometry, plan.targets);
  const frame = copyFrame(start);
  drive.apply(time, frame, false);
  const atZero = copyFrame(start);
  drive.apply(0, atZero, false);
  return { frame, start: atZero, base };
}

const hopping = (f: DynamicsFrame, axis: number): number => f.hopScale[3 - f.dims + axis] * f.hopUniform[3 - f.dims + axis];
const interaction = (f: DynamicsFrame): number => f.interactionScale * f.interactionU;
const relative = (a: number, b: number): number => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);
function maxDifference(a: Float64Array, b: Float64Array): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

describe('ramps end at the Hamiltonian of the scenario with the final value', () => {
  it('laboratory.depthEr: J and U from the band structure at the final and at an intermediate depth', () => {
    const input = { ...labBase, evolution: { duration: 10, ramps: [{ path: 'laboratory.depthEr', points: [[0, 8], [10, 14]] }] } } as ScenarioInput;
    const { frame, start, base } = drivenFrame(input, 10);
    const target = resolved({ ...labBase, laboratory: { ...labBase.laboratory!, depthEr: 14 } });
    for (const d of [0, 1]) expect(relative(hopping(frame, d), target.laboratory!.hoppingHz[d])).toBeLessThan(1e-9);
    expect(relative(interaction(frame), target.laboratory!.interactionHz)).toBeLessThan(1e-9);
    // half way through the linear ramp: 11 E_r
    const half = drivenFrame(input, 5).frame;
    const direct = hubbardFromLab({ species: '87Rb', wavelengthNm: 1064, depthEr: [11, 11], confinementFrequencyHz: [9000] });
    expect(relative(hopping(half, 0), direct.latticeAxes[0].tunnellingHz)).toBeLessThan(1e-9);
    expect(relative(interaction(half), direct.interactionHz)).toBeLessThan(1e-9);
    // the start is the static Hamiltonian exactly
    expect(hopping(start, 0)).toBe(base.laboratory!.hoppingHz[0]);
    expect(interaction(start)).toBe(base.laboratory!.interactionHz);
  });

  it('laboratory.depthEr.1 drives one axis only; U follows its Wannier overlap', () => {
    const input = { ...labBase, evolution: { duration: 4, ramps: [{ path: 'laboratory.depthEr.1', points: [[0, 8], [4, 12]] }] } } as ScenarioInput;
    const { frame } = drivenFrame(input, 4);
    const target = resolved({ ...labBase, laboratory: { ...labBase.laboratory!, depthEr: [8, 12] } });
    expect(relative(hopping(frame, 0), target.laboratory!.hoppingHz[0])).toBeLessThan(1e-9);
    expect(relative(hopping(frame, 1), target.laboratory!.hoppingHz[1])).toBeLessThan(1e-9);
    expect(relative(interaction(frame), target.laboratory!.interactionHz)).toBeLessThan(1e-9);
  });

  it('trap.frequencyHz: the site potential of the final trap', () => {
    const input = { ...labBase, evolution: { duration: 2, ramps: [{ path: 'trap.frequencyHz', points: [[0, 50], [2, 80]] }] } } as ScenarioInput;
    const { frame, start, base } = drivenFrame(input, 2);
    const target = resolved({ ...labBase, trap: { frequencyHz: 80 } });
    expect(maxDifference(frame.eps, target.model.eps) / Math.max(...target.model.eps)).toBeLessThan(1e-12);
    expect(maxDifference(start.eps, base.model.eps)).toBe(0);
  });

  it('with beam waists, a depth ramp also stiffens the envelope confinement', () => {
    const withWaist = { ...labBase, laboratory: { ...labBase.laboratory!, beamWaistUm: 80 } } as ScenarioInput;
    const input = { ...withWaist, evolution: { duration: 2, ramps: [{ path: 'laboratory.depthEr', points: [[0, 8], [2, 15]] }] } } as ScenarioInput;
    const { frame } = drivenFrame(input, 2);
    const target = resolved({ ...withWaist, laboratory: { ...withWaist.laboratory!, depthEr: 15 } });
    expect(maxDifference(frame.eps, target.model.eps) / Math.max(...target.model.eps)).toBeLessThan(1e-12); // 15 E_r is a table node
    // between the nodes: 12.3 E_r (measured 3.8e-7 relative)
    const between = drivenFrame(input, ((12.3 - 8) / 7) * 2).frame;
    const at123 = resolved({ ...withWaist, laboratory: { ...withWaist.laboratory!, depthEr: 12.3 } });
    expect(maxDifference(between.eps, at123.model.eps) / Math.max(...at123.model.eps)).toBeLessThan(1e-5);
    const unchanged = resolved(withWaist);
    expect(maxDifference(frame.eps, unchanged.model.eps) / Math.max(...unchanged.model.eps)).toBeGreaterThan(0.1);
  });

  it('hubbard mode: hopping, interaction, trap coefficient and centre, disorder from zero, a landscape amplitude', () => {
    const input = {
      ...hubbardBase,
      evolution: {
        duration: 3,
        ramps: [
          { path: 'hubbard.hopping', points: [[0, 0.05], [3, 0.02]], shape: 'exponential' },
          { path: 'hubbard.interaction', points: [[0, 1], [3, 1.5]], shape: 's-curve' },
          { path: 'trap.coefficient.1', points: [[0, 0.02], [3, 0.03]] },
          { path: 'trap.centreSites.0', points: [[0, 4.5], [3, 5.5]] },
          { path: 'disorder.width', points: [[0, 0], [3, 0.4]] },
          { path: 'landscape.0.perSite', points: [[0, 0.01], [3, -0.02]] },
        ],
      },
    } as ScenarioInput;
    const { frame, start, base } = drivenFrame(input, 3);
    expect(relative(hopping(frame, 0), 0.02)).toBeLessThan(1e-12);
    expect(relative(hopping(frame, 1), 0.02)).toBeLessThan(1e-12);
    expect(relative(interaction(frame), 1.5)).toBeLessThan(1e-12);
    const target = resolved({
      ...hubbardBase,
      trap: { coefficient: [0.02, 0.03], centreSites: [5.5, 5.5] },
      disorder: { kind: 'box', width: 0.4, seed: 'plan' },
      landscape: [{ kind: 'gradient', direction: [1, 0], perSite: -0.02 }],
    });
    expect(maxDifference(frame.eps, target.model.eps)).toBeLessThan(1e-12);
    expect(maxDifference(start.eps, base.model.eps)).toBe(0);
    expect(start.interactionScale).toBe(1);
    expect([...start.hopScale]).toEqual([1, 1, 1]);
  });
});

describe('evolution plan', () => {
  it('names a quench at t = 0 and keeps output, snapshot and frame times on one grid', () => {
    const input = {
      ...hubbardBase,
      evolution: { duration: 2, outputEvery: 0.25, ramps: [{ path: 'hubbard.hopping', points: [[0, 0.02], [1, 0.05]] }], snapshots: { times: [0.3, 2] }, animationFrames: 4 },
    } as ScenarioInput;
    const plan = evolutionPlan(resolved(input));
    expect(plan.quenches.map((q) => q.path)).toEqual(['hubbard.hopping']);
    expect(plan.warnings.some((w) => w.code === 'quench-at-start')).toBe(true);
    expect(plan.outputTimes[0]).toBe(0);
    expect(plan.outputTimes[plan.outputTimes.length - 1]).toBe(2);
    for (const t of [...plan.snapshotTimes, ...plan.frameTimes]) expect(plan.outputTimes).toContain(t);
    expect(plan.frameTimes.length).toBe(4);
    expect(plan.timeUnit).toBe('ħ/U');
    // h f = U is 1/(2 pi) cycles per hbar/U
    expect(plan.cyclesOf(1)).toBeCloseTo(1 / (2 * Math.PI), 15);
    const lab = evolutionPlan(resolved({ ...labBase, evolution: { duration: 1 } } as ScenarioInput));
    expect(lab.timeUnit).toBe('ms');
    expect(lab.cyclesOf(1000)).toBeCloseTo(1, 12); // 1 kHz = 1 cycle per ms
    expect(lab.quenches).toEqual([]);
  });
});

describe('time-of-flight visibility of a complex order parameter', () => {
  it('is unchanged by a global phase and lowered by dephasing between sites', () => {
    const base = resolved({ ...hubbardBase, lattice: { shape: [16, 16] }, disorder: undefined, landscape: undefined } as ScenarioInput);
    const camera = evolveCamera(base);
    const n = 256;
    const phiRe = new Float64Array(n);
    const phiIm = new Float64Array(n);
    const density = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const x = Math.floor(i / 16) - 7.5;
      const y = (i % 16) - 7.5;
      const amplitude = Math.exp(-(x * x + y * y) / 40);
      phiRe[i] = amplitude;
      density[i] = amplitude * amplitude + 0.05;
    }
    const v0 = camera.visibility(phiRe, phiIm, density);
    const alpha = 0.7;
    const rotatedRe = phiRe.map((p) => p * Math.cos(alpha));
    const rotatedIm = phiRe.map((p) => p * Math.sin(alpha));
    expect(Math.abs(camera.visibility(rotatedRe, rotatedIm, density) - v0)).toBeLessThan(1e-12);
    // a site-dependent phase (the trap's dephasing after a quench): the peaks wash out
    const dephasedRe = phiRe.map((p, i) => p * Math.cos(0.9 * i * i));
    const dephasedIm = phiRe.map((p, i) => p * Math.sin(0.9 * i * i));
    expect(v0).toBeGreaterThan(0.5);
    expect(camera.visibility(dephasedRe, dephasedIm, density)).toBeLessThan(0.5 * v0);
  });
});

describe('spectrum frequency grids', () => {
  it('evenly spaced, both ends included; --modulation-frequencies ranges refused when reversed or a single point spans a range', () => {
    // (1.5 - 0.5) / 4 = 0.25 apart, counted by hand
    expect(evenlySpacedFrequencies(0.5, 1.5, 5)).toEqual([0.5, 0.75, 1, 1.25, 1.5]);
    expect(evenlySpacedFrequencies(0.7, 0.7, 1)).toEqual([0.7]);
    expect(modulationFrequencyGrid(1, 2, 3)).toEqual([1, 1.5, 2]);
    expect(() => modulationFrequencyGrid(2, 1, 5)).toThrow('--modulation-frequencies: expected from <= to, got 2 and 1');
    expect(() => modulationFrequencyGrid(1, 2, 1)).toThrow('--modulation-frequencies: one frequency needs from = to (or give it alone)');
  });
});

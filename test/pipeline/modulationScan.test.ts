// The modulation spectrum of the loaded cloud (src/pipeline/modulationScan.ts) on a uniform
// periodic 2x2 lattice, against outside references:
// - linear response of a driven system (Kubo; Fermi golden rule): at small amplitude A the
//   energy absorbed in a time T grows as A^2, and a drive at the k = 0 amplitude mode of the
//   linearised Gutzwiller equations (test/dynamics/linearisedSpectrum.ts: the formula alone,
//   diagonalised with ml-matrix) absorbs far more than one detuned by the resolution 1/T,
//   where the sinc^2 line shape of a resonance driven for T has its first zero;
// - the unmodulated reference of a stationary state changes nothing (closed evolution:
//   energy conserved);
// - a mean-field Mott insulator (phi = 0) absorbs nothing: with phi = 0 every site's mean
//   field vanishes for any J(t), so each site stays in its Fock state (the caveat of the module).
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runModulationScan } from '../../src/pipeline/modulationScan.js';
import { evolutionPlan } from '../../src/pipeline/evolutionPlan.js';
import { groundState } from '../../src/pipeline/evolveGround.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { createSerialRunner } from '../../src/dynamics/dynamicsRunner.js';
import { linearisedFrequencies } from '../dynamics/linearisedSpectrum.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-modulation-scan-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const integrator = { absoluteTolerance: 1e-11, relativeTolerance: 1e-11 };

/** Start, frame and plan of a 2x2 uniform periodic lattice at J and mu = 0.5 U, with a hopping-modulation spectrum. */
async function setup(name: string, hopping: number, spectrum: Record<string, unknown>) {
  const path = join(dir, `${name}.json`);
  const body = {
    name,
    energyUnit: 'U',
    lattice: { shape: [2, 2], boundary: 'periodic' },
    hubbard: { hopping },
    particles: { chemicalPotential: 0.5 },
    truncation: { nmax: 6, automatic: false },
    evolution: { duration: 0, spectrum: { path: 'hubbard.hopping', ...spectrum }, integrator },
  };
  writeFileSync(path, JSON.stringify(body));
  const { resolved } = prepareScenario(path);
  const plan = evolutionPlan(resolved);
  const start = await groundState({ resolved, model: resolved.model, chemical: { kind: 'mu', mu: 0.5 }, automaticTruncation: false, pool: null, threads: 1 });
  const frame = frameFromModel(start.outcome.model, { mu: 0.5, rate: plan.rate });
  const scan = (duration: number) =>
    runModulationScan({ plan, start: start.amplitudes.state, frame, runner: createSerialRunner(frame), geometry: resolved.geometry, atTime: 0, duration, integrator: plan.integrator, shellFilling: null });
  return { start, frame, plan, scan };
}

describe('runModulationScan', () => {
  it('superfluid: absorption as A^2, resonant at the amplitude mode, nothing in the unmodulated reference', async () => {
    const J = 0.05;
    const first = await setup('probe', J, { frequencies: [1], relativeAmplitude: 0.01 });
    const S = 7;
    const c0 = new Float64Array(S);
    for (let n = 0; n < S; n++) c0[n] = first.start.amplitudes.state.amplitudes[2 * n];
    const omega = linearisedFrequencies(c0, 1, J, 0.5, 4, 4)[0]; // hbar omega in U: the h f to give
    const T = 40;
    const detuned = omega + (2 * Math.PI) / T; // the first zero of sinc^2 (as h f)
    const weak = await setup('weak', J, { frequencies: [omega, detuned], relativeAmplitude: 0.005 });
    const strong = await setup('strong', J, { frequencies: [omega], relativeAmplitude: 0.01 });
    const epsBefore = Float64Array.from(weak.frame.eps);
    const a = await weak.scan(T);
    const b = await strong.scan(T);
    expect(a.points.every((p) => p.status === 'done')).toBe(true);
    const resonant = a.points[0].energyAbsorbed;
    expect(resonant).toBeGreaterThan(0);
    expect(Math.abs(b.points[0].energyAbsorbed / resonant / 4 - 1)).toBeLessThan(0.03);
    expect(a.points[1].energyAbsorbed).toBeLessThan(0.05 * resonant);
    expect(a.points[0].energyAbsorbedPerAtom).toBeCloseTo(resonant / a.start.atoms, 15);
    expect(Math.abs(a.reference.energyChange)).toBeLessThan(1e-9);
    expect(Math.abs(a.reference.doublonsChange)).toBeLessThan(1e-9);
    expect(a.duration).toBe(T);
    expect(a.relativeAmplitude).toBe(0.005);
    expect(Array.from(weak.frame.eps)).toEqual(Array.from(epsBefore));
  });

  it('mean-field Mott insulator: no energy absorbed, no doublons created', async () => {
    // zJ/U = 0.08 at mu = 0.5 U: inside the n = 1 lobe (its tip is at zJ/U = 0.172)
    const mott = await setup('mott', 0.02, { frequencies: [0.5, 1, 1.5], relativeAmplitude: 0.1 });
    expect(mott.start.outcome.state.fields.phi.every((p) => Math.abs(p) < 1e-12)).toBe(true);
    const r = await mott.scan(20);
    expect(r.points).toHaveLength(3);
    for (const p of r.points) {
      expect(Math.abs(p.energyAbsorbed)).toBeLessThan(1e-12);
      expect(Math.abs(p.doublonsCreated)).toBeLessThan(1e-12);
    }
  });

  it('a plan without a spectrum is refused', async () => {
    const s = await setup('none', 0.05, { frequencies: [1] });
    const plan = { ...s.plan, spectrum: null };
    await expect(
      runModulationScan({ plan, start: s.start.amplitudes.state, frame: s.frame, runner: createSerialRunner(s.frame), geometry: s.start.outcome.model.geometry, atTime: 0, duration: 1, integrator: plan.integrator, shellFilling: null }),
    ).rejects.toThrow(RangeError);
  });
});

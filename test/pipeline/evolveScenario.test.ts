// The pipeline of `evolve` (src/pipeline/evolveScenario.ts) on tiny lattices, against outside
// references:
// - quench to J = 0 (Schrodinger equation of one site, analytic): each site evolves as
//   c_n(t) = c_n(0) e^{-i E_n t}, E_n = U n(n-1)/2 - mu n, so
//   phi(t) = sum_n sqrt(n) c_{n-1} c_n e^{-i (E_n - E_{n-1}) t} and |phi(t)|^2 is written out
//   here from the start amplitudes alone (the mu term is a common phase of phi and drops out);
//   energy and atom number of the closed evolution are conserved;
// - an undriven evolution of the ground state: nothing moves (a stationary state), the energy
//   is conserved, the verdict is adiabatic with no excess energy (the reference is the same
//   ground state);
// - refusals: a thermal start, a lattice over the memory limit (message names the key);
// - timings come from the injected clock only; small lattices run on one thread.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { evolveMemoryBytes, evolveScenario, requireEvolutionSection } from '../../src/pipeline/evolveScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-evolve-scenario-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function prepared(name: string, body: Record<string, unknown>) {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 6 }, ...body }));
  return prepareScenario(path);
}

const tight = { absoluteTolerance: 1e-11, relativeTolerance: 1e-11 };
const relative = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('evolveScenario', () => {
  it('quench of a uniform superfluid to J = 0: |phi(t)|^2 follows the single-site phases exactly', async () => {
    // zJ/U = 0.2 at mu = 0.5 U: superfluid (the n = 1 lobe ends at zJ/U = 0.172)
    const p = prepared('quench', {
      lattice: { shape: [2, 2], boundary: 'periodic' },
      hubbard: { hopping: 0.05 },
      particles: { chemicalPotential: 0.5 },
      evolution: { duration: 2 * Math.PI, outputEvery: Math.PI / 8, ramps: [{ path: 'hubbard.hopping', points: [[0, 0]] }], integrator: tight, animationFrames: 0, snapshots: { count: 1 } },
    });
    let ticks = 0;
    const a = await evolveScenario(p, { threads: 2, clock: () => 1000 * ticks++ });
    expect(a.status).toBe('done');
    expect(a.plan.quenches.map((q) => q.path)).toEqual(['hubbard.hopping']);
    const S = a.start.amplitudes.state.states;
    const c = Array.from({ length: S }, (_, n) => a.start.amplitudes.state.amplitudes[2 * n]); // site 0, real start
    expect(a.start.amplitudes.state.amplitudes[1]).toBe(0);
    const phiSquared = (t: number): number => {
      let re = 0;
      let im = 0;
      for (let n = 1; n < S; n++) {
        const w = Math.sqrt(n) * c[n - 1] * c[n];
        re += w * Math.cos((n - 1) * t);
        im -= w * Math.sin((n - 1) * t);
      }
      return re * re + im * im;
    };
    const s = a.series;
    expect(s.time.length).toBe(17);
    expect(phiSquared(0)).toBeGreaterThan(0.05);
    for (let k = 0; k < s.time.length; k++) {
      expect(Math.abs(s.condensedAtoms[k] - 4 * phiSquared(s.time[k]))).toBeLessThan(1e-8);
      expect(relative(s.atoms[k], s.atoms[0])).toBeLessThan(1e-10);
      expect(s.hopping[k]).toBe(0);
    }
    // collapse at t = pi hbar/U (half the revival period h/U), revival at 2 pi
    expect(s.condensedAtoms[8]).toBeLessThan(0.2 * s.condensedAtoms[0]);
    expect(relative(s.condensedAtoms[16], s.condensedAtoms[0])).toBeLessThan(1e-8);
    expect(Math.max(...s.energy.map((e) => Math.abs(e - s.energy[0])))).toBeLessThan(1e-8);
    // one thread below the parallel threshold; every time from the injected clock (1 s per reading pair)
    expect(a.threadsUsed).toBe(1);
    expect(a.timings.startSeconds).toBe(1);
    expect(a.timings.evolveSeconds).toBe(1);
    expect(a.spectrum).toBeNull();
    expect(a.snapshots.map((x) => x.time)).toEqual([2 * Math.PI]);
  });

  it('an undriven ground state stays put; the verdict is adiabatic with no excess energy', async () => {
    const p = prepared('still', {
      lattice: { shape: [5, 5] },
      hubbard: { hopping: 0.04 },
      trap: { coefficient: 0.05 },
      particles: { chemicalPotential: 0.9 },
      evolution: { duration: 3, outputEvery: 1, integrator: tight, animationFrames: 2 },
    });
    const a = await evolveScenario(p, { threads: 1 });
    expect(a.trustworthy).toBe(true);
    expect(a.warnings.map((w) => w.code)).toEqual([]);
    const s = a.series;
    for (let k = 1; k < s.time.length; k++) {
      expect(relative(s.condensedAtoms[k], s.condensedAtoms[0])).toBeLessThan(1e-8);
      expect(Math.abs(s.energy[k] - s.energy[0])).toBeLessThan(1e-8 * Math.abs(s.energy[0]));
    }
    // atoms of the first row = the static solution's
    expect(relative(s.atoms[0], a.start.outcome.solve.totals.atoms)).toBeLessThan(1e-9);
    const v = a.verdict!;
    expect(v.adiabaticOverall).toBe(true);
    expect(Math.abs(v.excessEnergyPerAtomInScale)).toBeLessThan(1e-6);
    expect(a.frames.map((f) => f.time)).toEqual([0, 3]);
    expect(a.timings).toEqual({ startSeconds: 0, referenceSeconds: 0, evolveSeconds: 0, spectrumSeconds: 0 });
  });

  it('refuses a thermal start and a lattice above the memory limit, naming the key', async () => {
    const base = { lattice: { shape: [3, 3] }, hubbard: { hopping: 0.05 }, particles: { chemicalPotential: 0.5 }, evolution: { duration: 1 } };
    await expect(evolveScenario(prepared('warm', { ...base, temperature: { kT: 0.1 } }), { threads: 1 })).rejects.toThrow(/^temperature: evolve starts from the T = 0 ground state/);
    const need = evolveMemoryBytes(9, 6);
    // 14 copies of the state (2 S (nmax + 1) doubles) and 40 doubles per site, counted by hand
    expect(need).toBe(14 * 2 * 9 * 7 * 8 + 40 * 9 * 8);
    const refusal = evolveScenario(prepared('big', base), { threads: 1, memoryLimitBytes: need - 1 });
    await expect(refusal).rejects.toBeInstanceOf(InputError);
    await expect(evolveScenario(prepared('big2', base), { threads: 1, memoryLimitBytes: need - 1 })).rejects.toThrow(/^lattice\.shape: the evolution of 9 sites at nmax = 6/);
    const fits = await evolveScenario(prepared('fits', base), { threads: 1, memoryLimitBytes: need });
    expect(fits.status).toBe('done');
    const { evolution: _, ...still } = base;
    expect(() => requireEvolutionSection(prepared('none', still), 'x.json')).toThrow(/^evolution: x\.json has no "evolution" section/);
    expect(() => requireEvolutionSection(prepared('some', base), 'x.json')).not.toThrow();
  });

  it('with a spectrum section (frequencies from the options) the loaded cloud is scanned at those frequencies', async () => {
    const p = prepared('scan', {
      lattice: { shape: [2, 2], boundary: 'periodic' },
      hubbard: { hopping: 0.05 },
      particles: { chemicalPotential: 0.5 },
      evolution: { duration: 1, spectrum: { frequencies: [0.3], duration: 5, relativeAmplitude: 0.02 } },
    });
    const stages = new Set<string>();
    const a = await evolveScenario(p, { threads: 1, modulationFrequencies: [0.4, 0.6], observer: (x) => stages.add(x.stage) });
    expect(a.spectrum!.points.map((x) => x.frequency)).toEqual([0.4, 0.6]);
    expect(a.spectrum!.source).toContain('--modulation-frequencies');
    expect([...stages].sort()).toEqual(['evolve', 'reference', 'spectrum', 'start']);
  });
});

// The work of `hubbard` from option values (src/pipeline/hubbardRequest.ts): which species,
// the checks between options (messages name the option), the table and the optional depth
// estimate, refusals of the physics as InputErrors naming the parameter. Outside reference:
// the recoil energy E_r/h = h/(2 m lambda^2) of 87Rb at 1064 nm, with h exact (SI 2019),
// u = 1.66053906660e-27 kg (CODATA 2018) and m(87Rb) = 86.909180527 u (atomic mass
// evaluation; value recalled from memory).
import { describe, expect, it } from 'vitest';
import { checkHubbardRequest, hubbardSpecies, runHubbardRequest } from '../../src/pipeline/hubbardRequest.js';
import { InputError } from '../../src/scenario/inputError.js';

describe('hubbardSpecies', () => {
  it('an isotope name, a name with its scattering length replaced, or a custom mass', () => {
    expect(hubbardSpecies({ species: '87Rb' })).toBe('87Rb');
    expect(hubbardSpecies({ species: '87Rb', scatteringBohr: 100 })).toEqual({ name: '87Rb', scatteringLengthBohr: 100 });
    expect(hubbardSpecies({ species: '87Rb', massU: 40, scatteringBohr: 60 })).toEqual({ massU: 40, scatteringLengthBohr: 60 });
  });
  it('refuses a mass without a scattering length and no species at all', () => {
    expect(() => hubbardSpecies({ massU: 40 })).toThrow('--scattering-bohr: required with --mass-u; give the s-wave scattering length in Bohr radii');
    expect(() => hubbardSpecies({})).toThrow(InputError);
    expect(() => hubbardSpecies({ scatteringBohr: 100 })).toThrow(/^--species: give an isotope name/);
  });
});

describe('runHubbardRequest', () => {
  const base = { species: '87Rb', wavelengthNm: 1064, depthsEr: [10, 20], axes: 3 as const };

  it('one row per depth with the recoil energy h/(2 m lambda^2); no estimate without a power', () => {
    const r = runHubbardRequest(base);
    expect(r.rows.map((x) => x.depthEr)).toEqual([10, 20]);
    const h = 6.62607015e-34;
    const m = 86.909180527 * 1.6605390666e-27;
    const recoilHz = h / (2 * m * (1064e-9) ** 2);
    for (const row of r.rows) expect(Math.abs(row.recoilHz / recoilHz - 1)).toBeLessThan(1e-6);
    // deeper lattice: smaller J, larger U
    expect(r.rows[1].JHz).toBeLessThan(r.rows[0].JHz);
    expect(r.rows[1].UHz).toBeGreaterThan(r.rows[0].UHz);
    expect(r.power).toBeNull();
  });

  it('with a beam power: a depth estimate', () => {
    const r = runHubbardRequest({ ...base, powerW: 0.5, waistUm: 100 });
    expect(r.power!.depthEr).toBeGreaterThan(0);
  });

  it('checks between options, and the physics refusals as InputErrors naming the parameter', () => {
    expect(() => checkHubbardRequest({ ...base, axes: 2 })).toThrow('--confinement-hz: a 2-axis lattice needs the trap frequency along the other 1 axis/axes');
    expect(() => checkHubbardRequest({ ...base, axes: 1, confinementHz: 1000 })).not.toThrow();
    expect(() => checkHubbardRequest({ ...base, powerW: 1 })).toThrow(/^--waist-um: required with --power-w/);
    expect(() => runHubbardRequest({ ...base, species: 'Unobtainium' })).toThrow(InputError);
    expect(() => runHubbardRequest({ ...base, species: 'Unobtainium' })).toThrow(/^species: unknown species "Unobtainium"/);
  });

  it('a layer: U scales as 1/l_z = sqrt(m omega_z/hbar) with the transverse confinement, J does not change', () => {
    const layer = runHubbardRequest({ ...base, axes: 2, confinementHz: 30_000 });
    const weak = runHubbardRequest({ ...base, axes: 2, confinementHz: 3_000 });
    // U = g int |w|^4 factorises; the transverse harmonic ground state gives int |psi_z|^4 dz = 1/(sqrt(2 pi) l_z)
    // (a Gaussian integral), so ten times the frequency gives sqrt(10) times U
    expect(Math.abs(layer.rows[0].UHz / weak.rows[0].UHz / Math.sqrt(10) - 1)).toBeLessThan(1e-9);
    expect(layer.rows[0].JHz).toBeCloseTo(weak.rows[0].JHz, 6); // J lives along the lattice axes only
  });
});

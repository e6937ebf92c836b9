// The `--fit` request check (src/pipeline/compareFitParameters.ts): each known name sets its
// flag and nothing else, bounds are kept in the request's unit, and every bad request is an
// InputError (exit 2) that names the parameter and says what to change: an empty list, an
// unknown name, a name twice, two names for one parameter (atoms/mu, temperature/entropy),
// bounds out of order, bounds on entropy. The reported units are checked row by row.
import { describe, expect, it } from 'vitest';
import { FIT_PARAMETER_NAMES, reportedUnit, selectFitParameters, type FitParameterName, type ReportedName } from '../../src/pipeline/compareFitParameters.js';
import { InputError } from '../../src/scenario/inputError.js';

function refusal(run: () => unknown): InputError {
  try {
    run();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('expected an InputError, got none');
}

describe('selectFitParameters', () => {
  it('sets exactly the named flags, one name at a time', () => {
    for (const name of FIT_PARAMETER_NAMES) {
      const s = selectFitParameters([name]);
      for (const other of FIT_PARAMETER_NAMES) expect(s[other], `${name} -> ${other}`).toBe(other === name);
      expect(s.bounds).toEqual({});
    }
  });

  it('combines names and keeps the bounds given, one-sided ones too', () => {
    const s = selectFitParameters(['atoms', { name: 'temperature', lower: 0.01, upper: 0.5 }, { name: 'angle', lower: -3 }, { name: 'psf', upper: 2 }, 'offset']);
    expect([s.atoms, s.mu, s.temperature, s.entropy, s.trap, s.angle, s.psf, s.offset]).toEqual([true, false, true, false, false, true, true, true]);
    expect(s.bounds).toEqual({ temperature: { lower: 0.01, upper: 0.5 }, angle: { lower: -3 }, psf: { upper: 2 } });
    expect('lower' in (s.bounds.psf ?? {})).toBe(false);
    // a request object with no bounds is the same as the bare name
    expect(selectFitParameters([{ name: 'trap' }])).toEqual(selectFitParameters(['trap']));
  });

  it('refuses an empty list, an unknown name and a name given twice', () => {
    expect(refusal(() => selectFitParameters([])).message).toMatch(/--fit: name at least one parameter/);
    const unknown = refusal(() => selectFitParameters(['atoms', 'hopping' as FitParameterName]));
    expect(unknown.message).toContain('"hopping" cannot be fitted');
    for (const name of FIT_PARAMETER_NAMES) expect(unknown.message).toContain(name);
    const twice = refusal(() => selectFitParameters(['psf', 'atoms', { name: 'psf', lower: 0 }]));
    expect(twice.message).toContain('"psf" is named twice');
  });

  it('refuses two names for one parameter, in either order', () => {
    for (const list of [['atoms', 'mu'], ['mu', 'atoms']] as FitParameterName[][]) {
      expect(refusal(() => selectFitParameters(list)).message).toMatch(/atoms and mu are the same parameter.*name one of them/);
    }
    for (const list of [['temperature', 'entropy'], ['entropy', 'temperature']] as FitParameterName[][]) {
      expect(refusal(() => selectFitParameters(list)).message).toMatch(/temperature and entropy are the same parameter.*name one of them/);
    }
  });

  it('refuses bounds out of order or equal, and bounds on entropy', () => {
    for (const [lower, upper] of [[2, 1], [1, 1], [NaN, 1]]) {
      const e = refusal(() => selectFitParameters([{ name: 'trap', lower, upper }]));
      expect(e.message).toContain('bounds of trap');
      expect(e.message).toContain('lower < upper');
      expect(e.message).toContain(`${lower}:${upper}`);
    }
    // One-sided NaN: no order to check, so it is refused on its own (it would remove the bound).
    for (const bounds of [{ lower: NaN }, { upper: NaN }]) {
      const e = refusal(() => selectFitParameters([{ name: 'trap', ...bounds }]));
      expect(e.message).toMatch(/(lower|upper) bound of trap is not a number/);
    }
    for (const bounds of [{ lower: 0.1 }, { upper: 2 }, { lower: 0.1, upper: 2 }]) {
      const e = refusal(() => selectFitParameters([{ name: 'entropy', ...bounds }]));
      expect(e.message).toMatch(/entropy .*no bounds of its own.*temperature=lower:upper/);
    }
  });
});

describe('reportedUnit', () => {
  it('gives each reported row its unit, the energy and length units where they apply', () => {
    const expected: Record<ReportedName, string> = {
      atoms: 'atoms',
      mu: 'Hz',
      kT: 'Hz',
      entropyPerAtom: 'k_B per atom',
      trapFrequencyFactor: 'factor on the scenario trap frequencies',
      centreXPixels: 'pixels of the given frame',
      centreYPixels: 'pixels of the given frame',
      angleDeg: 'degrees',
      psfSigma: 'um',
      offset: 'atoms per pixel',
    };
    for (const [name, unit] of Object.entries(expected)) expect(reportedUnit(name as ReportedName, 'Hz', 'um'), name).toBe(unit);
    expect(reportedUnit('kT', 'J', 'sites')).toBe('J');
    expect(reportedUnit('psfSigma', 'J', 'sites')).toBe('sites');
  });
});

// The species table (src/physics/species.ts), checked against facts outside it:
// - an atomic mass lies within 0.15 u of the mass number in the name (the mass defect of these
//   isotopes is below 0.1 u; e.g. 133Cs 132.905 u, IUPAC; common practice);
// - in every alkali the P_1/2 level lies below P_3/2, so the D1 line has the longer wavelength
//   (fine-structure ordering of the alkalis, e.g. Steck's D-line tables; common practice);
// - the species the file's header names as Feshbach-tuned (85Rb, 39K, 7Li, 133Cs) carry no
//   scattering length and a note saying what to give;
// - 174Yb: 5.55 nm = 104.9 a_0 (Kitagawa et al., PRA 77, 012719 (2008)), with the Bohr radius
//   5.29177210903e-11 m (CODATA 2018) written out here.
import { describe, expect, it } from 'vitest';
import { resolveSpecies, speciesNames, speciesTable } from '../../src/physics/species.js';

describe('species table', () => {
  it('masses sit at the mass number of each name', () => {
    for (const s of speciesTable) {
      const massNumber = Number(/^(\d+)/.exec(s.name)![1]);
      expect(Math.abs(s.massU - massNumber), s.name).toBeLessThan(0.15);
    }
  });

  it('D1 has the longer wavelength than D2 in every alkali, and both lines have a width', () => {
    const alkalis = speciesTable.filter((s) => s.dLines !== undefined).map((s) => s.name);
    expect(alkalis).toEqual(['87Rb', '85Rb', '39K', '41K', '23Na', '7Li', '133Cs']);
    for (const s of speciesTable) {
      if (!s.dLines) continue;
      expect(s.dLines.d1.wavelengthNm, s.name).toBeGreaterThan(s.dLines.d2.wavelengthNm);
      expect(s.dLines.d1.linewidthMHz).toBeGreaterThan(1);
      expect(s.dLines.d2.linewidthMHz).toBeGreaterThan(1);
      expect(s.dLines.source.length).toBeGreaterThan(20);
    }
  });

  it('the Feshbach-tuned species carry no scattering length and say what to give', () => {
    const tuned = speciesTable.filter((s) => s.feshbachTunable).map((s) => s.name);
    expect(tuned).toEqual(['85Rb', '39K', '7Li', '133Cs']);
    for (const s of speciesTable.filter((r) => r.feshbachTunable)) {
      expect(s.scatteringLengthBohr).toBeNull();
      expect(s.note).toContain('give scatteringLengthBohr for your magnetic field');
    }
    expect(() => resolveSpecies('39K')).toThrow(/give scatteringLengthBohr for your magnetic field/);
    expect(speciesNames()).toContain('88Sr');
  });

  it('174Yb: 5.55 nm in Bohr radii', () => {
    const yb = resolveSpecies('Yb174');
    expect(yb.scatteringLengthBohr).toBeCloseTo(5.55e-9 / 5.29177210903e-11, 6);
    expect(yb.scatteringLengthBohr).toBeCloseTo(104.9, 0);
    expect(yb.source).toContain('Atomic Mass Evaluation AME2016');
  });
});

// Bosonic isotopes commonly loaded into optical lattices: mass, s-wave scattering length, and
// for the alkalis the D1/D2 line data used by the optional depth-from-power estimate.
//
// Every number carries its source. "recalled from memory" marks a value written down from
// memory of the cited reference and not re-checked against it while this table was made:
// check it before relying on it for anything beyond a few per cent.
//
// Choices:
// - The scattering length is the one for the internal state usually loaded into lattices, at
//   the magnetic field usually used. Where that state has a negative or strongly
//   field-dependent scattering length (85Rb, 39K, 7Li, 133Cs) or one near zero (88Sr), the
//   table holds no value (scatteringLengthBohr = null): the experiment sets a_s with a
//   Feshbach resonance, so the user must give the value for their field
//   ({ name: '39K', scatteringLengthBohr: 150 }).
// - Dipolar lanthanides (164Dy, 168Er) are left out on purpose: their dipole-dipole length
//   (about 66 a_0 for Er, 131 a_0 for Dy) is comparable to a_s, so a contact-only U and
//   nearest-neighbour Bose-Hubbard model would mislead. They can still be given inline by
//   mass and scattering length, at the user's own risk.

import { atomicMassUnitKg, bohrRadiusM } from './constants.js';
import { ParameterError } from './parameterError.js';

/** One D line of an alkali atom (ground S_1/2 to P_J). */
export interface AlkaliLine {
  /** Vacuum wavelength of the line centre, nm. */
  wavelengthNm: number;
  /** Natural linewidth Gamma / (2 pi), MHz (Gamma is the decay rate of the excited level). */
  linewidthMHz: number;
}

/** D1 (P_1/2) and D2 (P_3/2) lines of an alkali, with the source of the numbers. */
export interface AlkaliDLines {
  d1: AlkaliLine;
  d2: AlkaliLine;
  source: string;
}

export interface SpeciesRecord {
  /** Table name, mass number first: '87Rb'. */
  name: string;
  massU: number;
  massSource: string;
  /** s-wave scattering length in Bohr radii, or null when the user must supply it. */
  scatteringLengthBohr: number | null;
  scatteringLengthSource: string;
  /** Internal state and field the scattering length refers to. */
  state: string;
  /** True when experiments normally tune a_s with a magnetic Feshbach resonance. */
  feshbachTunable: boolean;
  dLines?: AlkaliDLines;
  note?: string;
}

const steckRb87 =
  'D. A. Steck, "Rubidium 87 D Line Data" (steck.us/alkalidata), tables of D1/D2 optical properties; recalled from memory';
const steckRb85 =
  'D. A. Steck, "Rubidium 85 D Line Data" (steck.us/alkalidata); recalled from memory';
const tieckeK =
  'T. G. Tiecke, "Properties of Potassium" (v1.02, 2011), D-line tables; recalled from memory. ' +
  'Independent check: Banerjee & Natarajan, Phys. Rev. A 70, 052505 (2004) give the 39K D2 line at ' +
  '391 015 578.040 MHz (766.7021 nm), 2 ppm from the value used here, irrelevant at dipole-trap detunings';
const ciaawMass = (element: string, value: string): string => `IUPAC CIAAW isotopic data for ${element} (ciaaw.org/${element}.htm): ${value}`;
const tieckeMass = (value: string): string => `T. G. Tiecke, "Properties of Potassium" (v1.02, 2011), Table 1: ${value}`;
const ame2016Mass = 'Atomic Mass Evaluation AME2016 (Wang et al., Chinese Phys. C 41, 030003 (2017)); recalled from memory';
const steckLines = (element: string): string => `D. A. Steck, "${element} D Line Data" (steck.us/alkalidata); recalled from memory`;
const fieldNote = 'give scatteringLengthBohr for your magnetic field';

/** D1 and D2 lines from [vacuum wavelength nm, linewidth MHz] each. */
function dLines(d1: readonly [number, number], d2: readonly [number, number], source: string): AlkaliDLines {
  return { d1: { wavelengthNm: d1[0], linewidthMHz: d1[1] }, d2: { wavelengthNm: d2[0], linewidthMHz: d2[1] }, source };
}

/** One row of the table, its fields in SpeciesRecord's order. */
function species(
  name: string,
  massU: number,
  massSource: string,
  scatteringLengthBohr: number | null,
  scatteringLengthSource: string,
  state: string,
  feshbachTunable: boolean,
  extra: { dLines?: AlkaliDLines; note?: string } = {},
): SpeciesRecord {
  return {
    name, massU, massSource, scatteringLengthBohr, scatteringLengthSource, state, feshbachTunable,
    ...(extra.dLines ? { dLines: extra.dLines } : {}),
    ...(extra.note !== undefined ? { note: extra.note } : {}),
  };
}

/** The species table. Keys are the table names. */
export const speciesTable: readonly SpeciesRecord[] = [
  species('87Rb', 86.90918053, ciaawMass('rubidium', '86.909 180 53 Da'), 100.4,
    'Egorov et al., Phys. Rev. A 87, 053614 (2013): a(|1,-1>) = 100.40(10) a_0; recalled from memory',
    '|F=1, mF=-1> (|1,+1> has the same value at low field)', false,
    { dLines: dLines([794.978851156, 5.75], [780.241209686, 6.0666], steckRb87) }),
  species('85Rb', 84.91178974, ciaawMass('rubidium', '84.911 789 74 Da'), null,
    'background a_s about -443 a_0 for |2,-2> (Claussen et al., Phys. Rev. A 67, 060701(R) (2003)); ' +
      'recalled from memory. Negative at zero field: a stable lattice gas needs the Feshbach resonance near 155 G',
    '|F=2, mF=-2>, tuned near 155 G', true,
    { dLines: dLines([794.979014933, 5.75], [780.241368271, 6.0666], steckRb85), note: `attractive at zero field; ${fieldNote}` }),
  species('39K', 38.96370668, tieckeMass('38.963 706 68(20) u'), null,
    'zero-field a_s is "naturally small and negative" (Roati et al., "39K Bose-Einstein condensate with ' +
      'tunable interactions", Phys. Rev. Lett. 99, 010403 (2007)); about -30 a_0 for |1,1> (recalled from ' +
      'memory). Lattice experiments tune it with the resonance near 402 G (D\'Errico et al., New J. Phys. 9, ' +
      '223 (2007), recalled from memory)',
    '|F=1, mF=1>, tuned near 402 G', true,
    { dLines: dLines([770.108385049, 5.956], [766.700921822, 6.035], tieckeK), note: `Feshbach-tuned; ${fieldNote}` }),
  species('41K', 40.96182576, tieckeMass('40.961 825 76(21) u'), 62,
    'about 62 a_0 for |1,1> at low field, from the singlet/triplet potentials of Falke et al., ' +
      'Phys. Rev. A 78, 012503 (2008) (triplet 60.54 a_0, singlet 85.53 a_0); recalled from memory, ' +
      'uncertain at the 5 per cent level',
    '|F=1, mF=1>, low field', false,
    { dLines: dLines([770.108136507, 5.956], [766.700674872, 6.035], tieckeK) }),
  species('23Na', 22.98976928, 'IUPAC standard atomic weight of sodium (monoisotopic), 22.989 769 28(2); recalled from memory', 54.54,
    'Knoop, Schuster, Scelle, Trautmann, Appmeier, Oberthaler, Tiesinga, Tiemann, "Feshbach spectroscopy and ' +
      'analysis of the interaction potentials of ultracold sodium", Phys. Rev. A 83, 042704 (2011), arXiv:1102.0572 ' +
      '(paper, authors and scope checked: ground-state potentials refitted to Feshbach resonances measured in ' +
      '|1,1>, scattering lengths derived): a(|1,1>) = 54.54(20) a_0, recalled from memory, not re-read in the paper ' +
      '(with a_singlet = 18.82(80) a_0 and a_triplet = 64.30(40) a_0, also recalled from memory). At zero field ' +
      '|1,1> and |1,-1> pairs are both the total-F = 2 channel of two f = 1 atoms, so they share this value. ' +
      'Replaces 55.4(1.2) a_0 of van Abeelen & Verhaar, Phys. Rev. A 59, 578 (1999), within its error bar (U 1.6 % lower)',
    '|F=1, mF=+1> or |F=1, mF=-1> at low field (the same value at zero field)', false,
    { dLines: dLines([589.7558147, 9.765], [589.1583264, 9.7946], steckLines('Sodium')) }),
  species('7Li', 7.0160034366, ame2016Mass, null,
    'zero-field a_s of |1,1> is small and negative (about -27 a_0); recalled from memory. Experiments tune ' +
      'it with the broad resonance near 737 G (Pollack et al., Phys. Rev. Lett. 102, 090402 (2009))',
    '|F=1, mF=1>, tuned near 737 G', true,
    {
      dLines: dLines([670.976658, 5.8724], [670.96156, 5.8724],
        'D1/D2 vacuum wavelengths and the 2P lifetime (27.1 ns, McAlexander et al., Phys. Rev. A 54, R5 (1996)); ' +
          'recalled from memory. The fine-structure splitting (10 GHz) is so small that D1 and D2 act as one line'),
      note: `Feshbach-tuned; ${fieldNote}`,
    }),
  species('133Cs', 132.90545196,
    'IUPAC, "Atomic weights of the elements 2013", Pure Appl. Chem. 88, 265 (2016): caesium 132.905 451 96(6) (monoisotopic)', null,
    'a_s of |3,3> varies strongly with field (zero crossing near 17 G, a few hundred a_0 near 20-25 G; ' +
      'Kraemer et al., Appl. Phys. B 79, 1013 (2004)); recalled from memory',
    '|F=3, mF=3>, field-tuned', true,
    { dLines: dLines([894.59295986, 4.575], [852.34727582, 5.234], steckLines('Cesium')), note: `Feshbach-tuned; ${fieldNote}` }),
  species('174Yb', 173.9388664, ame2016Mass, 5.55e-9 / bohrRadiusM,
    'Kitagawa et al., "Two-color photoassociation spectroscopy of ytterbium atoms and the precise ' +
      'determinations of s-wave scattering lengths", arXiv:0708.0752, Phys. Rev. A 77, 012719 (2008): ' +
      '5.55(8) nm = 104.9(1.5) a_0',
    '1S0 ground state (no hyperfine structure, no magnetic Feshbach resonances)', false),
  species('84Sr', 83.913419, ciaawMass('strontium', '83.913 419(8) Da'), 122.7,
    'Stein, Knoeckel, Tiemann, Eur. Phys. J. D 57, 171 (2010): 122.7(3) a_0; recalled from memory', '1S0 ground state', false),
  species('88Sr', 87.90561226, ciaawMass('strontium', '87.905 612 26 Da'), null,
    'a_s is close to zero: -1 a_0 < a < 13 a_0 (Mickelson et al., arXiv:physics/0507112; ' +
      'Phys. Rev. Lett. 95, 223002 (2005), journal reference recalled from memory), ' +
      'best value about -1.4 a_0 (Stein et al., Eur. Phys. J. D 57, 171 (2010), recalled from memory)',
    '1S0 ground state', false,
    { note: 'nearly non-interacting (U close to 0); give scatteringLengthBohr explicitly if you mean it' }),
];

/** Names accepted by resolveSpecies, in table order. */
export function speciesNames(): string[] {
  return speciesTable.map((s) => s.name);
}

/** What a user may write for a species. */
export type SpeciesInput =
  | string
  | {
      /** A table name ('87Rb', 'Rb87', 'rb-87' all work). */
      name: string;
      /** Overrides the table's scattering length (e.g. a Feshbach-tuned value). */
      scatteringLengthBohr?: number;
      scatteringLengthNm?: number;
    }
  | {
      /** Free text used in summaries, e.g. 'my 87Rb with a_s = 95 a0'. */
      label?: string;
      massU: number;
      scatteringLengthBohr?: number;
      scatteringLengthNm?: number;
    };

export interface ResolvedSpecies {
  label: string;
  massU: number;
  massKg: number;
  scatteringLengthBohr: number;
  scatteringLengthM: number;
  /** Where mass and scattering length came from (table sources or 'given inline'). */
  source: string;
  /** The table row, when the species came from the table. */
  record?: SpeciesRecord;
  dLines?: AlkaliDLines;
}

function normaliseName(text: string): string {
  const compact = text.toLowerCase().replace(/[^a-z0-9]/g, '');
  // "rb87" -> "87rb"
  const m = /^([a-z]+)(\d+)$/.exec(compact);
  return m ? `${m[2]}${m[1]}` : compact;
}

/** The table row for a name, or undefined. */
export function findSpecies(name: string): SpeciesRecord | undefined {
  const key = normaliseName(name);
  return speciesTable.find((s) => normaliseName(s.name) === key);
}

function explicitScatteringLengthBohr(
  parameter: string,
  input: { scatteringLengthBohr?: number; scatteringLengthNm?: number },
): number | undefined {
  const { scatteringLengthBohr, scatteringLengthNm } = input;
  if (scatteringLengthBohr !== undefined && scatteringLengthNm !== undefined) {
    throw new ParameterError(parameter, 'give scatteringLengthBohr or scatteringLengthNm, not both');
  }
  const bohr =
    scatteringLengthNm !== undefined ? (scatteringLengthNm * 1e-9) / bohrRadiusM : scatteringLengthBohr;
  if (bohr === undefined) return undefined;
  if (!Number.isFinite(bohr) || bohr <= 0) {
    throw new ParameterError(
      parameter,
      `expected a positive (repulsive) scattering length, got ${String(
        scatteringLengthNm !== undefined ? `${scatteringLengthNm} nm` : `${scatteringLengthBohr} Bohr radii`,
      )}; the Bose-Hubbard model here needs U > 0`,
    );
  }
  if (bohr > 1e4) {
    throw new ParameterError(
      parameter,
      `scattering length ${bohr.toFixed(0)} a_0 is beyond 10^4 a_0; the single-band contact interaction does not hold there`,
    );
  }
  return bohr;
}

/**
 * Resolves a species from a table name or an inline description.
 * @param parameter name of the input field, used in error messages (e.g. 'lab.species').
 */
export function resolveSpecies(input: SpeciesInput, parameter = 'species'): ResolvedSpecies {
  if (typeof input === 'string' || 'name' in input) {
    const name = typeof input === 'string' ? input : input.name;
    const record = findSpecies(name);
    if (!record) {
      throw new ParameterError(
        parameter,
        `unknown species "${name}"; use one of ${speciesNames().join(', ')}, or give { massU, scatteringLengthBohr } inline`,
      );
    }
    const override = typeof input === 'string' ? undefined : explicitScatteringLengthBohr(parameter, input);
    const bohr = override ?? record.scatteringLengthBohr;
    if (bohr === null) {
      throw new ParameterError(
        parameter,
        `${record.name} has no usable zero-field scattering length (${record.note ?? record.scatteringLengthSource}); ` +
          `write { name: '${record.name}', scatteringLengthBohr: <value for your field> }`,
      );
    }
    return {
      label: override === undefined ? record.name : `${record.name} (a_s = ${bohr} a_0, given)`,
      massU: record.massU,
      massKg: record.massU * atomicMassUnitKg,
      scatteringLengthBohr: bohr,
      scatteringLengthM: bohr * bohrRadiusM,
      source:
        `mass: ${record.massSource}; a_s: ` +
        (override === undefined ? record.scatteringLengthSource : 'given by the user'),
      record,
      ...(record.dLines ? { dLines: record.dLines } : {}),
    };
  }
  const { massU } = input;
  if (typeof massU !== 'number' || !Number.isFinite(massU) || massU < 1 || massU > 300) {
    throw new ParameterError(`${parameter}.massU`, `expected an atomic mass from 1 to 300 u, got ${String(massU)}`);
  }
  const bohr = explicitScatteringLengthBohr(parameter, input);
  if (bohr === undefined) {
    throw new ParameterError(parameter, 'an inline species needs scatteringLengthBohr or scatteringLengthNm');
  }
  return {
    label: input.label ?? `m = ${massU} u, a_s = ${bohr.toPrecision(4)} a_0`,
    massU,
    massKg: massU * atomicMassUnitKg,
    scatteringLengthBohr: bohr,
    scatteringLengthM: bohr * bohrRadiusM,
    source: 'mass and scattering length given inline by the user',
  };
}

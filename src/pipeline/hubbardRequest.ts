// The work of `tiercake hubbard` from its option values: which species (an isotope name, or
// a custom mass with its scattering length), the checks between options, the table of
// Hubbard parameters against depth (hubbardTable.ts) and the optional depth estimate from
// beam power and waist (dipolePotential.ts). Refusals are InputErrors naming the option; a
// refusal of the physics names its parameter (species, wavelengthNm, depthEr, ...).

import { estimateLatticeDepth, type LatticeDepthEstimate } from '../physics/dipolePotential.js';
import { ParameterError } from '../physics/parameterError.js';
import type { SpeciesInput } from '../physics/species.js';
import { InputError } from '../scenario/inputError.js';
import { hubbardTable, type HubbardTableRow } from './hubbardTable.js';

/** The species the options name; --scattering-bohr overrides a named isotope's scattering length. */
export function hubbardSpecies(o: { species?: string; massU?: number; scatteringBohr?: number }): SpeciesInput {
  if (o.massU !== undefined) {
    if (o.scatteringBohr === undefined) throw new InputError('--scattering-bohr: required with --mass-u; give the s-wave scattering length in Bohr radii');
    return { massU: o.massU, scatteringLengthBohr: o.scatteringBohr };
  }
  if (o.species !== undefined) return o.scatteringBohr !== undefined ? { name: o.species, scatteringLengthBohr: o.scatteringBohr } : o.species;
  throw new InputError('--species: give an isotope name (e.g. 87Rb) or --mass-u with --scattering-bohr');
}

export interface HubbardRequest {
  species: SpeciesInput;
  wavelengthNm: number;
  depthsEr: number[];
  axes: 1 | 2 | 3;
  /** trap frequency (Hz) of every axis without a lattice; required below 3 axes */
  confinementHz?: number | undefined;
  /** beam power (W) and waist (µm) of the depth estimate; the waist is required with a power */
  powerW?: number | undefined;
  waistUm?: number | undefined;
}

export interface HubbardResult {
  rows: HubbardTableRow[];
  /** the depth the beam gives, when --power-w was set */
  power: LatticeDepthEstimate | null;
}

/** Refuse option combinations that cannot run (before any output folder is checked). */
export function checkHubbardRequest(r: HubbardRequest): void {
  if (r.axes < 3 && r.confinementHz === undefined) {
    throw new InputError(`--confinement-hz: a ${r.axes}-axis lattice needs the trap frequency along the other ${3 - r.axes} axis/axes`);
  }
  if (r.powerW !== undefined && r.waistUm === undefined) throw new InputError('--waist-um: required with --power-w; give the beam waist at the atoms in µm');
}

export function runHubbardRequest(r: HubbardRequest): HubbardResult {
  checkHubbardRequest(r);
  const confinement = r.axes < 3 ? Array<number>(3 - r.axes).fill(r.confinementHz as number) : [];
  try {
    const rows = hubbardTable({ species: r.species, wavelengthNm: r.wavelengthNm, depthsEr: r.depthsEr, latticeDimension: r.axes, confinementFrequencyHz: confinement });
    const power = r.powerW !== undefined ? estimateLatticeDepth({ species: r.species, wavelengthNm: r.wavelengthNm, powerW: r.powerW, waistUm: r.waistUm as number }) : null;
    return { rows, power };
  } catch (err) {
    // The physics names the parameter it refuses (species, wavelengthNm, depthEr, ...).
    if (err instanceof ParameterError) throw new InputError(`${err.parameter}: ${err.message.slice(err.parameter.length + 2)}`);
    throw err;
  }
}

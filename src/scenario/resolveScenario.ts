// From a validated scenario to the arrays the solver takes: lattice geometry, site
// potential, U and J, the chemical-potential and temperature modes, and the unit
// bookkeeping that lets every output state energies in the scenario's unit, in units of
// J and U and (laboratory mode) in Hz and nK.

import { createLatticeGeometry, type LatticeGeometry } from '../lattice/latticeGeometry.js';
import { addHarmonicTrap, latticeCentre } from '../lattice/harmonicTrap.js';
import type { LatticeModel } from '../lattice/latticeModel.js';
import type { ChemicalPotentialMode } from '../solver/latticeSolve.js';
import type { ThermalMode } from '../solver/runLattice.js';
import { InputError } from './inputError.js';
import { ParameterError } from '../physics/parameterError.js';
import type { Scenario } from './scenarioSchema.js';
import { resolveLaboratory, type LaboratoryParameters } from './resolveLaboratory.js';
import { internalEnergyPerUnit, type EnergyUnits, type ScenarioEnergyUnit } from './scenarioEnergyUnit.js';
import { boxDisorder } from '../lattice/boxDisorder.js';
import { grainSitesFromAperture, longitudinalGrainSitesFromAperture, speckleField } from '../lattice/speckle.js';
import { resolveLandscape, type LandscapeTermRecord } from './resolveLandscape.js';

export interface ResolvedScenario {
  scenario: Scenario;
  mode: 'hubbard' | 'laboratory';
  geometry: LatticeGeometry;
  /** the model without the truncation (set from scenario.truncation) */
  model: LatticeModel;
  chemical: ChemicalPotentialMode;
  thermal: ThermalMode;
  units: EnergyUnits;
  trapCentre: number[];
  /** trap coefficient per axis, internal energy per site^2 (0 where no trap) */
  trapCoefficient: number[];
  /** lattice spacing in micrometres (laboratory mode) */
  latticeSpacingUm: number | null;
  laboratory: LaboratoryParameters | null;
  /** the disorder part of eps (internal energy unit), or null */
  disorder: Float64Array | null;
  /** landscape terms (issue 16): a record per term, its site energies (internal unit) and warnings */
  landscape: { records: LandscapeTermRecord[]; fields: Float64Array[]; warnings: string[] };
}

export interface ResolveOptions {
  /** folder of the scenario file; landscape file paths are relative to it (default: working directory) */
  scenarioDirectory?: string;
}

function perAxisValues(v: number | number[] | undefined, dims: number, fallback: number): number[] {
  if (v === undefined) return Array(dims).fill(fallback);
  if (typeof v === 'number') return Array(dims).fill(v);
  return v.length === 1 ? Array(dims).fill(v[0]) : [...v];
}

/** Bytes the solver and the outputs need for this many sites (estimate before allocating). */
export function estimateMemoryBytes(siteCount: number, uniform: boolean, thermal = false, nmax = 6): number {
  const solverArrays = uniform ? 12 : 16;
  const outputCopies = 14; // derived fields, compressibility solves, images, npy encoding
  const spectrumStore = thermal ? 2 * (nmax + 1) : 0; // per-site eigenvalues and <j|b|j> at T > 0
  return siteCount * 8 * (solverArrays + outputCopies + spectrumStore);
}

export function resolveScenario(scenario: Scenario, options: ResolveOptions = {}): ResolvedScenario {
  const dims = scenario.lattice.shape.length;
  const boundary = scenario.lattice.boundary;
  const periodic = (Array.isArray(boundary) ? (boundary.length === 1 ? Array(dims).fill(boundary[0]) : boundary) : Array(dims).fill(boundary)).map(
    (b: string) => b === 'periodic',
  );
  // The schema has checked the shape and the periodic axes: a failure here is a bug, not input.
  const geometry: LatticeGeometry = createLatticeGeometry(scenario.lattice.shape, periodic);

  let units: EnergyUnits;
  let hopping: Array<number | Float64Array>;
  let interactionU: number | Float64Array;
  let trapCoefficient: number[];
  let latticeSpacingUm: number | null = null;
  let laboratory: LaboratoryParameters | null = null;
  const eps = new Float64Array(geometry.siteCount);

  if (scenario.hubbard) {
    const unit = (scenario.energyUnit ?? 'J') as 'J' | 'U';
    if (unit === 'J') {
      const rel = perAxisValues(scenario.hubbard.hopping, dims, 1);
      hopping = rel;
      interactionU = scenario.hubbard.interaction as number;
      units = { internal: 'J', hopping: rel[0], interaction: interactionU, hertz: null, nanokelvin: null };
    } else {
      const perAxisHopping = perAxisValues(scenario.hubbard.hopping, dims, NaN);
      hopping = perAxisHopping;
      interactionU = 1;
      units = { internal: 'U', hopping: perAxisHopping[0], interaction: 1, hertz: null, nanokelvin: null };
    }
    trapCoefficient = perAxisValues(scenario.trap?.coefficient, dims, 0);
  } else {
    laboratory = resolveLaboratory(scenario);
    hopping = laboratory.hoppingArraysHz ?? laboratory.hoppingHz;
    interactionU = laboratory.interactionArrayHz ?? laboratory.interactionHz;
    latticeSpacingUm = laboratory.latticeSpacingUm;
    units = {
      internal: 'Hz',
      hopping: laboratory.hoppingHz[0],
      interaction: laboratory.interactionHz,
      hertz: 1,
      nanokelvin: laboratory.hertzPerNanokelvin,
    };
    trapCoefficient = laboratory.trapCoefficientHz;
  }

  const trapCentre = scenario.trap?.centreSites ? [...scenario.trap.centreSites] : latticeCentre(geometry);
  if (trapCoefficient.some((k) => k > 0)) addHarmonicTrap(geometry, { coefficient: trapCoefficient, centre: trapCentre }, eps);

  const toInternal = energyParser(scenario, units);
  const disorder = scenario.disorder ? disorderField(scenario, geometry, toInternal, latticeSpacingUm, laboratory) : null;
  if (disorder) for (let i = 0; i < eps.length; i++) eps[i] += disorder[i];
  // --- landscape terms (resolveLandscape.ts): added to eps; a combined superlattice also sets J and U
  const landscape = resolveLandscape(scenario, { geometry, units, laboratory, scenarioDirectory: options.scenarioDirectory });
  if (landscape.total) for (let i = 0; i < eps.length; i++) eps[i] += landscape.total[i];
  if (landscape.hopping) hopping = hopping.map((h, d) => landscape.hopping?.[d] ?? h);
  if (landscape.interaction) interactionU = landscape.interaction;
  // --- end of landscape terms
  const chemical: ChemicalPotentialMode =
    scenario.particles.atoms !== undefined
      ? { kind: 'atoms', atoms: scenario.particles.atoms, relativeTolerance: scenario.solver.atomTolerance }
      : { kind: 'mu', mu: toInternal(scenario.particles.chemicalPotential as number, 'particles.chemicalPotential') };

  const t = scenario.temperature;
  let thermal: ThermalMode;
  if (t.entropyPerAtom !== undefined) {
    thermal = t.entropyPerAtom === 0 ? { kind: 'temperature', kT: 0 } : { kind: 'entropy', entropyPerAtom: t.entropyPerAtom, relativeTolerance: 1e-9 };
  } else if (t.nanokelvin !== undefined) {
    thermal = { kind: 'temperature', kT: t.nanokelvin * (units.nanokelvin as number) };
  } else {
    thermal = { kind: 'temperature', kT: t.kT === undefined ? 0 : toInternal(t.kT, 'temperature.kT') };
  }

  const model: LatticeModel = {
    geometry,
    nmax: scenario.truncation.nmax,
    eps,
    interactionU,
    hopping,
  };
  return {
    scenario,
    mode: scenario.hubbard ? 'hubbard' : 'laboratory',
    geometry,
    model,
    chemical,
    thermal,
    units,
    trapCentre,
    trapCoefficient,
    latticeSpacingUm,
    laboratory,
    disorder,
    landscape: { records: landscape.records, fields: landscape.fields, warnings: landscape.warnings },
  };
}

/** The disorder potential of the scenario in the internal energy unit (pure: seeded). */
function disorderField(
  scenario: Scenario,
  geometry: LatticeGeometry,
  toInternal: (value: number, field: string) => number,
  spacingUm: number | null,
  laboratory: LaboratoryParameters | null,
): Float64Array {
  const d = scenario.disorder!;
  try {
    if (d.kind === 'box') {
      return boxDisorder(geometry.siteCount, toInternal(d.width, 'disorder.width'), d.seed);
    }
    let grainSites: number;
    let longitudinal: number | undefined = d.longitudinalGrainSites;
    if (d.grainSites !== undefined) grainSites = d.grainSites;
    else if (d.grainUm !== undefined) grainSites = d.grainUm / (spacingUm as number);
    else {
      const spacingNm = (spacingUm as number) * 1000;
      grainSites = grainSitesFromAperture(d.wavelengthNm as number, d.numericalAperture as number, spacingNm);
      longitudinal ??= longitudinalGrainSitesFromAperture(d.wavelengthNm as number, d.numericalAperture as number, spacingNm);
    }
    // Without an aperture, grains are elongated by z0/r0 = 3.3/NA with NA = 0.61 lambda/r0;
    // absent any optics, take an aspect ratio typical of speckle set-ups (common practice: ~6).
    if (geometry.dims === 3) longitudinal ??= 6 * grainSites;
    const wannierWidthSites = d.wannierAverage && laboratory ? laboratory.wannierWidthSites : 0;
    return speckleField({
      shape: geometry.shape,
      grainSites,
      ...(geometry.dims === 3 ? { beamAxis: 'xyz'.indexOf(d.beamAxis), longitudinalGrainSites: longitudinal } : {}),
      wannierWidthSites,
      meanStrength: toInternal(d.meanStrength, 'disorder.meanStrength'),
      sign: d.sign,
      seed: d.seed,
    });
  } catch (err) {
    throw disorderInputError(err);
  }
}

/** Scenario keys of the disorder generators' parameters, where the names differ. */
const disorderKeyOf: Record<string, string> = { widthW: 'width' };

/**
 * The disorder generators check their parameters and throw a RangeError that starts with
 * the generator and the parameter ("speckle grainSites: ..."). Those (and ParameterErrors)
 * are values from the scenario the schema cannot judge alone: report them as input errors
 * naming the disorder key. Anything else is a bug and stays what it is.
 */
function disorderInputError(err: unknown): unknown {
  if (err instanceof ParameterError) return new InputError(`disorder.${err.parameter}: ${err.message.slice(err.parameter.length + 2)}`);
  if (!(err instanceof RangeError)) return err;
  const m = /^(?:speckle|boxDisorder) ([A-Za-z]+)(\[\d+\])?: ([^]*)$/.exec(err.message);
  if (!m) return err;
  return new InputError(`disorder.${disorderKeyOf[m[1]] ?? m[1]}${m[2] ?? ''}: ${m[3]}`);
}

/**
 * The one energy unit of a run's outputs: the scenario's own (fields, CSV columns and every
 * bare energy in summary.json use it) and the internal energy of one of it.
 */
export interface OutputEnergyUnit {
  name: ScenarioEnergyUnit;
  /** internal energy of one `name` (multiply a value in `name` by this to get the internal unit) */
  internalPerUnit: number;
}

export function outputEnergyUnit(scenario: Scenario, units: EnergyUnits): OutputEnergyUnit {
  const name: ScenarioEnergyUnit = scenario.energyUnit ?? (scenario.hubbard ? 'J' : 'Hz');
  return { name, internalPerUnit: internalEnergyPerUnit(name, units) };
}

/** Converts an energy written in the scenario's unit into the internal unit. */
export function energyParser(scenario: Scenario, units: EnergyUnits): (value: number, field: string) => number {
  const unit = outputEnergyUnit(scenario, units);
  return (value: number, field: string): number => {
    if (unit.name === 'nK' && units.nanokelvin === null) throw new InputError(`${field}: nK needs laboratory mode`);
    return value * unit.internalPerUnit;
  };
}

/** A value in the internal unit expressed in every unit system available. */
export function inAllUnits(value: number, units: EnergyUnits): Record<string, number> {
  const out: Record<string, number> = { J: value / units.hopping, U: value / units.interaction };
  if (units.hertz !== null) {
    out.Hz = value / units.hertz;
    out.kHz = value / (1000 * units.hertz);
  }
  if (units.nanokelvin !== null) out.nK = value / units.nanokelvin;
  return out;
}

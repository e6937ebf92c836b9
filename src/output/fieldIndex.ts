// What every file of a solve run holds, for summary.json "fields" (issue "every field and
// image records its unit and meaning"): the quantity, its unit, how it is laid out and
// where it comes from. Energies are in the run's one energy unit, the scenario's own
// (outputEnergyUnit in src/scenario/resolveScenario.ts), which fieldFiles also writes.
//
// Axis order: fields keep the lattice's axes. An .npy of shape (nx, ny[, nz]) has axis 0 =
// lattice x, axis 1 = y, axis 2 = z, C order (the last axis varies fastest), so element
// [x, y, z] is the site at lattice coordinates (x, y, z) counted from 0; the trap centre is
// at lattice.trapCentreSites. Camera pictures (images/*.npy) follow the camera's own
// convention, written in each picture's JSON sidecar.

import { phaseNames } from '../observables/phaseCodes.js';

export interface FieldEntry {
  file: string;
  quantity: string;
  /** unit of the values ('1' for a pure number) */
  unit: string;
  dtype: 'float64' | 'int32' | 'uint8';
  meaning: string;
  /** for label fields: value -> name */
  codes?: Record<string, string>;
}

export interface ImageEntry {
  file: string;
  meaning: string;
  /** unit of the colour scale or of the values */
  unit: string;
  /** the JSON sidecar with the scale, pixel size and orientation (camera pictures) */
  sidecar?: string;
}

export interface FieldIndexInput {
  shape: readonly number[];
  /** the run's energy unit (J, U, Hz, kHz or nK) */
  energyUnit: string;
  compressibilityComputed: boolean;
  finiteTemperature: boolean;
  /** the LDA label fields are written */
  localDensity: boolean;
  /** cluster method: the bond fields are written for these axes (indices) */
  clusterBondAxes?: readonly number[];
  /** solver.stiffness: the local superfluid fraction is written for these (periodic) axes */
  stiffnessAxes?: readonly number[];
}

const axisNames = ['x', 'y', 'z'];

const phaseLegend = Object.fromEntries(phaseNames.map((name, code) => [String(code), name]));

/** The fields/*.npy files of a solve run with their units and meaning. */
export function fieldEntries(input: FieldIndexInput): FieldEntry[] {
  const e = input.energyUnit;
  const list: FieldEntry[] = [
    { file: 'fields/density.npy', quantity: 'n_i = <n_i>', unit: 'atoms per site', dtype: 'float64', meaning: 'mean occupation of each site' },
    {
      file: 'fields/order_parameter.npy',
      quantity: 'phi_i = <b_i>',
      unit: 'sqrt(atoms per site)',
      dtype: 'float64',
      meaning: 'Gutzwiller order parameter (real, >= 0); its square is the condensate density',
    },
    { file: 'fields/condensate_density.npy', quantity: '|phi_i|^2', unit: 'atoms per site', dtype: 'float64', meaning: 'condensate density of each site' },
    {
      file: 'fields/number_variance.npy',
      quantity: '<n_i^2> - <n_i>^2',
      unit: 'atoms^2 per site',
      dtype: 'float64',
      meaning: 'on-site number fluctuations (0 in a Fock state)',
    },
    {
      file: 'fields/parity_odd.npy',
      quantity: 'P(n_i odd)',
      unit: '1 (probability)',
      dtype: 'float64',
      meaning: 'probability of an odd occupation: what a parity-projected (single-site-resolved) image shows per site',
    },
    {
      file: 'fields/entropy.npy',
      quantity: 'S_i = -Tr rho_i ln rho_i',
      unit: 'k_B per site',
      dtype: 'float64',
      meaning: input.finiteTemperature ? 'entropy of each site (mean-field, T > 0)' : 'entropy of each site (0 at T = 0)',
    },
    {
      file: 'fields/site_potential.npy',
      quantity: 'eps_i',
      unit: e,
      dtype: 'float64',
      meaning:
        `energy of one atom at site i in the run's energy unit (${e}): harmonic trap (0 at the trap centre) + disorder + landscape terms; ` +
        'it enters the Hamiltonian as (eps_i - mu) n_i, so mu - eps_i is the local chemical potential',
    },
    {
      file: 'fields/compressibility.npy',
      quantity: 'kappa_i = dn_i/dmu',
      unit: `atoms per site per ${e}`,
      dtype: 'float64',
      meaning: input.compressibilityComputed
        ? `local compressibility: change of the site density per unit change of the chemical potential (1/${e}), by central differences of two solves at mu +- dmu; multiply by U (in ${e}) for the dimensionless kappa U`
        : 'not computed (solver.compressibility is false): all zeros',
    },
    {
      file: 'fields/phase.npy',
      quantity: 'phase label',
      unit: 'code',
      dtype: 'uint8',
      meaning: 'phase of each site by the rules in summary.json phases.thresholds (codes below)',
      codes: phaseLegend,
    },
    {
      file: 'fields/mott_filling.npy',
      quantity: 'Mott filling',
      unit: 'atoms per site (integer)',
      dtype: 'int32',
      meaning: 'integer filling k of Mott-insulator sites, 0 elsewhere',
    },
  ];
  if (input.localDensity) {
    list.push(
      {
        file: 'fields/lda_phase.npy',
        quantity: 'local-density-approximation phase label',
        unit: 'code',
        dtype: 'uint8',
        meaning:
          'phase of the homogeneous lattice (same mean field, temperature and rules) at the site\'s local chemical potential mu - eps_i and its own U and J; ' +
          'where it differs from fields/phase.npy the neighbours (trap proximity, disorder) decide the phase',
        codes: phaseLegend,
      },
      {
        file: 'fields/lda_mott_filling.npy',
        quantity: 'local-density-approximation Mott filling',
        unit: 'atoms per site (integer)',
        dtype: 'int32',
        meaning: 'integer filling of sites whose local-density-approximation label is Mott insulator, 0 elsewhere',
      },
    );
  }
  for (const d of input.clusterBondAxes ?? []) {
    const a = axisNames[d];
    list.push(
      {
        file: `fields/bond_correlation_${a}.npy`,
        quantity: `<b_i^+ b_j>, j = i + e_${a}`,
        unit: 'atoms per site',
        dtype: 'float64',
        meaning:
          `nearest-neighbour one-body correlation of each bond along ${a}, stored at its lower site (NaN where there is no bond): ` +
          `exact inside a cluster (fields/bond_exact_${a}.npy = 1), the mean-field product phi_i phi_j across decoupled bonds`,
      },
      {
        file: `fields/bond_exact_${a}.npy`,
        quantity: `bond inside a cluster (${a})`,
        unit: '1 (flag)',
        dtype: 'uint8',
        meaning: `1 where the bond from site i along ${a} lies inside a cluster and is treated exactly, 0 where it is decoupled by the mean field`,
      },
    );
  }
  for (const d of input.stiffnessAxes ?? []) {
    const a = axisNames[d];
    list.push({
      file: `fields/superfluid_fraction_${a}.npy`,
      quantity: `local superfluid fraction f_b of the bond i -> i + e_${a}`,
      unit: '1',
      dtype: 'float64',
      meaning:
        `the bond's share of the twist curvature d^2 Omega/dq^2 along ${a} (the change of its current 2 J Im(e^{iq} phi_i^* phi_j) per unit twist) over the mean J (n_i + n_j) of the bonds along ${a}, ` +
        'stored at the lower site (NaN where there is no bond): where the superflow runs. The whole-lattice superfluid fraction is its plain mean; ' +
        'a clean lattice gives |phi|^2/n on every bond, puddles without superflow ~0 however large their condensate',
    });
  }
  return list;
}

/** The axis statement every field shares. */
export function fieldAxes(shape: readonly number[]): { shape: number[]; axes: string[]; order: string } {
  return {
    shape: [...shape],
    axes: shape.map((_, d) => axisNames[d]),
    order:
      `lattice axis order: the .npy shape is (${shape.map((_, d) => `n${axisNames[d]}`).join(', ')}), axis 0 = lattice x` +
      `${shape.length > 1 ? ', axis 1 = y' : ''}${shape.length > 2 ? ', axis 2 = z' : ''}; C order (last axis fastest); ` +
      `element [${shape.map((_, d) => axisNames[d]).join(', ')}] is the site at those lattice coordinates counted from 0`,
  };
}

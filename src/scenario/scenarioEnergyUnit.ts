// The energy units a scenario writes its energies in, and the internal energy of one of each.
// The solver works in one internal unit (J, U or h x 1 Hz: `EnergyUnits.internal`); every
// energy read from the scenario, from a landscape term or from the evolution section is a
// value in one of these units times the internal energy of that unit, so the mapping is
// written once here and the schema's list of units is the same list.

import * as z from 'zod';

/** The unit names a scenario accepts (`energyUnit`, a landscape term's `unit`). */
export const EnergyUnitSchema = z.enum(['J', 'U', 'Hz', 'kHz', 'nK']);

/** The scenario's energy unit (energyUnit; default J in dimensionless mode, Hz in laboratory mode). */
export type ScenarioEnergyUnit = z.output<typeof EnergyUnitSchema>;

export interface EnergyUnits {
  /** label of the internal energy unit the solver works in (J, U or Hz) */
  internal: 'J' | 'U' | 'Hz';
  /** internal energy of one J (nearest-neighbour hopping along the first axis) */
  hopping: number;
  /** internal energy of one U (at the trap centre) */
  interaction: number;
  /** internal energy of 1 Hz (h x 1 Hz), laboratory mode only */
  hertz: number | null;
  /** internal energy of k_B x 1 nK, laboratory mode only */
  nanokelvin: number | null;
}

/**
 * Internal energy of one `unit`. Hz, kHz and nK exist only in laboratory mode: without them
 * the answer is NaN, and a caller that reads a user's value checks first and names the field.
 */
export function internalEnergyPerUnit(unit: ScenarioEnergyUnit, units: EnergyUnits): number {
  switch (unit) {
    case 'J':
      return units.hopping;
    case 'U':
      return units.interaction;
    case 'Hz':
      return units.hertz ?? NaN;
    case 'kHz':
      return 1000 * (units.hertz ?? NaN);
    case 'nK':
      return units.nanokelvin ?? NaN;
  }
}

// Energy unit conversions used when echoing results in laboratory units.
// An energy E is stored as a frequency E/h in Hz (the habit of the trade: "J = 60 Hz");
// temperature-like units use E/k_B. Constants: CODATA 2018 (constants.ts), both exact.

import { boltzmannJPerK, planckJs } from './constants.js';

/** E/h in Hz -> E/k_B in nK. */
export function hzToNanokelvin(energyHz: number): number {
  return ((energyHz * planckJs) / boltzmannJPerK) * 1e9;
}

/** E/k_B in nK -> E/h in Hz. */
export function nanokelvinToHz(energyNk: number): number {
  return ((energyNk * 1e-9 * boltzmannJPerK) / planckJs);
}

/** E/h in Hz -> E in J. */
export function hzToJoule(energyHz: number): number {
  return energyHz * planckJs;
}

/** E in J -> E/h in Hz. */
export function jouleToHz(energyJ: number): number {
  return energyJ / planckJs;
}

/** Energy in Hz expressed in units of another energy given in Hz (e.g. mu in units of U). */
export function hzToUnitsOf(energyHz: number, unitHz: number): number {
  return energyHz / unitHz;
}

/** Energy in units of unitHz (e.g. mu/U) back to Hz. */
export function unitsOfToHz(value: number, unitHz: number): number {
  return value * unitHz;
}

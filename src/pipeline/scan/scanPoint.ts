// The scenario of one scan point: the scan's axis values written as --set overrides on
// top of the user's, by dotted path.
//
// Paths that name one of a set of mutually exclusive keys replace the whole group, so a
// scan of particles.atoms runs at fixed N even when the scenario gives a chemical
// potential (and the other way round), and a scan of temperature.kT replaces an
// entropyPerAtom or nanokelvin of the scenario.
//
// The pseudo-path `characteristicDensity` (src/physics/characteristicDensity.ts) sets
// rho~ = N prod_d sqrt(V_d / J_d) with the point's own J (after the other axis is applied),
// holding one of the two fixed:
//   hold 'trap'  : the trap stays, the atom number follows, N = rho~ prod_d sqrt(J_d / V_d);
//   hold 'atoms' : the scenario's atom number stays, every trap curvature is scaled by the
//                  same factor (trap.coefficient, or trap.frequencyHz by its square root).

import { InputError } from '../../scenario/inputError.js';
import type { PreparedScenario } from '../prepareScenario.js';
import type { ResolvedScenario } from '../../scenario/resolveScenario.js';
import { atomsForCharacteristicDensity, characteristicDensity, trapScaleForCharacteristicDensity } from '../../physics/characteristicDensity.js';
import { pointValues, type ScanPlan } from './scanPlan.js';

export const CHARACTERISTIC_DENSITY = 'characteristicDensity';
export type DensityHold = 'trap' | 'atoms';

/** Groups of keys of which a scenario gives at most one. */
const EXCLUSIVE_GROUPS: Record<string, readonly string[]> = {
  particles: ['atoms', 'chemicalPotential'],
  temperature: ['kT', 'nanokelvin', 'entropyPerAtom'],
};

/** The --set text that puts `value` at `path`. */
export function overrideFor(path: string, value: number): string {
  const parts = path.split('.');
  if (parts.length === 2 && EXCLUSIVE_GROUPS[parts[0]]?.includes(parts[1])) return `${parts[0]}=${JSON.stringify({ [parts[1]]: value })}`;
  return `${path}=${String(value)}`;
}

/** The value at a dotted path of a plain object (numeric segments index lists), or undefined. */
export function valueAtPath(root: unknown, path: string): unknown {
  let node: unknown = root;
  for (const seg of path.split('.')) {
    if (node === null || typeof node !== 'object') return undefined;
    node = Array.isArray(node) ? (/^\d+$/.test(seg) ? node[Number(seg)] : undefined) : (node as Record<string, unknown>)[seg];
  }
  return node;
}

const NUMERIC_EXAMPLES = 'e.g. hubbard.hopping, trap.coefficient, particles.atoms, temperature.kT, disorder.width, landscape.0.wallHeight';

/** Refuses a path that does not hold a number in the scenario of a point. */
export function checkNumericPath(prepared: PreparedScenario, path: string): void {
  const value = valueAtPath(prepared.scenario, path);
  if (typeof value === 'number') return;
  const what = value === undefined ? 'nothing' : Array.isArray(value) ? 'a list' : typeof value === 'object' ? 'a group of keys' : `a ${typeof value}`;
  const hint = Array.isArray(value) ? `; scan one entry (${path}.0) or give one number for all axes` : '';
  throw new InputError(`--vary ${path}: the scenario holds ${what} there, not a number${hint}; scan a numeric scenario value, ${NUMERIC_EXAMPLES}`);
}

/** Hopping per axis as numbers; NaN where it varies from site to site. */
function hoppingPerAxis(resolved: ResolvedScenario): number[] {
  return resolved.model.hopping.map((h) => (typeof h === 'number' ? h : NaN));
}

/** rho~ of a resolved scenario for `atoms` atoms (NaN when it is not defined: untrapped axis, site-dependent J). */
export function characteristicDensityOf(resolved: ResolvedScenario, atoms: number): number {
  const trap = resolved.trapCoefficient;
  if (trap.some((v) => !(v > 0))) return NaN;
  return characteristicDensity(atoms, trap, hoppingPerAxis(resolved));
}

/** Characteristic length sqrt(J / V) along the first trapped axis, sites (NaN when undefined). */
export function characteristicLengthOf(resolved: ResolvedScenario): number {
  const trap = resolved.trapCoefficient;
  const d = trap.findIndex((v) => v > 0);
  if (d < 0) return NaN;
  const j = hoppingPerAxis(resolved)[d];
  return j > 0 ? Math.sqrt(j / trap[d]) : NaN;
}

function checkDensityAxis(resolved: ResolvedScenario, hold: DensityHold): void {
  const name = `--vary ${CHARACTERISTIC_DENSITY}`;
  if (resolved.trapCoefficient.some((v) => !(v > 0))) {
    throw new InputError(`${name}: needs a harmonic trap on every lattice axis (trap.coefficient or trap.frequencyHz > 0 per axis); rho~ = N (V/J)^(d/2) is not defined without it`);
  }
  if (hoppingPerAxis(resolved).some((j) => !(j > 0))) {
    throw new InputError(`${name}: the hopping varies from site to site in this scenario; rho~ needs one J per axis (switch off laboratory.envelopeVariesHubbard)`);
  }
  if (hold === 'atoms') {
    if (resolved.chemical.kind !== 'atoms') {
      throw new InputError(`--fixed atoms: the scenario gives a chemical potential; give particles.atoms (the atom number held fixed) or use --fixed trap`);
    }
    if (resolved.scenario.laboratory?.beamWaistUm !== undefined) {
      throw new InputError(`--fixed atoms: the trap includes the lattice beams' envelope (laboratory.beamWaistUm), which a change of trap.frequencyHz does not scale; use --fixed trap`);
    }
  }
}

/** The --set overrides of the characteristic-density axis at rho~, for a scenario prepared with the other axis applied. */
function densityOverrides(resolved: ResolvedScenario, rho: number, hold: DensityHold): string[] {
  checkDensityAxis(resolved, hold);
  const trap = resolved.trapCoefficient;
  const hopping = hoppingPerAxis(resolved);
  if (hold === 'trap') return [overrideFor('particles.atoms', atomsForCharacteristicDensity(rho, trap, hopping))];
  const atoms = (resolved.chemical as { atoms: number }).atoms;
  const s = trapScaleForCharacteristicDensity(rho, atoms, trap, hopping);
  const t = resolved.scenario.trap;
  const dims = resolved.geometry.dims;
  const perAxis = (v: number | number[] | undefined): number[] => (v === undefined ? [] : typeof v === 'number' ? Array(dims).fill(v) : v.length === 1 ? Array(dims).fill(v[0]) : v);
  if (resolved.mode === 'hubbard') return [`trap.coefficient=${JSON.stringify(perAxis(t?.coefficient).map((k) => k * s))}`];
  return [`trap.frequencyHz=${JSON.stringify(perAxis(t?.frequencyHz).map((f) => f * Math.sqrt(s)))}`];
}

/** The overrides of a point's direct axes (everything but the characteristic density). */
export function directOverrides(plan: ScanPlan, point: number): string[] {
  const values = pointValues(plan, point);
  return plan.axes.flatMap((a, k) => (a.path === CHARACTERISTIC_DENSITY ? [] : [overrideFor(a.path, values[k])]));
}

export interface PointScenario {
  prepared: PreparedScenario;
  /** the overrides added for this point (after the user's --set) */
  overrides: string[];
}

/**
 * The scenario of point `point`. `prepare(extra)` loads the scenario with the user's
 * overrides followed by `extra` (the command line passes prepareScenario with the file).
 */
export function scenarioOfPoint(plan: ScanPlan, point: number, hold: DensityHold, prepare: (extra: readonly string[]) => PreparedScenario): PointScenario {
  const values = pointValues(plan, point);
  const direct: string[] = [];
  let rho: number | null = null;
  for (let a = 0; a < plan.axes.length; a++) {
    if (plan.axes[a].path === CHARACTERISTIC_DENSITY) rho = values[a];
    else direct.push(overrideFor(plan.axes[a].path, values[a]));
  }
  let prepared = prepare(direct);
  for (const axis of plan.axes) if (axis.path !== CHARACTERISTIC_DENSITY) checkNumericPath(prepared, axis.path);
  if (rho === null) return { prepared, overrides: direct };
  const overrides = [...direct, ...densityOverrides(prepared.resolved, rho, hold)];
  prepared = prepare(overrides);
  return { prepared, overrides };
}

/** Refuses a second axis that fights the characteristic-density axis over the same key. */
export function checkAxisCombination(paths: readonly string[], hold: DensityHold): void {
  if (!paths.includes(CHARACTERISTIC_DENSITY)) return;
  const other = paths.find((p) => p !== CHARACTERISTIC_DENSITY);
  if (other === undefined) return;
  const clash = hold === 'trap' ? other.startsWith('particles.') : other.startsWith('trap.');
  if (clash) {
    throw new InputError(
      `--vary ${other}: with --vary ${CHARACTERISTIC_DENSITY} and --fixed ${hold} the ${hold === 'trap' ? 'atom number' : 'trap'} already follows rho~; ` +
        `scan ${hold === 'trap' ? 'the trap' : 'the atom number'} instead, or use --fixed ${hold === 'trap' ? 'atoms' : 'trap'}`,
    );
  }
}

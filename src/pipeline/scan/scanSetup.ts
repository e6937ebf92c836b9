// The scan a command describes, checked against the scenario before any work: the plan
// (axes, chains, realisations), the characteristic-density hold, the base scenario, and
// every point's scenario validated, so that a value the schema refuses at point 17 is
// reported before the first solve. Shared by `scan` and `submit --scan`; takes the
// options' values already parsed (the --vary axes), and names the options in its errors.

import { prepareScenario, type PreparedScenario } from '../prepareScenario.js';
import { loadScenario } from '../../scenario/loadScenario.js';
import { scenarioHash } from '../../scenario/scenarioHash.js';
import { InputError } from '../../scenario/inputError.js';
import { DEFAULT_CHAIN_LENGTH, MAX_REALISATIONS_PER_POINT, planScan, pointValues, type ScanAxis, type ScanPlan } from './scanPlan.js';
import { CHARACTERISTIC_DENSITY, checkAxisCombination, checkNumericPath, directOverrides, scenarioOfPoint, valueAtPath, type DensityHold } from './scanPoint.js';

export interface ScanSetup {
  plan: ScanPlan;
  hold: DensityHold;
  base: PreparedScenario;
  prepare: (extra: readonly string[]) => PreparedScenario;
  /** SHA-256 of the base scenario (the scan's identity hash is src/output/scanIdentity.ts's) */
  scenarioHash: string;
  keepPoints: boolean;
}

/** The values of --fixed, --chain-length, --realisations, --keep-points and --set (undefined: not given). */
export interface ScanChoices {
  fixed?: string;
  chainLength?: number;
  realisations?: number;
  keepPoints?: boolean;
  set?: string[];
}

export function scanSetup(scenarioPath: string, axes: readonly ScanAxis[], o: ScanChoices, memoryLimitBytes: number): ScanSetup {
  const hold = (o.fixed ?? 'trap') as DensityHold;
  if (o.fixed !== undefined && !axes.some((a) => a.path === CHARACTERISTIC_DENSITY)) {
    throw new InputError(`--fixed: only used with --vary ${CHARACTERISTIC_DENSITY}=...; leave it out`);
  }
  checkAxisCombination(
    axes.map((a) => a.path),
    hold,
  );
  if (o.realisations !== undefined && o.realisations > MAX_REALISATIONS_PER_POINT) {
    throw new InputError(`--realisations: at most ${MAX_REALISATIONS_PER_POINT} disorder realisations per scan point; give fewer, or run an ensemble per point`);
  }
  const plan = planScan(axes, o.chainLength ?? DEFAULT_CHAIN_LENGTH, o.realisations ?? 1);
  const overrides = o.set ?? [];
  const prepare = (extra: readonly string[]): PreparedScenario => prepareScenario(scenarioPath, [...overrides, ...extra], { memoryLimitBytes });
  const base = prepare([]);
  if (plan.realisations > 1 && !base.scenario.disorder) {
    throw new InputError(
      '--realisations: the scenario has no disorder block, so every realisation would be the same; add one, e.g. "disorder": {"kind": "box", "width": 0.5, "seed": "run1"}, or leave --realisations out',
    );
  }
  // A path that holds a text, a list or a group in the scenario is named now, before the
  // schema refuses a number there with a message about the value.
  for (const a of plan.axes) if (a.path !== CHARACTERISTIC_DENSITY && valueAtPath(base.scenario, a.path) !== undefined) checkNumericPath(base, a.path);
  // The first point is resolved in full (paths, the characteristic density); the others
  // are only validated (cheap).
  for (const p of plan.order) {
    try {
      if (p === plan.order[0]) scenarioOfPoint(plan, p, hold, prepare);
      else loadScenario(scenarioPath, [...overrides, ...directOverrides(plan, p)]);
    } catch (err) {
      if (err instanceof InputError && plan.pointCount > 1) {
        const at = plan.axes.map((a, k) => `${a.path}=${pointValues(plan, p)[k]}`).join(', ');
        throw new InputError(`scan point ${p} (${at}): ${err.message}`);
      }
      throw err;
    }
  }
  return { plan, hold, base, prepare, scenarioHash: scenarioHash(base.scenario), keepPoints: o.keepPoints ?? false };
}

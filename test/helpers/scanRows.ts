// Scan rows made up for the tests of the scan's files (no solve): plain numbers chosen so
// that every column can be told apart, the point's axis values taken from the plan.
import { pointValues, type ScanPlan } from '../../src/pipeline/scan/scanPlan.js';
import type { ScanRow } from '../../src/pipeline/scan/scanRow.js';
import type { ScanOutcome } from '../../src/output/scanOutputs.js';
import type { ScanShardIdentity } from '../../src/output/scanShard.js';
import type { Scenario } from '../../src/scenario/scenarioSchema.js';

export function madeUpRow(plan: ScanPlan, point: number, overrides: Partial<ScanRow> = {}): ScanRow {
  return {
    point,
    values: pointValues(plan, point),
    converged: true,
    sweeps: 100 + point,
    muEvaluations: 1,
    warmStart: point % plan.chainLength !== 0,
    nmax: 4,
    atoms: 1000 + 10 * point,
    chemicalPotential: 0.5 + point / 100,
    condensedAtoms: 400 + point,
    condensateFraction: (400 + point) / (1000 + 10 * point),
    superfluidFraction: NaN,
    superfluidFractionError: NaN,
    entropy: 0,
    entropyPerAtom: 0,
    temperature: 0,
    characteristicDensity: NaN,
    characteristicLength: 7.5,
    centralDensity: 1,
    centralPhase: 2,
    phaseSites: [0, 60, 40, 0, 0],
    shells: [{ filling: 1, innerRadius: 0, outerRadius: 3 + point / 10, sites: 40, radiusFrom: 'sites' }],
    compressibilityPerSite: NaN,
    stiffnessPhase: null,
    realisations: 1,
    superfluidFractionSpread: NaN,
    phaseShares: null,
    ...overrides,
  };
}

/** A made-up scan identity (fixed hashes, energy unit U, no held key); `over` replaces any field. */
export function madeUpScanIdentity(plan: ScanPlan, over: Partial<ScanShardIdentity> = {}): ScanShardIdentity {
  return {
    scenario: { name: 'layer' } as unknown as Scenario,
    scenarioHash: '1'.repeat(64),
    scanHash: '2'.repeat(64),
    plan,
    hold: null,
    energyUnit: 'U',
    keepPoints: false,
    ...over,
  };
}

/** A made-up scan outcome around `rows` (the identity above, one run); `over` replaces any field. */
export function madeUpOutcome(plan: ScanPlan, rows: ScanRow[], over: Partial<ScanOutcome> = {}): ScanOutcome {
  return {
    ...madeUpScanIdentity(plan),
    rows,
    provenance: { kind: 'single run', threads: 1, seconds: 1.5, resumedPoints: 0 },
    ...over,
  };
}

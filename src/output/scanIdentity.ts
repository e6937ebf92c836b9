// What makes two scan runs the same scan: the scenario as run (its SHA-256,
// src/scenario/scenarioHash.ts), the axes with every value, the chain length (which point
// starts from which, src/pipeline/scan/scanPlan.ts), the characteristic-density hold,
// whether per-point folders are kept, and the tool version. Its SHA-256 keys the partial
// results of a running scan (scanWork.ts) and the shards that `tiercake merge` combines.

import { createHash } from 'node:crypto';
import type { ScanPlan } from '../pipeline/scan/scanPlan.js';
import type { DensityHold } from '../pipeline/scan/scanPoint.js';
import { CHARACTERISTIC_DENSITY } from '../pipeline/scan/scanPoint.js';
import { toolVersion } from './toolVersion.js';

export interface ScanIdentity {
  scenarioHash: string;
  plan: ScanPlan;
  /** only with the characteristic-density axis */
  hold: DensityHold | null;
  keepPoints: boolean;
}

export function scanIdentityHash(id: ScanIdentity): string {
  const text = JSON.stringify({
    tool: toolVersion(),
    scenarioHash: id.scenarioHash,
    axes: id.plan.axes.map((a) => ({ path: a.path, spacing: a.spacing, values: a.values })),
    chainLength: id.plan.chainLength,
    hold: id.hold,
    keepPoints: id.keepPoints,
    // only when asked for, so scans of one realisation keep the identity they had
    ...(id.plan.realisations > 1 ? { realisations: id.plan.realisations } : {}),
  });
  return createHash('sha256').update(text).digest('hex');
}

/** The identity hash of a scan set up by src/pipeline/scan/scanSetup.ts. */
export function scanSetupHash(s: { scenarioHash: string; plan: ScanPlan; hold: DensityHold; keepPoints: boolean }): string {
  return scanIdentityHash({ scenarioHash: s.scenarioHash, plan: s.plan, hold: effectiveHold(s.plan, s.hold), keepPoints: s.keepPoints });
}

/** The hold that matters: the characteristic-density axis's, else null. */
export function effectiveHold(plan: ScanPlan, hold: DensityHold): DensityHold | null {
  return plan.axes.some((a) => a.path === CHARACTERISTIC_DENSITY) ? hold : null;
}

/** "hubbard.hopping 0.01 to 0.03 (11 points), 11 points in chains of 8": for messages. */
export function describeScan(plan: ScanPlan): string {
  const axes = plan.axes.map((a) => {
    const v = a.values;
    const how = a.spacing === 'log' ? ', log spacing' : a.spacing === 'list' ? ', listed' : '';
    return v.length === 1 ? `${a.path} = ${v[0]}` : `${a.path} ${v[0]} to ${v[v.length - 1]} (${v.length} points${how})`;
  });
  const per = plan.realisations > 1 ? `, ${plan.realisations} disorder realisations per point` : '';
  return `${axes.join(' x ')}, ${plan.pointCount} points in chains of ${plan.chainLength}${per}`;
}

// The identity of a scan (src/output/scanIdentity.ts) keys the partial results of a running
// scan and the shards `tiercake merge` combines, so it must be the same for the same scan
// (built twice, independently) and differ when anything that changes the results differs:
// the scenario hash, an axis path, spacing or any single value, the axis order, the chain
// length, the density hold, keepPoints. The hold counts only with the characteristic-density
// axis (effectiveHold). describeScan is the one-line summary used in messages and reports.
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { describeScan, effectiveHold, scanIdentityHash, scanSetupHash, type ScanIdentity } from '../../src/output/scanIdentity.js';
import { planScan, type ScanAxis } from '../../src/pipeline/scan/scanPlan.js';
import { CHARACTERISTIC_DENSITY } from '../../src/pipeline/scan/scanPoint.js';

const hopping: ScanAxis = { path: 'hubbard.hopping', values: [0.01, 0.02, 0.03], spacing: 'linear' };
const mu: ScanAxis = { path: 'chemicalPotential', values: [0.2, 0.5], spacing: 'list' };

function identity(overrides: Partial<ScanIdentity> = {}): ScanIdentity {
  return {
    scenarioHash: createHash('sha256').update('an invented scenario').digest('hex'),
    plan: planScan([hopping, mu], 4),
    hold: null,
    keepPoints: false,
    ...overrides,
  };
}

describe('scanIdentityHash', () => {
  it('is a SHA-256 hex digest, the same for the same scan built twice', () => {
    const a = scanIdentityHash(identity());
    // a fresh plan from copies of the axes: no shared objects with the first
    const b = scanIdentityHash(identity({ plan: planScan([{ ...hopping, values: [...hopping.values] }, { ...mu, values: [...mu.values] }], 4) }));
    expect(a).toMatch(/^[0-9a-f]{64}$/);
    expect(b).toBe(a);
  });

  it('changes with every field that changes the results', () => {
    const base = scanIdentityHash(identity());
    const variants: Record<string, ScanIdentity> = {
      scenarioHash: identity({ scenarioHash: createHash('sha256').update('another scenario').digest('hex') }),
      'one axis value (last digit)': identity({ plan: planScan([{ ...hopping, values: [0.01, 0.02, 0.030000000000000002] }, mu], 4) }),
      'an extra value': identity({ plan: planScan([{ ...hopping, values: [0.01, 0.02, 0.03, 0.04] }, mu], 4) }),
      'axis path': identity({ plan: planScan([{ ...hopping, path: 'hubbard.interaction' }, mu], 4) }),
      spacing: identity({ plan: planScan([{ ...hopping, spacing: 'list' }, mu], 4) }),
      'axis order': identity({ plan: planScan([mu, hopping], 4) }),
      'chain length': identity({ plan: planScan([hopping, mu], 5) }),
      'realisations per point': identity({ plan: planScan([hopping, mu], 4, 3) }),
      hold: identity({ hold: 'trap' }),
      'other hold': identity({ hold: 'atoms' }),
      keepPoints: identity({ keepPoints: true }),
    };
    const seen = new Map<string, string>([[base, 'base']]);
    for (const [name, id] of Object.entries(variants)) {
      const h = scanIdentityHash(id);
      expect(seen.has(h), `${name} gives the same hash as ${seen.get(h)}`).toBe(false);
      seen.set(h, name);
    }
  });

  it('does not depend on the plan fields derived from the axes and chain length', () => {
    const id = identity();
    const base = scanIdentityHash(id);
    // order, counts, pointCount, chainCount follow from the axes and chain length; a copy with
    // them rebuilt in another object must give the same key
    const plan = { ...id.plan, order: [...id.plan.order], counts: [...id.plan.counts] };
    expect(scanIdentityHash({ ...id, plan })).toBe(base);
    // one realisation per point (the default) keeps the key scans had before the option existed
    expect(scanIdentityHash(identity({ plan: planScan([hopping, mu], 4, 1) }))).toBe(base);
  });
});

describe('effectiveHold', () => {
  it('keeps the hold only when an axis is the characteristic density', () => {
    const plain = planScan([hopping], 8);
    const withDensity = planScan([hopping, { path: CHARACTERISTIC_DENSITY, values: [1, 2], spacing: 'linear' }], 8);
    expect(effectiveHold(plain, 'trap')).toBeNull();
    expect(effectiveHold(plain, 'atoms')).toBeNull();
    expect(effectiveHold(withDensity, 'trap')).toBe('trap');
    expect(effectiveHold(withDensity, 'atoms')).toBe('atoms');
    // so the two holds give the same scan key without that axis, different keys with it
    const key = (plan: typeof plain, hold: 'trap' | 'atoms'): string => scanIdentityHash(identity({ plan, hold: effectiveHold(plan, hold) }));
    expect(key(plain, 'trap')).toBe(key(plain, 'atoms'));
    expect(key(withDensity, 'trap')).not.toBe(key(withDensity, 'atoms'));
  });
});

describe('scanSetupHash', () => {
  it('is the identity of a set-up scan with only the hold that matters', () => {
    const plain = planScan([hopping], 8);
    const withDensity = planScan([hopping, { path: CHARACTERISTIC_DENSITY, values: [1, 2], spacing: 'linear' }], 8);
    const h = identity().scenarioHash;
    expect(scanSetupHash({ scenarioHash: h, plan: plain, hold: 'atoms', keepPoints: true })).toBe(scanIdentityHash({ scenarioHash: h, plan: plain, hold: null, keepPoints: true }));
    expect(scanSetupHash({ scenarioHash: h, plan: withDensity, hold: 'atoms', keepPoints: false })).toBe(scanIdentityHash({ scenarioHash: h, plan: withDensity, hold: 'atoms', keepPoints: false }));
  });
});

describe('describeScan', () => {
  it('names each axis with its ends and point count, and the chains', () => {
    expect(describeScan(planScan([hopping, mu], 4))).toBe(
      'hubbard.hopping 0.01 to 0.03 (3 points) x chemicalPotential 0.2 to 0.5 (2 points, listed), 6 points in chains of 4',
    );
  });

  it('says log spacing, and writes a single value as path = value', () => {
    const logAxis: ScanAxis = { path: 'laboratory.depthEr', values: [4, 8, 16], spacing: 'log' };
    const single: ScanAxis = { path: 'temperature', values: [0.05], spacing: 'linear' };
    expect(describeScan(planScan([logAxis, single], 8))).toBe('laboratory.depthEr 4 to 16 (3 points, log spacing) x temperature = 0.05, 3 points in chains of 8');
  });
});

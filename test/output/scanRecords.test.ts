// Scan rows as JSON (src/output/scanRecords.ts), the form of the partial results of a
// running scan and of the shards `tiercake merge` reads. A row must survive
// toJson -> JSON text -> schema -> fromJson bit for bit, including doubles that need all 17
// significant digits and the extremes of the double range (ECMAScript Number::toString
// writes the shortest decimal that reads back as the same double: ECMA-262, section
// "Number::toString"), and the undefined readings must go NaN -> null -> NaN. Rows written
// before the superfluid fraction existed read back with NaN there. A damaged row is refused
// with the field named.
import { describe, expect, it } from 'vitest';
import { ScanAxisSchema, ScanRowSchema, scanRowFromJson, scanRowToJson } from '../../src/output/scanRecords.js';
import type { ScanRow } from '../../src/pipeline/scan/scanRow.js';
import { phaseNames } from '../../src/observables/phaseCodes.js';

function row(overrides: Partial<ScanRow> = {}): ScanRow {
  return {
    point: 7,
    values: [0.1 + 0.2, 12.5],
    converged: true,
    sweeps: 143,
    muEvaluations: 9,
    warmStart: true,
    nmax: 4,
    atoms: 1234.5678901234567,
    chemicalPotential: -0.30000000000000004,
    condensedAtoms: 5e-324, // the smallest subnormal double
    condensateFraction: 0.6180339887498949,
    superfluidFraction: 0.41421356237309515,
    superfluidFractionError: 2.220446049250313e-16,
    entropy: 1.7976931348623157e308, // the largest finite double
    entropyPerAtom: 1 / 3,
    temperature: 0,
    characteristicDensity: Math.PI,
    characteristicLength: Math.E,
    centralDensity: 2.0000000000000004,
    centralPhase: 2,
    phaseSites: [10, 20, 30, 0, 5],
    shells: [
      { filling: 1, innerRadius: 3.25, outerRadius: 7.0000000000000009, sites: 100, radiusFrom: 'annulus' },
      { filling: 2, innerRadius: 0, outerRadius: 3.25, sites: 33, radiusFrom: 'sites' },
    ],
    compressibilityPerSite: 0.1 + 0.7,
    stiffnessPhase: 'boseGlass',
    realisations: 3,
    superfluidFractionSpread: 1 / 7,
    phaseShares: [0, 2 / 3, 1 / 3, 0, 0],
    ...overrides,
  };
}

/** The path a stored row takes: to JSON text and back through the schema. */
function throughText(r: ScanRow): ScanRow {
  const text = JSON.stringify(scanRowToJson(r));
  return scanRowFromJson(ScanRowSchema.parse(JSON.parse(text)));
}

/** Bit-for-bit comparison of every number (Object.is: NaN equals NaN, 0 differs from -0). */
function expectSameRow(actual: ScanRow, expected: ScanRow): void {
  expect(Object.keys(actual).sort()).toEqual(Object.keys(expected).sort());
  for (const key of Object.keys(expected) as (keyof ScanRow)[]) {
    const a = actual[key];
    const e = expected[key];
    if (typeof e === 'number') expect(Object.is(a, e), `${key}: ${String(a)} vs ${e}`).toBe(true);
    else expect(a, key).toEqual(e);
  }
}

describe('scan rows as JSON', () => {
  it('survive the trip through JSON text bit for bit', () => {
    const r = row();
    expectSameRow(throughText(r), r);
  });

  it('write undefined readings as null and read them back as NaN', () => {
    const r = row({
      condensateFraction: NaN,
      superfluidFraction: NaN,
      superfluidFractionError: NaN,
      entropyPerAtom: NaN,
      characteristicDensity: NaN,
      characteristicLength: NaN,
    });
    const json = scanRowToJson(r);
    expect(json.condensateFraction).toBeNull();
    expect(json.superfluidFraction).toBeNull();
    expect(json.superfluidFractionError).toBeNull();
    expect(json.entropyPerAtom).toBeNull();
    expect(json.characteristicDensity).toBeNull();
    expect(json.characteristicLength).toBeNull();
    // the text has no NaN token (JSON has none: RFC 8259 section 6)
    expect(JSON.stringify(json)).not.toMatch(/NaN/);
    expectSameRow(throughText(r), r);
  });

  it('do not share arrays with the row they came from', () => {
    const r = row();
    const json = scanRowToJson(r);
    json.values[0] = 99;
    json.phaseSites[0] = 99;
    json.shells[0].filling = 99;
    expect(r.values[0]).toBe(0.1 + 0.2);
    expect(r.phaseSites[0]).toBe(10);
    expect(r.shells[0].filling).toBe(1);
  });

  it('read a row written before the superfluid fraction existed with NaN there', () => {
    const json = scanRowToJson(row()) as Record<string, unknown>;
    delete json.superfluidFraction;
    delete json.superfluidFractionError;
    const back = scanRowFromJson(ScanRowSchema.parse(json));
    expect(back.superfluidFraction).toBeNaN();
    expect(back.superfluidFractionError).toBeNaN();
    expect(back.condensateFraction).toBe(0.6180339887498949);
  });

  it('read a row written before the phase by stiffness existed: one realisation, no label', () => {
    const json = scanRowToJson(row()) as Record<string, unknown>;
    for (const key of ['compressibilityPerSite', 'stiffnessPhase', 'realisations', 'superfluidFractionSpread', 'phaseShares']) delete json[key];
    const back = scanRowFromJson(ScanRowSchema.parse(json));
    expect(back.compressibilityPerSite).toBeNaN();
    expect(back.stiffnessPhase).toBeNull();
    expect(back.realisations).toBe(1);
    expect(back.superfluidFractionSpread).toBeNaN();
    expect(back.phaseShares).toBeNull();
  });

  it('refuse a damaged row, naming the field', () => {
    const good = scanRowToJson(row()) as Record<string, unknown>;
    const refusals: [string, Record<string, unknown>][] = [
      ['point', { ...good, point: -1 }],
      ['point', { ...good, point: 1.5 }],
      ['values', { ...good, values: [] }],
      ['values', { ...good, values: [1, 2, 3] }],
      ['nmax', { ...good, nmax: 0 }],
      ['atoms', { ...good, atoms: null }],
      ['centralPhase', { ...good, centralPhase: phaseNames.length }],
      ['phaseSites', { ...good, phaseSites: [1, 2, 3] }],
      ['shells', { ...good, shells: [{ filling: 1, innerRadius: 0, outerRadius: 1, sites: 3, radiusFrom: 'guess' }] }],
      ['shells', { ...good, shells: [{ filling: 0, innerRadius: 0, outerRadius: 1, sites: 3, radiusFrom: 'sites' }] }],
      ['converged', { ...good, converged: 'yes' }],
      ['unknownField', { ...good, unknownField: 1 }],
    ];
    for (const [field, bad] of refusals) {
      const result = ScanRowSchema.safeParse(bad);
      expect(result.success, `${field} accepted`).toBe(false);
      if (!result.success) {
        const named = result.error.issues.some((i) => i.path[0] === field || (i.code === 'unrecognized_keys' && i.keys.includes(field)));
        expect(named, `${field} not named: ${JSON.stringify(result.error.issues)}`).toBe(true);
      }
    }
    // a missing required reading is refused too
    const { entropy: _dropped, ...missing } = good;
    const r = ScanRowSchema.safeParse(missing);
    expect(r.success).toBe(false);
    if (!r.success) expect(r.error.issues[0].path).toEqual(['entropy']);
  });
});

describe('ScanAxisSchema', () => {
  it('accepts a stored axis and refuses an empty path, no values or an unknown spacing', () => {
    const axis = { path: 'hubbard.hopping', values: [0.01, 0.02], spacing: 'linear' };
    expect(ScanAxisSchema.parse(axis)).toEqual(axis);
    for (const [field, bad] of [
      ['path', { ...axis, path: '' }],
      ['values', { ...axis, values: [] }],
      ['spacing', { ...axis, spacing: 'geometric' }],
    ] as const) {
      const r = ScanAxisSchema.safeParse(bad);
      expect(r.success, field).toBe(false);
      if (!r.success) expect(r.error.issues[0].path[0]).toBe(field);
    }
  });
});

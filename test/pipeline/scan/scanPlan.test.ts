// The scan's grid, solve order, chains and warm-start predictor (src/pipeline/scan), and the
// --vary parser (src/cli/varyOption.ts). Checked against what the definitions say, counted
// by hand: a snake path visits each grid point once and every step is one grid neighbour;
// chains partition the path; K shards own every chain exactly once, for every K; equal
// steps and constant ratios against closed forms; the linear predictor reproduces a field
// that is linear in the axis value exactly (its defining property).
import { describe, expect, it } from 'vitest';
import { chainOf, chainPoints, linearValues, logValues, planScan, pointCoordinates, shardChains } from '../../../src/pipeline/scan/scanPlan.js';
import { flooredPhi, predictorStep, searchSlope, warmStartFor, WARM_PHI_FLOOR } from '../../../src/pipeline/scan/runScan.js';
import { overrideFor, valueAtPath } from '../../../src/pipeline/scan/scanPoint.js';
import { atomsForCharacteristicDensity, characteristicDensity, characteristicLengths, trapScaleForCharacteristicDensity } from '../../../src/physics/characteristicDensity.js';
import { parseVary, parseVaryOptions } from '../../../src/cli/varyOption.js';
import { InputError } from '../../../src/scenario/inputError.js';

const axis = (path: string, values: number[]) => ({ path, values, spacing: 'linear' as const });

describe('scan plan', () => {
  it('two axes: the snake visits every point once, each step to a grid neighbour', () => {
    const plan = planScan([axis('a', [1, 2, 3, 4]), axis('b', [10, 20, 30])], 5);
    expect(plan.pointCount).toBe(12);
    expect([...plan.order].sort((x, y) => x - y)).toEqual(Array.from({ length: 12 }, (_, k) => k));
    for (let k = 1; k < plan.order.length; k++) {
      const [i0, j0] = pointCoordinates(plan, plan.order[k - 1]);
      const [i1, j1] = pointCoordinates(plan, plan.order[k]);
      expect(Math.abs(i1 - i0) + Math.abs(j1 - j0)).toBe(1);
    }
    // rows of the first axis: forwards, backwards, forwards, ...
    expect(plan.order.slice(0, 6)).toEqual([0, 1, 2, 5, 4, 3]);
  });

  it('chains cut the path into pieces of the chain length; K shards own each chain once', () => {
    const plan = planScan([axis('a', linearValues(0, 1, 23))], 4);
    expect(plan.chainCount).toBe(6);
    expect(chainPoints(plan, 5)).toEqual([20, 21, 22]);
    expect(chainOf(plan, 21)).toBe(5);
    for (const count of [1, 2, 3, 4, 6, 7, 10]) {
      const owned = Array.from({ length: count }, (_, k) => shardChains(plan, k, count)).flat();
      expect(owned.sort((x, y) => x - y)).toEqual([0, 1, 2, 3, 4, 5]);
    }
  });

  it('values: equal steps and a constant ratio, exact ends', () => {
    expect(linearValues(0.01, 0.03, 5)).toEqual([0.01, 0.015, 0.02, 0.025, 0.03]);
    const v = logValues(1, 1000, 4);
    expect(v).toEqual([1, 10, 100, 1000]);
    expect(linearValues(2, 5, 1)).toEqual([2]);
  });
});

describe('warm starts', () => {
  it('predictor step: t along one grid line, null at the turn of the snake', () => {
    const plan = planScan([axis('a', [0, 1, 2, 4]), axis('b', [0, 1])], 8);
    // points (i, j) -> i * 2 + j
    expect(predictorStep(plan, 0, 2, 4)).toBe(1); // a = 0, 1 -> 2
    expect(predictorStep(plan, 2, 4, 6)).toBe(2); // a = 1, 2 -> 4
    expect(predictorStep(plan, 4, 6, 7)).toBeNull(); // the next row: a different line
    expect(predictorStep(plan, 2, 0, 4)).toBeNull(); // backwards: extrapolation would have t < 0
  });

  it('a field linear in the axis value is predicted exactly; small values are floored', () => {
    const plan = planScan([axis('a', [0, 1, 2])], 8);
    const phi = (a: number) => Float64Array.from([0.1 + 0.2 * a, 0.3 + 0.05 * a, 0.02 - 0.01 * a]);
    const w = (a: number) => ({ phi: phi(a), mu: 1 + a, nmax: 5 + a, kT: 0.1 * (1 + a), atomSlope: 7 });
    const start = warmStartFor(plan, [{ point: 0, warm: w(0) }, { point: 1, warm: w(1) }], 2, 3)!;
    expect(start.phi[0]).toBeCloseTo(phi(2)[0], 15);
    expect(start.phi[1]).toBeCloseTo(phi(2)[1], 15);
    expect(start.phi[2]).toBe(WARM_PHI_FLOOR); // 0.02 - 0.02 = 0 -> floor
    expect(start.mu).toBe(3);
    expect(start.kT).toBeCloseTo(0.3, 15);
    expect(start.nmax).toBe(6);
    // one previous point: its own values, floored
    const one = warmStartFor(plan, [{ point: 1, warm: w(1) }], 2, 3)!;
    expect(Array.from(one.phi)).toEqual([0.30000000000000004, 0.35, WARM_PHI_FLOOR]);
    expect(warmStartFor(plan, [{ point: 1, warm: w(1) }], 2, 4)).toBeNull(); // another lattice size
    expect(Array.from(flooredPhi(Float64Array.of(0, 1e-12, 0.5)))).toEqual([WARM_PHI_FLOOR, WARM_PHI_FLOOR, 0.5]);
  });

  it('dN/dmu from the two evaluations nearest the answer', () => {
    const history = [
      { mu: 0.2, atoms: 100 },
      { mu: 0.5, atoms: 400 },
      { mu: 0.45, atoms: 350 },
      { mu: 0.46, atoms: 362 },
    ];
    expect(searchSlope(history, 0.46)).toBeCloseTo(1200, 9);
    expect(searchSlope([{ mu: 1, atoms: 5 }], 1)).toBeNaN();
  });
});

describe('scenario paths', () => {
  it('exclusive groups are replaced whole, other paths set in place', () => {
    expect(overrideFor('particles.atoms', 5000)).toBe('particles={"atoms":5000}');
    expect(overrideFor('temperature.entropyPerAtom', 0.2)).toBe('temperature={"entropyPerAtom":0.2}');
    expect(overrideFor('hubbard.hopping', 0.015)).toBe('hubbard.hopping=0.015');
    expect(overrideFor('landscape.0.wallHeight', 2)).toBe('landscape.0.wallHeight=2');
    expect(valueAtPath({ a: [{ b: 3 }] }, 'a.0.b')).toBe(3);
    expect(valueAtPath({ a: 1 }, 'a.b')).toBeUndefined();
  });

  it('characteristic density N (V/J)^(d/2) and its inverses', () => {
    // 2D, V = 0.002, J = 0.02: (V/J)^(d/2) = 0.1
    expect(characteristicDensity(3000, [0.002, 0.002], [0.02, 0.02])).toBeCloseTo(300, 10);
    expect(characteristicLengths([0.002], [0.02])[0]).toBeCloseTo(Math.sqrt(10), 12);
    expect(atomsForCharacteristicDensity(300, [0.002, 0.002], [0.02, 0.02])).toBeCloseTo(3000, 9);
    const s = trapScaleForCharacteristicDensity(600, 3000, [0.002, 0.002], [0.02, 0.02]);
    expect(characteristicDensity(3000, [0.002 * s, 0.002 * s], [0.02, 0.02])).toBeCloseTo(600, 9);
    // 3D: rho~ scales as s^(3/2)
    const s3 = trapScaleForCharacteristicDensity(8, 1, [1, 1, 1], [1, 1, 1]);
    expect(s3).toBeCloseTo(4, 12);
  });
});

describe('--vary', () => {
  it('ranges, log ranges and lists', () => {
    expect(parseVary('hubbard.hopping=0.01:0.03:5')).toEqual({ path: 'hubbard.hopping', values: [0.01, 0.015, 0.02, 0.025, 0.03], spacing: 'linear' });
    expect(parseVary('particles.atoms=100:10000:3:log')).toEqual({ path: 'particles.atoms', values: [100, 1000, 10000], spacing: 'log' });
    expect(parseVary('particles.atoms=100:10000:3', true).spacing).toBe('log');
    expect(parseVary('trap.coefficient=1e-3:2e-3:2:linear', true).spacing).toBe('linear');
    expect(parseVary('landscape.0.wallHeight=1,2.5,4')).toEqual({ path: 'landscape.0.wallHeight', values: [1, 2.5, 4], spacing: 'list' });
    expect(parseVaryOptions(['a.b=1,2', 'c=1:2:3']).length).toBe(2);
  });

  it('refusals name the option and what to write', () => {
    const bad: Array<[string[], RegExp]> = [
      [['hubbard.hopping'], /expected PATH=FROM:TO:COUNT or PATH=A,B,C/],
      [['hubbard.hopping=0.01:0.03'], /expected FROM:TO:COUNT/],
      [['hubbard.hopping=0.01:0.03:0'], /COUNT\): expected a whole number from 1/],
      [['hubbard.hopping=0x1:0.03:3'], /FROM\): expected a number, got "0x1"/],
      [['temperature.kT=-1:1:3:log'], /logarithmic steps need FROM and TO above 0/],
      [['a=1,1'], /listed twice/],
      [['a..b=1'], /is not a dotted scenario path/],
      [['a=1', 'a=2'], /given twice/],
      [['a=1', 'b=1', 'c=1'], /a scan has one or two axes/],
      [[], /--vary: required/],
    ];
    for (const [texts, message] of bad) {
      expect(() => parseVaryOptions(texts)).toThrow(InputError);
      expect(() => parseVaryOptions(texts)).toThrow(message);
    }
  });
});

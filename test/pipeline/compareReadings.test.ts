// What compare reads off the pictures after the fit (src/pipeline/compareReadings.ts), on
// the small fit of test/helpers/smallCompareFit.ts (one shot): the equation of state is
// equationOfState's with the bin asked for, a single shot has no thermometry and says why,
// the warnings are the shots', then the fit's. The fixed trap centre: given (10, 7), crop
// at (2, 3) -> (8, 4), transpose -> column 4, row 8; 20 rows counted up from the bottom
// give y = 19 - 8 = 11 (worked by hand from the frame steps of frameOrientation.ts).
// Mutation tried: `shots.measured.ny - 1 - p.row` -> `shots.measured.ny - p.row`: the hand-worked centre fails.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import { compareReadings, fixedCentreInGrid, isShotStack } from '../../src/pipeline/compareReadings.js';
import { equationOfState } from '../../src/pipeline/compareEquationOfState.js';
import type { CompareFit } from '../../src/pipeline/compareFit.js';
import type { PreparedShots } from '../../src/pipeline/measuredShots.js';
import { smallCompareFit } from '../helpers/smallCompareFit.js';

let fit: CompareFit;
let dir = '';
beforeAll(async () => {
  ({ fit, dir } = await smallCompareFit());
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const shotsOf = (count: number, over: Partial<PreparedShots> = {}): PreparedShots =>
  ({ perShot: Array.from({ length: count }, () => ({})), warnings: [{ code: 'hot-pixels', message: 'from the shots' }], ...over }) as unknown as PreparedShots;

describe('compare readings', () => {
  it('carries a fixed centre from the given frame into the fit grid', () => {
    const shots = shotsOf(1, { map: { givenWidth: 30, givenHeight: 30, orientedWidth: 20, orientedHeight: 20, steps: [{ kind: 'crop', x0: 2, y0: 3 }, { kind: 'transpose' }] }, measured: { ny: 20 } } as unknown as Partial<PreparedShots>);
    expect(fixedCentreInGrid(shots, { x: 10, y: 7 })).toEqual({ x: 4, y: 11 });
  });

  it('two or more shots are a stack', () => {
    expect(isShotStack(shotsOf(1))).toBe(false);
    expect(isShotStack(shotsOf(2))).toBe(true);
  });

  it('one shot: the equation of state, no thermometry and why, the warnings in order', () => {
    const r = compareReadings(fit, shotsOf(1), { eosBinSites: 2 });
    expect(r.eos).toEqual(equationOfState(fit, { binSites: 2 }));
    expect(r.thermometry).toEqual({ available: false, reason: 'a single shot: fluctuation thermometry needs a stack of shots' });
    expect(r.warnings).toEqual([{ code: 'hot-pixels', message: 'from the shots' }, ...fit.warnings]);
  });
});

// The stiffness reading of a solve (src/pipeline/solveStiffness.ts), against outside facts:
// - clean uniform periodic lattice: Gutzwiller mean field gives f_s = |phi|^2/n exactly (a
//   twist q turns J into J cos q on every bond, phi stays uniform, Hellmann-Feynman gives
//   d^2 Omega/dq^2 = 2 J |phi|^2 per bond); phi and n from the homogeneous self-consistency
//   (src/solver/homogeneous.ts, itself checked against van Oosten, van der Straten & Stoof,
//   PRA 63, 053601 (2001)); the condensate fraction beside it is |phi|^2/n as well;
// - a periodic ring with one bond cut: the twist is a pure gauge there (phi_x -> e^{-iqx} phi_x
//   on an open chain), so the superflow is zero while the condensate is finite: the
//   no-superflow warning must fire;
// - the means and rules written out by hand.
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel } from '../../src/lattice/latticeModel.js';
import { solveHomogeneous } from '../../src/solver/homogeneous.js';
import {
  carriesNoSuperflow,
  meanSuperfluidFraction,
  NO_SUPERFLOW_CONDENSATE_FLOOR,
  NO_SUPERFLOW_RATIO,
  stiffnessOfSolve,
  stiffnessReading,
  stiffnessTolerance,
  type StiffnessReading,
} from '../../src/pipeline/solveStiffness.js';

const settings = { tolerance: 1e-12, maxSweeps: 100_000 };

describe('stiffnessReading', () => {
  it('clean uniform 6x6 lattice: f_s = |phi|^2/n on both axes, condensate fraction the same, no warnings', () => {
    const model = uniformModel(createLatticeGeometry([6, 6], [true, true]), 1, 0.05, 8);
    const ref = solveHomogeneous({ zJ: 4 * 0.05, interactionU: 1, mu: 0.5, temperature: 0, nmax: 8 });
    const phi = new Float64Array(36).fill(ref.phi);
    const r = stiffnessReading(model, { mu: 0.5, temperature: 0, phi }, settings);
    const expected = (ref.phi * ref.phi) / ref.density;
    expect(expected).toBeGreaterThan(0.05);
    expect(r.axes).toHaveLength(2);
    for (const a of r.axes) expect(Math.abs((a.value as number) - expected)).toBeLessThan(1e-6);
    expect(Math.abs((r.condensateFraction as number) - expected)).toBeLessThan(1e-8);
    expect(r.converged).toBe(true);
    expect(r.warnings).toEqual([]);
    expect(r.tolerance).toBe(1e-12);
    expect(r.solves).toBeGreaterThan(0);
    const mean = meanSuperfluidFraction(r);
    expect(Math.abs((mean.superfluidFraction as number) - expected)).toBeLessThan(1e-6);
  });

  it('a ring with one bond cut carries no superflow although it holds a condensate: no-superflow warning', () => {
    const geometry = createLatticeGeometry([8], [true]);
    const model = uniformModel(geometry, 1, 0.1, 8);
    const bonds = new Float64Array(8).fill(0.1);
    bonds[7] = 0; // the bond that wraps around
    model.hopping = [bonds];
    const r = stiffnessReading(model, { mu: 0.5, temperature: 0, phi: new Float64Array(8).fill(0.5) }, settings);
    expect(r.condensateFraction as number).toBeGreaterThan(0.1);
    expect(Math.abs(r.axes[0].value as number)).toBeLessThan(1e-6);
    expect(r.warnings.map((w) => w.code)).toEqual(['no-superflow']);
  });

  it('an open axis has no value, and the mean is taken over the axes with one', () => {
    const model = uniformModel(createLatticeGeometry([6, 4], [true, false]), 1, 0.05, 8);
    const r = stiffnessReading(model, { mu: 0.5, temperature: 0, phi: new Float64Array(24).fill(0.4) }, settings);
    expect(r.axes[1].value).toBeNull();
    expect(r.axes[1].reason).toBeTruthy();
    expect(meanSuperfluidFraction(r).superfluidFraction).toBe(r.axes[0].value);
  });
});

describe('rules of the reading', () => {
  const axis = (value: number | null, error: number | null) => ({ axis: 0, value, error, reason: null, curvature: null, twistPerBond: null, converged: true, localFraction: null });
  it('mean over axes with a value, largest error; nulls without any', () => {
    const r = { axes: [axis(0.2, 1e-4), axis(null, null), axis(0.4, 3e-4)] } as unknown as StiffnessReading;
    const m = meanSuperfluidFraction(r);
    expect(m.superfluidFraction).toBeCloseTo(0.3, 15);
    expect(m.superfluidFractionError).toBe(3e-4);
    expect(meanSuperfluidFraction(null)).toEqual({ superfluidFraction: null, superfluidFractionError: null });
    expect(meanSuperfluidFraction({ axes: [axis(null, null)] } as unknown as StiffnessReading)).toEqual({ superfluidFraction: null, superfluidFractionError: null });
  });

  it('no superflow: a condensate above the floor with f_s below the ratio of it', () => {
    expect(carriesNoSuperflow(0.5, 0.5 * NO_SUPERFLOW_RATIO * 0.99)).toBe(true);
    expect(carriesNoSuperflow(0.5, 0.5 * NO_SUPERFLOW_RATIO * 1.01)).toBe(false);
    // no condensate to speak of: the rule says nothing
    expect(carriesNoSuperflow(NO_SUPERFLOW_CONDENSATE_FLOOR, 0)).toBe(false);
  });

  it('twisted solves at least as tight as 1e-11; off or stopped solves have no reading', () => {
    expect(stiffnessTolerance(1e-8)).toBe(1e-11);
    expect(stiffnessTolerance(1e-13)).toBe(1e-13);
    const model = uniformModel(createLatticeGeometry([4, 4], [true, true]), 1, 0.05, 6);
    const outcome = { stopped: false, model, solve: { mu: 0.5 }, temperature: 0, state: { fields: { phi: new Float64Array(16).fill(0.4) } } };
    expect(stiffnessOfSolve({ stiffness: false, tolerance: 1e-10, maxSweeps: 1000 }, outcome)).toBeNull();
    expect(stiffnessOfSolve({ stiffness: true, tolerance: 1e-10, maxSweeps: 1000 }, { ...outcome, stopped: true })).toBeNull();
    const on = stiffnessOfSolve({ stiffness: true, tolerance: 1e-10, maxSweeps: 100_000 }, outcome);
    expect(on?.tolerance).toBe(1e-11);
    expect(on?.axes).toHaveLength(2);
  });
});

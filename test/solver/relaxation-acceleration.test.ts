// The accelerated relaxation (relaxation.ts, Anderson mixing of whole sweeps) against analytic
// values, close to the superfluid-Mott boundary where plain sweeps slow down:
// - two states per site (nmax = 1): the site Hamiltonian [[0, -psi], [-psi, -mu]] has
//   <b> = psi / sqrt(mu^2 + 4 psi^2) (2 x 2 eigenvector, written out by hand), so on a uniform
//   lattice with psi = zJ phi the self-consistent phi^2 = (zJ^2 - mu^2) / (4 zJ^2) for zJ > mu;
// - the n = 1 lobe boundary zJc = (1 - x) x / (1 + x) at x = mu/U (van Oosten, van der Straten
//   & Stoof, PRA 63, 053601 (2001)): phi -> 0 below, phi > 0 above;
// - the stopping rule stays honest: the true error is within the reported error estimate
//   (and the tolerance), and plain sweeps (accelerate: false, the reference path) need several
//   times more sweeps for the same answer.
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel, type LatticeModel } from '../../src/lattice/latticeModel.js';
import { addHarmonicTrap, latticeCentre } from '../../src/lattice/harmonicTrap.js';
import { createSolverState } from '../../src/solver/solverState.js';
import { createSweepExecutor } from '../../src/solver/sweepExecutor.js';
import { relaxAtFixedMu } from '../../src/solver/relaxation.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

async function relax(model: LatticeModel, mu: number, accelerate: boolean, tolerance: number, seed: string, temperature = 0) {
  const rng = seededRandom(seed);
  const phi0 = Float64Array.from({ length: model.geometry.siteCount }, () => 0.2 + 0.6 * rng.uniform());
  const state = createSolverState(model, phi0, { thermal: temperature > 0 });
  const result = await relaxAtFixedMu(state, createSweepExecutor(state, null, 1), { mu, temperature, tolerance, maxSweeps: 100_000, accelerate });
  return { phi: state.fields.phi, result };
}

const maxAbsDiff = (a: Float64Array, b: Float64Array | number) =>
  a.reduce((m, v, i) => Math.max(m, Math.abs(v - (typeof b === 'number' ? b : b[i]))), 0);

describe('accelerated relaxation near the superfluid-Mott boundary', () => {
  it('two states per site, zJ = 1.02 mu: phi equals sqrt((zJ^2 - mu^2)/(4 zJ^2)) within the error estimate, in far fewer sweeps than plain', async () => {
    const geometry = createLatticeGeometry([6, 6, 6], [true, true, true]);
    const mu = 0.3;
    const zJ = 1.02 * mu;
    const model = uniformModel(geometry, 1, zJ / 6, 1);
    const exact = Math.sqrt((zJ * zJ - mu * mu) / (4 * zJ * zJ));
    const tolerance = 1e-9;
    const fast = await relax(model, mu, true, tolerance, 'two-state');
    const plain = await relax(model, mu, false, tolerance, 'two-state');
    expect(fast.result.converged).toBe(true);
    expect(plain.result.converged).toBe(true);
    const error = maxAbsDiff(fast.phi, exact);
    expect(error).toBeLessThan(tolerance);
    expect(error).toBeLessThanOrEqual(2 * fast.result.errorEstimate);
    expect(maxAbsDiff(plain.phi, exact)).toBeLessThan(2 * tolerance);
    expect(fast.result.sweeps * 5).toBeLessThan(plain.result.sweeps);
    expect(fast.result.extrapolations).toBeGreaterThan(0);
  });

  it('n = 1 lobe at mu/U = 0.4: Mott (phi -> 0) at 0.98 zJc, superfluid at 1.02 zJc, as the analytic boundary says', async () => {
    const geometry = createLatticeGeometry([4, 4, 4], [true, true, true]);
    const x = 0.4;
    const zJc = ((1 - x) * x) / (1 + x);
    const below = await relax(uniformModel(geometry, 1, (0.98 * zJc) / 6, 6), x, true, 1e-10, 'lobe-below');
    const above = await relax(uniformModel(geometry, 1, (1.02 * zJc) / 6, 6), x, true, 1e-10, 'lobe-above');
    expect(below.result.converged && above.result.converged).toBe(true);
    expect(maxAbsDiff(below.phi, 0)).toBeLessThan(1e-8);
    expect(Math.min(...above.phi)).toBeGreaterThan(1e-2);
    expect(maxAbsDiff(above.phi, above.phi[0])).toBeLessThan(1e-9); // uniform, as the lattice is
  });

  it('open box near the n = 1 tip and a trapped cloud at kT = 0.05 U: the answer of plain sweeps at a 1e-12 tolerance to within the error estimate', async () => {
    const x = Math.SQRT2 - 1; // the tip of the n = 1 lobe, zJc = 3 - 2 sqrt 2
    const box = createLatticeGeometry([10, 10, 10], [false, false, false]);
    const boxModel = uniformModel(box, 1, (1.03 * (3 - 2 * Math.SQRT2)) / 6, 6);
    const trap = createLatticeGeometry([14, 14], [false, false]);
    const trapModel = uniformModel(trap, 1, 0.03, 6);
    addHarmonicTrap(trap, { coefficient: [0.02, 0.02], centre: latticeCentre(trap) }, trapModel.eps);
    for (const [model, mu, kT] of [[boxModel, x, 0], [trapModel, 1.4, 0.05]] as const) {
      const tolerance = 1e-8;
      const fast = await relax(model, mu, true, tolerance, 'box', kT);
      const reference = await relax(model, mu, false, 1e-12, 'box', kT);
      const plain = await relax(model, mu, false, tolerance, 'box', kT);
      expect(fast.result.converged).toBe(true);
      const error = maxAbsDiff(fast.phi, reference.phi);
      expect(error).toBeLessThan(2 * tolerance);
      expect(error).toBeLessThanOrEqual(2 * fast.result.errorEstimate);
      expect(fast.result.sweeps).toBeLessThan(plain.result.sweeps);
    }
  });
});

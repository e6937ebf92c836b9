// Superfluid fraction from the twist curvature (src/solver/twist/superfluidStiffness.ts):
// - clean uniform periodic lattice: in Gutzwiller mean field a twist q per bond turns J into
//   J cos q on the twisted bonds (phi stays uniform), and by Hellmann-Feynman
//   d^2 Omega/dq^2 = 2 J |phi|^2 per bond, so f_s = |phi|^2 / n exactly; phi and n from the
//   homogeneous self-consistency (src/solver/homogeneous.ts, itself checked against the
//   analytic lobe of van Oosten, van der Straten & Stoof, PRA 63, 053601 (2001));
// - open axes: a uniform twist is a pure gauge (phi_x -> e^{-iqx} phi_x), reported as null;
// - J = 0 with box disorder of width W (Fisher, Weichman, Grinstein & Fisher, PRB 40, 546
//   (1989)): every site holds n = ceil((mu - eps_i)/U) exactly, the n = 1 Mott window is
//   W/2 < mu < U - W/2 (incompressible, f_s = 0); outside it sites with other fillings
//   exist and N(mu) moves with mu (compressible), still with f_s = 0: a Bose glass;
// - strong box disorder on the Mott side of a periodic lattice: superfluid puddles around
//   sites whose local mu - eps_i is near a filling change keep a finite condensate, but the
//   stiffness is orders of magnitude smaller (the Bose glass of the same paper; in mean
//   field the puddles couple through exponentially small tails of phi, so f_s is small, not
//   exactly zero).
import { describe, expect, it } from 'vitest';
import { createLatticeGeometry } from '../../src/lattice/latticeGeometry.js';
import { uniformModel, type LatticeModel } from '../../src/lattice/latticeModel.js';
import { boxDisorder } from '../../src/lattice/boxDisorder.js';
import { solveHomogeneous } from '../../src/solver/homogeneous.js';
import { superfluidStiffness } from '../../src/solver/twist/superfluidStiffness.js';

function start(model: LatticeModel): Float64Array {
  return new Float64Array(model.geometry.siteCount).fill(0.5);
}

describe('clean uniform lattice', () => {
  for (const [shape, z] of [[[8, 8], 4], [[4, 4, 6], 6]] as const) {
    it(`f_s = |phi|^2 / n to 1e-6 on every periodic axis (${shape.join('x')})`, () => {
      const geometry = createLatticeGeometry(shape, shape.map(() => true));
      for (const [J, mu] of [[0.05, 0.5], [0.1, 1.2], [0.03, 1.6]]) {
        const model = uniformModel(geometry, 1, J, 8);
        const r = superfluidStiffness(model, { mu, temperature: 0, initialPhi: start(model), tolerance: 1e-13, maxSweeps: 100_000 });
        const ref = solveHomogeneous({ zJ: z * J, interactionU: 1, mu, temperature: 0, nmax: 8 });
        const expected = (ref.phi * ref.phi) / ref.density;
        expect(expected).toBeGreaterThan(0.05);
        for (const a of r.axes) {
          expect(a.value).not.toBeNull();
          expect(Math.abs((a.value as number) - expected)).toBeLessThan(1e-6);
          expect(a.error as number).toBeLessThan(1e-3);
          expect(a.converged).toBe(true);
        }
      }
    });
  }

  it('T > 0: f_s from the curvature equals |phi|^2 / n of the thermal homogeneous state to 1e-6', () => {
    const geometry = createLatticeGeometry([6, 6], [true, true]);
    const model = uniformModel(geometry, 1, 0.06, 8);
    const r = superfluidStiffness(model, { mu: 0.6, temperature: 0.1, initialPhi: start(model), tolerance: 1e-13, maxSweeps: 100_000 });
    const ref = solveHomogeneous({ zJ: 4 * 0.06, interactionU: 1, mu: 0.6, temperature: 0.1, nmax: 8 });
    expect(ref.phi).toBeGreaterThan(0.1);
    for (const a of r.axes) expect(Math.abs((a.value as number) - (ref.phi * ref.phi) / ref.density)).toBeLessThan(1e-6);
  });

  it('an open axis is reported as null with its reason, the periodic one gets a value', () => {
    const geometry = createLatticeGeometry([8, 6], [true, false]);
    const model = uniformModel(geometry, 1, 0.05, 6);
    const r = superfluidStiffness(model, { mu: 0.5, temperature: 0, initialPhi: start(model), tolerance: 1e-12, maxSweeps: 100_000 });
    expect(r.axes[0].value).toBeGreaterThan(0.1);
    expect(r.axes[1].value).toBeNull();
    expect(r.axes[1].reason).toMatch(/open axis/);
  });
});

describe('box disorder', () => {
  it('J = 0: Mott (n = 1 everywhere, incompressible, f_s = 0) exactly for W/2 < mu < U - W/2, Bose glass outside', () => {
    const W = 0.6;
    const geometry = createLatticeGeometry([16, 16], [true, true]);
    const model = uniformModel(geometry, 1, 0, 6);
    model.eps.set(boxDisorder(geometry.siteCount, W, 'bg-zero-J'));
    const N = geometry.siteCount;
    const solveAt = (mu: number) => superfluidStiffness(model, { mu, temperature: 0, initialPhi: start(model), tolerance: 1e-13, maxSweeps: 1000 });
    for (const mu of [0.31, 0.5, 0.69, 0.2, 0.25, 0.8, 0.9]) {
      const r = solveAt(mu);
      const inWindow = W / 2 < mu && mu < 1 - W / 2;
      // exact J = 0 filling of each site (step function of mu - eps_i)
      let other = 0;
      for (let i = 0; i < N; i++) {
        const exact = Math.max(0, Math.ceil(mu - model.eps[i]));
        expect(r.untwisted.density[i]).toBe(exact);
        if (exact !== 1) other++;
      }
      for (const a of r.axes) expect(a.value).toBe(0);
      expect(r.untwisted.condensedAtoms).toBe(0);
      // compressibility: N(mu + dmu) - N(mu - dmu) counts the sites whose filling changes in between
      const dmu = 0.005;
      const dN = solveAt(mu + dmu).untwisted.atoms - solveAt(mu - dmu).untwisted.atoms;
      let crossing = 0;
      for (let i = 0; i < N; i++) crossing += Math.max(0, Math.ceil(mu + dmu - model.eps[i])) - Math.max(0, Math.ceil(mu - dmu - model.eps[i]));
      expect(dN).toBe(crossing);
      if (inWindow) {
        expect(other).toBe(0);
        expect(dN).toBe(0);
      } else {
        // box distribution: expected share of sites with another filling |mu - W/2| / W (or |mu - (1 - W/2)| / W)
        const share = mu < 0.5 ? (W / 2 - mu) / W : (mu - (1 - W / 2)) / W;
        expect(Math.abs(other / N - share)).toBeLessThan(4 * Math.sqrt(share / N) + 1 / N);
        expect(other).toBeGreaterThan(0);
      }
    }
  });

  it('strong disorder on the Mott side: f_s -> 0 while the condensate in the puddles stays finite', () => {
    const geometry = createLatticeGeometry([12, 12], [true, true]);
    const J = 0.01; // zJ/U = 0.04, below the clean n = 1 lobe tip zJ/U = 3 - 2 sqrt 2 = 0.172 (van Oosten et al. 2001)
    const rows: Array<{ W: number; fs: number; condensate: number; puddle: number }> = [];
    for (const W of [0, 1.6]) {
      const model = uniformModel(geometry, 1, J, 6);
      model.eps.set(boxDisorder(geometry.siteCount, W, 'bg-strong'));
      const r = superfluidStiffness(model, { mu: 0.5, temperature: 0, initialPhi: start(model), tolerance: 1e-12, maxSweeps: 400_000 });
      const u = r.untwisted;
      // condensate fraction of the sites in puddles (|phi|^2 > 1e-2)
      let puddleCondensed = 0;
      let puddleAtoms = 0;
      for (let i = 0; i < geometry.siteCount; i++) {
        const c = u.phiRe[i] ** 2 + u.phiIm[i] ** 2;
        if (c > 1e-2) {
          puddleCondensed += c;
          puddleAtoms += u.density[i];
        }
      }
      rows.push({
        W,
        fs: Math.max(...r.axes.map((a) => a.value as number)),
        condensate: u.condensedAtoms / u.atoms,
        puddle: puddleAtoms > 0 ? puddleCondensed / puddleAtoms : 0,
      });
    }
    const [clean, glass] = rows;
    console.log('strong disorder (12x12, J/U = 0.01, mu/U = 0.5):', JSON.stringify(rows));
    // clean: inside the Mott lobe, nothing condensed, no stiffness
    expect(clean.condensate).toBeLessThan(1e-20);
    expect(Math.abs(clean.fs)).toBeLessThan(1e-12);
    // disordered: a finite condensate in puddles, a stiffness at least a hundred times smaller
    expect(glass.condensate).toBeGreaterThan(5e-3);
    expect(glass.puddle).toBeGreaterThan(0.05);
    expect(glass.fs).toBeGreaterThanOrEqual(0);
    expect(glass.fs).toBeLessThan(0.01 * glass.condensate);
  });
});

// Local superfluid fraction per bond (localFraction): Hellmann-Feynman makes the bond
// currents sum to dOmega/dq, so the bond shares must add up to the curvature (the plain
// mean of f_b is f_s), and in a clean lattice every bond carries the same f_b = |phi|^2/n (the
// homogeneous identity above). Open axes have no map.
describe('local superfluid fraction per bond', () => {
  it('clean lattice: every bond f_b = |phi|^2/n to 1e-6', () => {
    const geometry = createLatticeGeometry([8, 8], [true, true]);
    const model = uniformModel(geometry, 1, 0.05, 8);
    const r = superfluidStiffness(model, { mu: 0.5, temperature: 0, initialPhi: start(model), tolerance: 1e-13, maxSweeps: 100_000 });
    const ref = solveHomogeneous({ zJ: 4 * 0.05, interactionU: 1, mu: 0.5, temperature: 0, nmax: 8 });
    const expected = (ref.phi * ref.phi) / ref.density;
    for (const a of r.axes) {
      const f = a.localFraction as Float64Array;
      expect(f).toHaveLength(64);
      for (const v of f) expect(Math.abs(v - expected)).toBeLessThan(1e-6);
    }
  });

  it('disordered lattice: the mean of f_b is f_s; open axis has none', () => {
    const geometry = createLatticeGeometry([12, 10], [true, false]);
    const model = uniformModel(geometry, 1, 0.03, 6);
    model.eps.set(boxDisorder(geometry.siteCount, 1.0, 'local-map'));
    const r = superfluidStiffness(model, { mu: 0.5, temperature: 0, initialPhi: start(model), tolerance: 1e-12, maxSweeps: 200_000 });
    const x = r.axes[0];
    const f = x.localFraction as Float64Array;
    // periodic along x: every site has one bond i -> i + e_x
    let sum = 0;
    let weights = 0;
    let spreadMin = Infinity;
    let spreadMax = -Infinity;
    for (let i = 0; i < f.length; i++) {
      sum += f[i];
      weights += 1;
      spreadMin = Math.min(spreadMin, f[i]);
      spreadMax = Math.max(spreadMax, f[i]);
    }
    expect(x.value as number).toBeGreaterThan(0.01);
    expect(Math.abs(sum / weights - (x.value as number))).toBeLessThan(1e-5 * (x.value as number) + 1e-9);
    // disorder makes the local map non-uniform (not a constant copied to every bond)
    expect(spreadMax - spreadMin).toBeGreaterThan(0.01);
    expect(r.axes[1].localFraction).toBeNull();
  });
});

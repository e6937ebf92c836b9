// The local-density-approximation label against the analytic mean-field phase diagram at
// T = 0: the boundary of the Mott lobe of filling n is zJ_c(x) = (n - x)(x - n + 1)/(1 + x),
// x = mu/U in (n - 1, n) (van Oosten, van der Straten & Stoof, PRA 63, 053601 (2001)), and
// the vacuum (n = 0) is stable for mu < -zJ (a particle costs -mu and gains at most zJ).
// Points are taken clearly inside (0.7 zJ_c) and clearly outside (2 zJ_c, where the
// condensate fraction is well above 2 %); close to the boundary the relative coherence
// threshold labels the weakly coherent homogeneous superfluid Mott, as it does for sites.

import { describe, expect, it } from 'vitest';
import { compareWithLocalDensity, localCoordinationHopping, localDensityPhases } from '../../src/observables/localDensityPhase.js';
import { defaultPhaseThresholds } from '../../src/observables/phaseThresholds.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';
import type { PhaseRule } from '../../src/observables/phaseRule.js';

const rule: PhaseRule = { thresholds: { ...defaultPhaseThresholds }, thermal: false, compressibleCode: PhaseCode.superfluid };
const boundary = (n: number, x: number): number => ((n - x) * (x - n + 1)) / (1 + x);

describe('local-density label at T = 0', () => {
  it('is Mott inside the analytic lobes, superfluid well outside, empty below the vacuum edge', () => {
    const points: { mu: number; zJ: number; code: number; filling: number }[] = [];
    for (const n of [1, 2, 3]) {
      for (const t of [0.2, 0.35, 0.5, 0.65, 0.8]) {
        const x = n - 1 + t;
        points.push({ mu: x, zJ: 0.7 * boundary(n, x), code: PhaseCode.mott, filling: n });
        points.push({ mu: x, zJ: 2 * boundary(n, x), code: PhaseCode.superfluid, filling: 0 });
      }
    }
    for (const zJ of [0.05, 0.1]) {
      points.push({ mu: -1.5 * zJ, zJ, code: PhaseCode.empty, filling: 0 });
      points.push({ mu: -0.5 * zJ, zJ, code: PhaseCode.superfluid, filling: 0 });
    }
    const lda = localDensityPhases(
      {
        chemicalPotential: 0,
        sitePotential: Float64Array.from(points, (p) => -p.mu),
        interactionU: 1,
        coordinationHopping: Float64Array.from(points, (p) => p.zJ),
        temperature: 0,
        nmax: 8,
      },
      rule,
    );
    points.forEach((p, i) => {
      expect(lda.codes[i], `mu/U = ${p.mu}, zJ/U = ${p.zJ}`).toBe(p.code);
      expect(lda.mottFilling[i]).toBe(p.filling);
    });
    expect(lda.evaluations).toBe(points.length);
  });

  it('evaluates equal local parameters once', () => {
    const eps = Float64Array.from([0.1, 0.3, 0.1, 0.3, 0.1]);
    const lda = localDensityPhases({ chemicalPotential: 0.6, sitePotential: eps, interactionU: 1, coordinationHopping: 0.02, temperature: 0, nmax: 5 }, rule);
    expect(lda.evaluations).toBe(2);
    expect(Array.from(lda.codes)).toEqual(Array(5).fill(PhaseCode.mott));
  });
});

describe('local hopping of the homogeneous reference', () => {
  it('is 2 J per axis for uniform hopping, and the sum of the two bonds per axis otherwise', () => {
    expect(localCoordinationHopping([4, 3], [false, false], [0.1, 0.2])).toBeCloseTo(0.6, 15);
    // A 1D lattice of 4 sites with bonds 0-1: 1, 1-2: 2, 2-3: 3 (entry 3 unused when open).
    const open = localCoordinationHopping([4], [false], [Float64Array.from([1, 2, 3, 99])]) as Float64Array;
    expect(Array.from(open)).toEqual([2, 3, 5, 6]);
    const ring = localCoordinationHopping([4], [true], [Float64Array.from([1, 2, 3, 4])]) as Float64Array;
    expect(Array.from(ring)).toEqual([5, 3, 5, 7]);
  });
});

describe('comparison of site and LDA labels', () => {
  it('counts agreements, different phases and different Mott fillings', () => {
    const site = Uint8Array.from([PhaseCode.mott, PhaseCode.superfluid, PhaseCode.mott, PhaseCode.empty, PhaseCode.superfluid]);
    const siteFilling = Int32Array.from([1, 0, 2, 0, 0]);
    const lda = {
      codes: Uint8Array.from([PhaseCode.mott, PhaseCode.mott, PhaseCode.mott, PhaseCode.empty, PhaseCode.mott]),
      mottFilling: Int32Array.from([1, 1, 1, 0, 1]),
      evaluations: 5,
    };
    const c = compareWithLocalDensity(site, siteFilling, lda);
    expect(c.agree).toBe(2);
    expect(c.disagree).toBe(3);
    expect(c.pairs).toEqual([{ site: 'superfluid', lda: 'mott', sites: 2 }]);
    expect(c.mottFillingDiffers).toBe(1);
    expect(c.mottSitesByFilling).toEqual({ site: [0, 1, 1], lda: [0, 4] });
  });
});

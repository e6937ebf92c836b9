// Mott shells at T > 0 against the exact atomic limit (J = 0), computed here independently:
// one Bose-Hubbard site in the grand-canonical ensemble, E_m = U m(m-1)/2 - mu m,
// p_m ~ exp(-E_m/kT) over m = 0..14, n = <m>, and the fluctuation-dissipation relation
// dn/dmu = Var(m)/kT, exact for a site at J = 0.
//
// A chain of sites samples the local chemical potential mu_loc = mu - eps from -0.3 U to
// 2.3 U (a trap seen along one line). At ordinary temperatures (kT/U = 0.02, 0.05, 0.1,
// 0.15) the Mott shells must be exactly the density plateaus |n - k| <= 0.05: the thermal
// particle-hole defects raise the compressibility well above zero (U dn/dmu = 0.13 at the
// centre of the n = 1 plateau at kT = 0.1 U), but stay far below the normal fluid between
// plateaus at the same temperature. The plateau melts near kT = 0.2 U at n = 1 (Gerbier,
// PRL 99, 120405 (2007)); with the default thresholds the plateau centre stops being Mott
// where 4 Var(m) = 0.5 there, kT = 0.19 U, found here by bisection on the exact formula.
// At J = 0 the local-density-approximation label must equal the site label everywhere.

import { describe, expect, it } from 'vitest';
import { classifySites } from '../../src/observables/siteClassification.js';
import { PhaseCode } from '../../src/observables/phaseCodes.js';

interface Exact {
  n: number;
  variance: number;
  parityOdd: number;
  kappa: number;
}

/** Exact thermal site at J = 0 (energies in units of U). */
function exactSite(muLoc: number, kT: number): Exact {
  const levels = 15;
  const energies = Array.from({ length: levels }, (_, m) => (m * (m - 1)) / 2 - muLoc * m);
  const eMin = Math.min(...energies);
  let z = 0;
  let m1 = 0;
  let m2 = 0;
  let odd = 0;
  energies.forEach((e, m) => {
    const w = kT > 0 ? Math.exp(-(e - eMin) / kT) : e === eMin ? 1 : 0;
    z += w;
    m1 += m * w;
    m2 += m * m * w;
    if (m % 2 === 1) odd += w;
  });
  const n = m1 / z;
  const variance = m2 / z - n * n;
  return { n, variance, parityOdd: odd / z, kappa: kT > 0 ? variance / kT : 0 };
}

const mu = 2.3;
const muLocal = Array.from({ length: 521 }, (_, i) => -0.3 + (2.6 * i) / 520);
// Plateau centres mu_loc = U/2 and 3U/2 are on the grid (i = 160 and 360).

function classifyChain(kT: number, options: { compressibility?: boolean } = {}) {
  const sites = muLocal.map((m) => exactSite(m, kT));
  const count = sites.length;
  return {
    sites,
    result: classifySites({
      shape: [count],
      density: Float64Array.from(sites, (s) => s.n),
      condensateDensity: new Float64Array(count),
      compressibility: Float64Array.from(sites, (s) => (options.compressibility === false ? 0 : s.kappa)),
      compressibilityComputed: options.compressibility !== false,
      numberVariance: Float64Array.from(sites, (s) => s.variance),
      parityOdd: Float64Array.from(sites, (s) => s.parityOdd),
      energyScale: 1,
      temperature: kT,
      disordered: false,
      nmax: 10,
      localDensity: {
        chemicalPotential: mu,
        sitePotential: Float64Array.from(muLocal, (m) => mu - m),
        interactionU: 1,
        coordinationHopping: 0,
        temperature: kT,
        nmax: 10,
      },
    }),
  };
}

describe('thermal Mott shells in the atomic limit (J = 0)', () => {
  for (const kT of [0.02, 0.05, 0.1, 0.15]) {
    it(`kT = ${kT} U: the shells are exactly the density plateaus |n - k| <= 0.05, and the LDA agrees`, () => {
      const { sites, result } = classifyChain(kT);
      for (let i = 0; i < sites.length; i++) {
        const n = sites[i].n;
        const k = Math.round(n);
        const plateau = k >= 1 && Math.abs(n - k) <= 0.05;
        expect(result.codes[i], `mu_loc = ${muLocal[i].toFixed(3)}, n = ${n}`).toBe(
          plateau ? PhaseCode.mott : n < 0.01 ? PhaseCode.empty : PhaseCode.normalFluid,
        );
        expect(result.mottFilling[i]).toBe(plateau ? k : 0);
      }
      expect(result.codes[160]).toBe(PhaseCode.mott);
      expect(result.codes[360]).toBe(PhaseCode.mott);
      expect(result.fluctuationMeasure).toBe('compressibility');
      expect(result.meltedPlateauSites).toBe(0);
      // The thermal reference of each shell is the exact plateau centre at the same kT.
      for (const filling of [1, 2]) {
        const centre = exactSite(filling - 0.5, kT);
        const shell = result.shellStatistics.find((s) => s.filling === filling)!;
        expect(shell.atomicReference.numberVariance).toBeCloseTo(centre.variance, 12);
        expect(shell.atomicReference.parityOdd).toBeCloseTo(centre.parityOdd, 12);
        expect(shell.maxCondensateFraction).toBe(0);
      }
      // The local-density label at J = 0 is the same atomic site: no disagreement.
      expect(result.localDensity?.comparison.disagree).toBe(0);
      expect(result.localDensity?.comparison.mottSitesByFilling.lda).toEqual(result.mottSitesByFilling);
    });
  }

  it('an absolute bound U dn/dmu < 0.05 would have erased the thermal shell at kT = 0.1 U; the thermal rule keeps it', () => {
    const centre = exactSite(0.5, 0.1);
    // (U/kT) 2 e^{-U/2kT}/(1 + 2 e^{-U/2kT}) at the plateau centre, leading order.
    const x = Math.exp(-0.5 / 0.1);
    expect(centre.kappa).toBeCloseTo((1 / 0.1) * ((2 * x) / (1 + 2 * x)), 3);
    expect(centre.kappa).toBeGreaterThan(0.05);
    expect(classifyChain(0.1).result.codes[160]).toBe(PhaseCode.mott);
  });

  it('the n = 1 plateau melts near kT = 0.2 U (Gerbier 2007): at 4 Var = 0.5 of the plateau centre', () => {
    // Exact melting point of the default rule: 4 Var(kT) = 0.5 at mu_loc = U/2, by bisection.
    let lo = 0.1;
    let hi = 0.3;
    for (let k = 0; k < 60; k++) {
      const mid = 0.5 * (lo + hi);
      if (4 * exactSite(0.5, mid).variance < 0.5) lo = mid;
      else hi = mid;
    }
    const melting = 0.5 * (lo + hi);
    expect(melting).toBeGreaterThan(0.17);
    expect(melting).toBeLessThan(0.21);
    const centreCode = (kT: number) => classifyChain(kT).result.codes[160];
    expect(centreCode(0.98 * melting)).toBe(PhaseCode.mott);
    expect(centreCode(1.02 * melting)).toBe(PhaseCode.normalFluid);
    const hot = classifyChain(0.25).result;
    expect(hot.counts.mott).toBe(0);
    expect(hot.meltedPlateauSites).toBeGreaterThan(0);
    // Just above the melting point no site of the n = 1 plateau is left.
    expect(classifyChain(1.05 * melting).result.mottSitesByFilling[1] ?? 0).toBe(0);
  });

  it('without a computed compressibility the variance gives the same labels (fluctuation-dissipation at J = 0)', () => {
    for (const kT of [0.05, 0.15, 0.19]) {
      const withKappa = classifyChain(kT).result;
      const withVariance = classifyChain(kT, { compressibility: false }).result;
      expect(withVariance.fluctuationMeasure).toBe('numberVariance');
      expect(Array.from(withVariance.codes)).toEqual(Array.from(withKappa.codes));
    }
  });

  it('at T = 0 the exact staircase is all Mott shells, except the degeneracy points', () => {
    const { sites, result } = classifyChain(0);
    const fillings = new Set(Array.from(result.mottFilling).filter((f) => f > 0));
    expect([...fillings].sort()).toEqual([1, 2, 3]);
    // At mu_loc = U and 2U exactly (on the grid) two fillings are degenerate: n = 1.5, 2.5.
    const offInteger = sites.filter((s) => Math.abs(s.n - Math.round(s.n)) > 0.05).length;
    expect(offInteger).toBe(2);
    expect(result.counts.normalFluid).toBe(0);
    expect(result.counts.superfluid).toBe(offInteger);
    expect(result.fluctuationMeasure).toBe('none');
  });
});

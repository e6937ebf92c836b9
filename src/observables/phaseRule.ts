// The decision rule of one site, shared by the lattice sites (siteClassification.ts) and by
// their local-density-approximation twins (localDensityPhase.ts), so the two labels differ
// only where the physics does. Thresholds and their reasons: phaseThresholds.ts.
//
// For a site of density n, condensate density c = |phi|^2, condensate fraction f = c / n and
// (T > 0) fluctuation ratio r = 4 kT dn/dmu (the compressibility in units of the
// normal-fluid reference 1/(4 kT); at J = 0 it equals 4 (<n^2> - <n>^2)):
//   1. n < emptyDensityMax                                         -> empty
//   2. k = round(n) >= 1, |n - k| <= integerTolerance (a density plateau),
//      f <= condensateFractionMax or c <= condensateMin (no condensate of its own),
//      and, at T > 0 only, r <= compressibilityMin (thermal fluctuations suppressed)
//                                                                  -> Mott insulator, filling k
//   3. f > condensateFractionMax and c > condensateMin             -> superfluid
//   4. otherwise: no condensate but compressible or off-integer. At T > 0 a normal fluid
//      (thermal excitations make a fluid compressible without disorder, and the Bose glass,
//      a T = 0 phase, is no longer distinct from it); at T = 0 with disorder a Bose glass;
//      at T = 0 clean, superfluid (the clean mean-field lattice has no compressible
//      insulator: these are the superfluid sites closest to a lobe edge, where |phi|^2 -> 0
//      continuously; counted apart so a caller can mention them).
// At T = 0 a Gutzwiller Mott site is a Fock state up to the proximity-induced admixture, so
// the density and coherence criteria suffice; the compressibility is reported, not used.

import { PhaseCode, type PhaseCodeValue } from './phaseCodes.js';
import type { PhaseThresholds } from './phaseThresholds.js';

export interface PhaseRule {
  thresholds: PhaseThresholds;
  /** true at T > 0: the fluctuation criterion applies */
  thermal: boolean;
  /** label of rule 4 */
  compressibleCode: PhaseCodeValue;
}

/** Rule 2's filling test: the plateau filling k, or 0 when the density is off-integer. */
export function plateauFilling(density: number, integerTolerance: number): number {
  const k = Math.round(density);
  return k >= 1 && Math.abs(density - k) <= integerTolerance ? k : 0;
}

/** True when the site carries a condensate of its own (rule 3). */
export function isCoherent(density: number, condensate: number, t: PhaseThresholds): boolean {
  return condensate > t.condensateMin && condensate > t.condensateFractionMax * density;
}

/**
 * The label of one site. `fluctuationRatio` is 4 kT dn/dmu (ignored at T = 0; pass NaN
 * there). Returns the phase code; the Mott filling is plateauFilling(density).
 */
export function phaseOf(density: number, condensate: number, fluctuationRatio: number, rule: PhaseRule): PhaseCodeValue {
  const t = rule.thresholds;
  if (density < t.emptyDensityMax) return PhaseCode.empty;
  const coherent = isCoherent(density, condensate, t);
  if (!coherent && plateauFilling(density, t.integerTolerance) > 0) {
    // NaN (fluctuations unknown) fails the comparison, so an unknown never makes a shell at T > 0.
    if (!rule.thermal || fluctuationRatio <= t.compressibilityMin) return PhaseCode.mott;
  }
  if (coherent) return PhaseCode.superfluid;
  return rule.compressibleCode;
}

/** Compressible-without-condensate label (rule 4) for the given conditions. */
export function compressibleLabel(thermal: boolean, disordered: boolean): 'normalFluid' | 'boseGlass' | 'superfluid' {
  return thermal ? 'normalFluid' : disordered ? 'boseGlass' : 'superfluid';
}

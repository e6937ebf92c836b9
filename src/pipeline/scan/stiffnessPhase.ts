// The phase of a whole lattice by the stiffness criterion (Fisher, Weichman, Grinstein &
// Fisher, PRB 40, 546 (1989)), one label per solve, for the disorder phase maps of `scan`:
//   Mott insulator   incompressible: every site at the same integer filling (nearest integer)
//                    and the mean compressibility per site (1/N) sum_i dn_i/dmu below
//                    MOTT_COMPRESSIBILITY_MAX / U at T = 0 (a Mott state has dn/dmu = 0
//                    exactly in mean field); at T > 0 below phases.compressibilityMin of the
//                    atomic-limit 1/(4 kT), the site rule of siteClassification.ts.
//                    Why the filling test: the compressibility is a finite difference over a
//                    small step of mu, and near J = 0 a finite disordered lattice whose sites
//                    sit at two fillings has no site within that step of a filling change,
//                    so it reads incompressible; in the infinite lattice such domains of two
//                    fillings always hold sites at the edge (the rare regions of a Bose glass,
//                    Fisher et al. 1989), so it is compressible. One filling everywhere with
//                    dn/dmu = 0 is the Mott insulator (at J = 0: W/2 < mu < U - W/2 exactly);
//   superfluid       compressible with a superfluid fraction (phase twist) of at least
//                    SUPERFLUID_FRACTION_MIN;
//   Bose glass       compressible, superfluid fraction below it (at T > 0: normal fluid, the
//                    compressible insulator of a thermal cloud).
// An empty lattice is 'empty'. Without the compressibility (solver.compressibility false) or
// the superfluid fraction (solver.stiffness off, no periodic axis) there is no label (null).
//
// Both thresholds are our choice (no published convention): f_s of a mean-field Bose glass
// is small but not zero (puddles couple through exponentially small tails of phi), and f_s
// of a clean superfluid goes to zero continuously at the Mott boundary, so any threshold
// misplaces a sliver next to the superfluid boundary. The map says so in its caption, and
// the superfluid fraction itself is in every row.

import type { PhaseName } from '../../observables/phaseCodes.js';

/** Mean compressibility per site below this, in units of 1/U: incompressible at T = 0 (our choice). */
export const MOTT_COMPRESSIBILITY_MAX = 1e-3;
/** Superfluid fraction at or above this: superfluid (our choice). */
export const SUPERFLUID_FRACTION_MIN = 0.01;
/** The labels a whole-lattice reading can take, in the order of the share columns. */
export const STIFFNESS_PHASES = ['mott', 'boseGlass', 'superfluid', 'normalFluid', 'empty'] as const satisfies readonly PhaseName[];
export type StiffnessPhase = (typeof STIFFNESS_PHASES)[number];

export interface StiffnessPhaseInput {
  atoms: number;
  /** (1/N_sites) sum_i dn_i/dmu times U (dimensionless), NaN when not computed */
  compressibilityPerSiteU: number;
  /** k_B T / U */
  kTOverU: number;
  /** superfluid fraction (mean over the periodic axes), NaN without one */
  superfluidFraction: number;
  /** phases.compressibilityMin (T > 0 rule) */
  compressibilityMin: number;
  /** every site's density rounds to the same integer */
  uniformFilling: boolean;
}

export function stiffnessPhase(x: StiffnessPhaseInput): StiffnessPhase | null {
  if (!(x.atoms > 1e-9)) return 'empty';
  if (Number.isNaN(x.compressibilityPerSiteU) || Number.isNaN(x.superfluidFraction)) return null;
  const thermal = x.kTOverU > 0;
  // T > 0: kT dn/dmu against the atomic-limit normal fluid between two fillings, 1/4
  const incompressible = !x.uniformFilling ? false : thermal ? x.kTOverU * x.compressibilityPerSiteU < x.compressibilityMin / 4 : x.compressibilityPerSiteU < MOTT_COMPRESSIBILITY_MAX;
  if (incompressible && x.superfluidFraction < SUPERFLUID_FRACTION_MIN) return 'mott';
  if (x.superfluidFraction >= SUPERFLUID_FRACTION_MIN) return 'superfluid';
  return thermal ? 'normalFluid' : 'boseGlass';
}

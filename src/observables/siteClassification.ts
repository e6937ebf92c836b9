// Site-by-site phase classification of a Gutzwiller solution (DESIGN.md section 1):
// empty / superfluid / Mott insulator / Bose glass / normal fluid, with stated
// thresholds, Mott filling per site, per-class counts and the superfluid cluster
// analysis (spanning or puddles).
//
// Phases follow Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989): the Mott
// insulator is incompressible with integer filling; the Bose glass is a compressible
// insulator that exists only with disorder and at T = 0; the superfluid has a
// condensate. In site-decoupled mean-field theory the Bose glass appears as
// compressible sites without a condensate next to superfluid puddles that do not
// connect across the cloud (Buonsante et al., PRA 76, 011602 (2007)).
//
// Decision for site i, in this order (n = density, c = |phi_i|^2, k = energyScale * dn_i/dmu):
//   1. n < emptyDensityMax                                  -> empty
//   2. c > condensateMin                                    -> superfluid
//   3. |n - round(n)| <= integerTolerance, round(n) >= 1,
//      and k < compressibilityMin                           -> Mott (filling round(n))
//   4. otherwise (compressible, or off-integer) the site is a compressible site without
//      condensate; what it is depends on the conditions the caller states:
//        - finiteTemperature: normal fluid. At T > 0 thermal excitations make a fluid
//          compressible without any disorder, and the Bose glass (a T = 0 phase) is no
//          longer sharply distinct from the normal fluid, so we do not claim it.
//        - T = 0 and disordered: Bose glass.
//        - T = 0 and clean: mean-field theory of the clean lattice has no compressible
//          insulator (only superfluid and Mott); such sites are the superfluid sites
//          closest to a Mott boundary, where |phi|^2 -> 0 continuously while dn/dmu
//          stays finite. They are classified superfluid and counted in
//          `superfluidBelowCondensateThreshold` so a caller can mention them.
// Superfluid sites of clusters that do not span the cloud stay 'superfluid' locally;
// they are counted as `superfluidPuddleSites` (clusters: superfluidClusters.ts, with the
// cloud = non-empty sites).
//
// Default thresholds (all user options; the report should state the ones used):
// - emptyDensityMax = 0.01 atoms per site: below one atom per hundred sites, a site
//   contributes nothing visible to an image and the condensate and compressibility
//   criteria lose meaning in the exponentially thin tail outside the cloud.
// - condensateMin = 1e-4 for |phi|^2 (atoms per site), i.e. |phi| > 0.01: far above
//   the noise of a converged solution (a residual of 1e-8 in phi gives |phi|^2 ~ 1e-16)
//   and below any condensate density an experiment resolves.
// - compressibilityMin = 0.05 for energyScale * dn/dmu with energyScale = U: a
//   superfluid has U dn/dmu of order 1 (dn/dmu = 1/U for a weakly interacting
//   condensate, mu = U n), so the threshold calls a site incompressible when it is
//   about 20 times stiffer than that. In the atomic limit a site at the centre of the
//   n = 1 plateau (mu = U/2) has U dn/dmu = (U/kT) 2 e^{-U/2kT} / (1 + 2 e^{-U/2kT})
//   (Boltzmann weights of one hole and one extra particle, each costing U/2), which
//   crosses 0.05 at kT = 0.081 U: with this default the thermal Mott shell counts as
//   Mott up to about kT = 0.08 U at its centre and less towards its edges.
// - integerTolerance = 0.05 atoms: a loose guard for T > 0, where thermal holes and
//   doubly occupied sites shift n away from the integer while the site is still
//   nearly incompressible; the compressibility threshold is the sharper criterion.
//   At T = 0 a Gutzwiller Mott site is an exact Fock state, so any tolerance works.

import { PhaseCode, type PhaseName } from './phaseCodes.js';
import { labelSuperfluidClusters, type SuperfluidClusters } from './superfluidClusters.js';

export interface PhaseThresholds {
  /** Sites with density below this are empty (atoms per site). */
  emptyDensityMax: number;
  /** Sites with |phi|^2 above this are superfluid (atoms per site). */
  condensateMin: number;
  /** Largest |n - round(n)| of a Mott site (atoms per site). */
  integerTolerance: number;
  /** Largest energyScale * dn/dmu of a Mott site (dimensionless). */
  compressibilityMin: number;
}

export const defaultPhaseThresholds: Readonly<PhaseThresholds> = Object.freeze({
  emptyDensityMax: 0.01,
  condensateMin: 1e-4,
  integerTolerance: 0.05,
  compressibilityMin: 0.05,
});

export interface SiteClassificationInput {
  /** Lattice shape [nx], [nx, ny] or [nx, ny, nz]; C order. */
  shape: readonly number[];
  /** Periodic boundary per axis (for cluster connectivity); default open. */
  periodic?: readonly boolean[];
  /** Mean occupation n_i. */
  density: Float64Array;
  /** Condensate density |phi_i|^2. */
  condensateDensity: Float64Array;
  /** Local compressibility dn_i/dmu, in 1/(energy unit of mu). */
  compressibility: Float64Array;
  /** Optional entropy per site (units of k_B); summed per phase when given. */
  entropy?: Float64Array;
  /** Energy (unit of mu) that makes dn/dmu dimensionless; pass U. */
  energyScale: number;
  /** True when the solution is at T > 0. */
  finiteTemperature: boolean;
  /** True when the site potential contains disorder (box or speckle). */
  disordered: boolean;
  thresholds?: Partial<PhaseThresholds>;
}

export type PhaseTotals = Record<PhaseName, number>;

export interface SiteClassification {
  /** PhaseCode per site. */
  codes: Uint8Array;
  /** Integer filling of Mott sites, 0 elsewhere. */
  mottFilling: Int32Array;
  /** Number of sites per phase. */
  counts: PhaseTotals;
  /** Mott sites per filling (index = filling; index 0 is always 0). */
  mottSitesByFilling: number[];
  /** Sum of the entropy per phase (k_B), when entropy was given. */
  entropyByPhase?: PhaseTotals;
  /** The thresholds actually used (defaults merged with the caller's). */
  thresholds: PhaseThresholds;
  /** Phase given to compressible sites without condensate (rule 4 in the file header). */
  compressibleWithoutCondensate: 'normalFluid' | 'boseGlass' | 'superfluid';
  /** Clean T = 0 sites classified superfluid by rule 4 (condensate below threshold). */
  superfluidBelowCondensateThreshold: number;
  /** Connected superfluid clusters; the cloud for spanning is the set of non-empty sites. */
  clusters: SuperfluidClusters;
  /** Superfluid sites that belong to clusters that do not span the cloud. */
  superfluidPuddleSites: number;
  /** True when some superfluid cluster spans the cloud. */
  superfluidSpans: boolean;
}

function mergeThresholds(overrides: Partial<PhaseThresholds> | undefined): PhaseThresholds {
  const merged: PhaseThresholds = { ...defaultPhaseThresholds, ...overrides };
  for (const key of Object.keys(defaultPhaseThresholds) as (keyof PhaseThresholds)[]) {
    const value = merged[key];
    if (!Number.isFinite(value) || value < 0) {
      throw new RangeError(`classification thresholds.${key}: expected a finite number >= 0, got ${value}`);
    }
  }
  if (merged.integerTolerance >= 0.5) {
    throw new RangeError(
      `classification thresholds.integerTolerance: expected < 0.5 (half the distance between fillings), got ${merged.integerTolerance}`,
    );
  }
  return merged;
}

function zeroTotals(): PhaseTotals {
  return { empty: 0, superfluid: 0, mott: 0, boseGlass: 0, normalFluid: 0 };
}

const nameOfCode: readonly PhaseName[] = ['empty', 'superfluid', 'mott', 'boseGlass', 'normalFluid'];

/** Classifies every site (rules and default thresholds in the file header). */
export function classifySites(input: SiteClassificationInput): SiteClassification {
  const { shape, density, condensateDensity, compressibility, entropy, energyScale } = input;
  const siteCount = density.length;
  const expected = Array.isArray(shape) ? shape.reduce((p, n) => p * n, 1) : NaN;
  if (siteCount !== expected) {
    throw new RangeError(
      `classification density: expected ${expected} sites for shape ${JSON.stringify(shape)}, got ${siteCount}`,
    );
  }
  const arrays: [string, Float64Array | undefined][] = [
    ['condensateDensity', condensateDensity],
    ['compressibility', compressibility],
    ['entropy', entropy],
  ];
  for (const [name, array] of arrays) {
    if (array !== undefined && array.length !== siteCount) {
      throw new RangeError(`classification ${name}: expected ${siteCount} sites, got ${array.length}`);
    }
  }
  if (!Number.isFinite(energyScale) || energyScale <= 0) {
    throw new RangeError(
      `classification energyScale: expected the interaction energy U (> 0, unit of mu), got ${energyScale}`,
    );
  }
  const thresholds = mergeThresholds(input.thresholds);
  const { emptyDensityMax, condensateMin, integerTolerance, compressibilityMin } = thresholds;
  const compressibleWithoutCondensate = input.finiteTemperature
    ? 'normalFluid'
    : input.disordered
      ? 'boseGlass'
      : 'superfluid';
  const compressibleCode = PhaseCode[compressibleWithoutCondensate];

  const codes = new Uint8Array(siteCount);
  const mottFilling = new Int32Array(siteCount);
  const superfluidMask = new Uint8Array(siteCount);
  const occupied = new Uint8Array(siteCount);
  let superfluidBelowCondensateThreshold = 0;

  for (let i = 0; i < siteCount; i++) {
    const n = density[i];
    const condensate = condensateDensity[i];
    if (!Number.isFinite(n) || !Number.isFinite(condensate)) {
      throw new RangeError(`classification: density or condensateDensity is not finite at site ${i}`);
    }
    if (n < emptyDensityMax) {
      codes[i] = PhaseCode.empty;
      continue;
    }
    occupied[i] = 1;
    if (condensate > condensateMin) {
      codes[i] = PhaseCode.superfluid;
      superfluidMask[i] = 1;
      continue;
    }
    const filling = Math.round(n);
    const stiff = energyScale * compressibility[i] < compressibilityMin;
    if (stiff && filling >= 1 && Math.abs(n - filling) <= integerTolerance) {
      codes[i] = PhaseCode.mott;
      mottFilling[i] = filling;
      continue;
    }
    codes[i] = compressibleCode;
    if (compressibleCode === PhaseCode.superfluid) {
      superfluidMask[i] = 1;
      superfluidBelowCondensateThreshold++;
    }
  }

  const counts = zeroTotals();
  const entropyByPhase = entropy !== undefined ? zeroTotals() : undefined;
  const mottSitesByFilling: number[] = [0];
  for (let i = 0; i < siteCount; i++) {
    const name = nameOfCode[codes[i]];
    counts[name]++;
    if (entropyByPhase !== undefined && entropy !== undefined) entropyByPhase[name] += entropy[i];
    const filling = mottFilling[i];
    if (filling > 0) {
      while (mottSitesByFilling.length <= filling) mottSitesByFilling.push(0);
      mottSitesByFilling[filling]++;
    }
  }

  const clusters = labelSuperfluidClusters(superfluidMask, {
    shape,
    periodic: input.periodic,
    occupied,
  });
  return {
    codes,
    mottFilling,
    counts,
    mottSitesByFilling,
    ...(entropyByPhase !== undefined ? { entropyByPhase } : {}),
    thresholds,
    compressibleWithoutCondensate,
    superfluidBelowCondensateThreshold,
    clusters,
    superfluidPuddleSites: clusters.markedSites - clusters.sitesInSpanningClusters,
    superfluidSpans: clusters.spans,
  };
}

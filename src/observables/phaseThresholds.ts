// Thresholds of the site-by-site phase labels (DESIGN.md section 1, "Phases, site by site"):
// every one is relative to a physical scale, so that the labels agree with what the density
// plot shows, and each carries the reason for its default (printed in the report).
//
// The scale of each:
// - density: atoms per site (a filling is an integer);
// - coherence: the local condensate fraction |phi|^2 / n, not |phi|^2 itself, so a shell
//   next to a superfluid keeps its label while the superfluid's tail leaks into it
//   (proximity-induced coherence, reported per shell instead);
// - fluctuations at T > 0: the thermal expectation. A site that fluctuates with equal weight
//   between two neighbouring fillings has number variance 1/4, and in the atomic limit
//   (fluctuation-dissipation, kT dn/dmu = variance) compressibility 1/(4 kT). A Mott site
//   must be markedly stiffer than that normal-fluid reference at the same temperature; an
//   absolute bound on U dn/dmu would instead reject every thermal shell once kT ~ 0.08 U,
//   although the plateau persists to about 0.2 U (Gerbier, PRL 99, 120405 (2007)).

export interface PhaseThresholds {
  /** Sites with density below this are empty (atoms per site). */
  emptyDensityMax: number;
  /** Largest local condensate fraction |phi|^2 / n of a Mott (or other non-superfluid) site. */
  condensateFractionMax: number;
  /** Absolute floor: |phi|^2 at or below this never counts as a condensate (atoms per site). */
  condensateMin: number;
  /** Largest |n - k| of a Mott site of filling k (atoms per site). */
  integerTolerance: number;
  /**
   * T > 0 only: a site is compressible (not Mott) when kT dn/dmu exceeds this fraction of 1/4,
   * i.e. when its compressibility exceeds this fraction of 1/(4 kT), the normal-fluid
   * reference of the atomic limit at the same temperature (dimensionless).
   */
  compressibilityMin: number;
  /** Spanning test: the bulk of the cloud is where the density exceeds this fraction of its peak. */
  bulkDensityFraction: number;
  /** Spanning test: the bulk is eroded by this many sites (nearest-neighbour layers). */
  bulkErosionSites: number;
}

export const defaultPhaseThresholds: Readonly<PhaseThresholds> = Object.freeze({
  emptyDensityMax: 0.01,
  condensateFractionMax: 0.02,
  condensateMin: 1e-4,
  integerTolerance: 0.05,
  compressibilityMin: 0.5,
  bulkDensityFraction: 0.1,
  bulkErosionSites: 1,
});

/** Why each default is what it is (one sentence each; the report prints them). */
export const thresholdReasons: Readonly<Record<keyof PhaseThresholds, string>> = Object.freeze({
  emptyDensityMax:
    'below one atom per hundred sites a site adds nothing visible to an image, and the coherence and fluctuation criteria lose meaning in the thin tail of the cloud',
  condensateFractionMax:
    'relative to the local density: the superfluid next to a shell induces a small condensate inside it (a few 10⁻³ of the density near the shell edge), which must not erase the shell; a superfluid site has a condensate fraction of order one',
  condensateMin:
    'an absolute floor far above the noise of a converged solution (a residual of 10⁻⁸ in φ gives |φ|² ~ 10⁻¹⁶); with the default relative threshold it matters only for very dilute sites',
  integerTolerance:
    'the density plateau a physicist reads off a profile: within 0.05 of an integer the density is flat to the eye and to a single-site-resolved image; at T > 0 the thermal holes and doubly occupied sites of a shell add about 2 exp(−U/2kT) to its variance, not to its mean',
  compressibilityMin:
    'at T > 0 the shell must fluctuate at most half as much as a normal fluid between plateaus at the same kT (variance 1/4); in the atomic limit the plateau centre crosses this at kT = 0.19 U, where the Mott plateau melts (Gerbier, PRL 99, 120405 (2007): about 0.2 U)',
  bulkDensityFraction:
    'spanning is a property of the bulk, not of the dilute rim: the superfluid skin at the edge of every trapped cloud is one or two sites thin and would connect any two sides of it',
  bulkErosionSites: 'removes the outermost layer of the bulk, so a one-site path along its border cannot count as spanning',
});

export function mergeThresholds(overrides: Partial<PhaseThresholds> | undefined): PhaseThresholds {
  const merged: PhaseThresholds = { ...defaultPhaseThresholds };
  for (const key of Object.keys(overrides ?? {}) as (keyof PhaseThresholds)[]) {
    const value = overrides?.[key];
    if (value !== undefined) merged[key] = value;
  }
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
  if (merged.condensateFractionMax >= 1) {
    throw new RangeError(`classification thresholds.condensateFractionMax: expected < 1 (a fraction of the density), got ${merged.condensateFractionMax}`);
  }
  if (merged.bulkDensityFraction >= 1) {
    throw new RangeError(`classification thresholds.bulkDensityFraction: expected < 1 (a fraction of the peak density), got ${merged.bulkDensityFraction}`);
  }
  if (!Number.isInteger(merged.bulkErosionSites)) {
    throw new RangeError(`classification thresholds.bulkErosionSites: expected a whole number of sites, got ${merged.bulkErosionSites}`);
  }
  return merged;
}

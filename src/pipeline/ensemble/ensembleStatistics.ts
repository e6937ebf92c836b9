// What an ensemble reports, from its accumulated totals (blockPartial.ts): per-site mean
// and spread of n_i and |phi_i|^2, the fraction of realisations in which each site has
// each phase, the fraction of realisations in which a superfluid cluster spans the cloud
// (with its binomial standard error sqrt(p (1 - p) / R)), and means of the scalars.
//
// Spread = sample standard deviation over realisations, sqrt(M2 / (R - 1)) (Bessel's
// correction: an unbiased estimate of the variance of the disorder distribution); zero
// when R = 1. The standard error of the ensemble mean is spread / sqrt(R).
// Scalars are averaged with the two-pass formula over the records in realisation order,
// so they too are independent of how the ensemble was split.

import { phaseNames, type PhaseName } from '../../observables/phaseCodes.js';
import type { EnsembleAccumulation } from './blockPartial.js';
import { sampleSpread, scalarSummary, type ScalarSummary } from '../../numerics/runningMoments.js';
import { carriesNoSuperflow } from '../solveStiffness.js';

/**
 * The ensemble's superfluid fraction (solver.stiffness): mean and spread over the
 * realisations, the standard error of the mean spread / sqrt(R), the largest numerical
 * error of one realisation (the twist's own), and the realisations whose condensate
 * carries no superflow (condensate fraction above 1e-3, f_s below NO_SUPERFLOW_RATIO of
 * it: puddles, the Bose-glass signature of Fisher et al. 1989), with its binomial error.
 */
export interface EnsembleSuperfluidFraction extends ScalarSummary {
  realisations: number;
  standardError: number;
  largestNumericalError: number;
  noSuperflowRealisations: number;
  noSuperflowFraction: number;
  noSuperflowFractionError: number;
  /** realisations whose twist curvature did not converge */
  notConverged: number[];
}

export { scalarSummary, type ScalarSummary };

export interface EnsembleStatistics {
  realisations: number;
  densityMean: Float64Array;
  densitySpread: Float64Array;
  condensateMean: Float64Array;
  condensateSpread: Float64Array;
  /** fraction of realisations with phase p at site i, at [p * siteCount + i] */
  phaseFraction: Float64Array;
  spanningRealisations: number;
  spanningFraction: number;
  /** binomial standard error of the spanning fraction */
  spanningFractionError: number;
  convergedRealisations: number;
  /** indices of realisations that did not converge */
  notConverged: number[];
  atoms: ScalarSummary;
  condensedAtoms: ScalarSummary;
  condensateFraction: ScalarSummary;
  /** chemical potential, internal energy unit */
  mu: ScalarSummary;
  sweeps: ScalarSummary;
  /** mean number of sites per realisation in each phase */
  sitesPerPhase: Record<PhaseName, number>;
  /** largest nmax any realisation needed */
  nmaxUsedMax: number;
  /** true if any realisation was solved at T > 0 */
  finiteTemperature: boolean;
  /** null unless every realisation carries a superfluid fraction (solver.stiffness on a periodic axis) */
  superfluidFraction: EnsembleSuperfluidFraction | null;
}

function superfluidFractionOf(records: EnsembleAccumulation['records']): EnsembleSuperfluidFraction | null {
  if (records.length === 0 || records.some((x) => x.superfluidFraction === null)) return null;
  const values = records.map((x) => x.superfluidFraction as number);
  const summary = scalarSummary(values);
  const r = records.length;
  const puddles = records.filter((x) => carriesNoSuperflow(x.atoms > 0 ? x.condensedAtoms / x.atoms : 0, x.superfluidFraction as number)).length;
  const p = puddles / r;
  return {
    ...summary,
    realisations: r,
    standardError: summary.spread / Math.sqrt(r),
    largestNumericalError: records.reduce((m, x) => Math.max(m, x.superfluidFractionError ?? 0), 0),
    noSuperflowRealisations: puddles,
    noSuperflowFraction: p,
    noSuperflowFractionError: Math.sqrt((p * (1 - p)) / r),
    notConverged: records.filter((x) => !x.stiffnessConverged).map((x) => x.index),
  };
}

export function ensembleStatistics(total: EnsembleAccumulation): EnsembleStatistics {
  const r = total.count;
  const records = total.records;
  if (records.length !== r) throw new Error(`ensembleStatistics: ${records.length} records for ${r} realisations`);
  for (let k = 1; k < records.length; k++) {
    if (records[k].index <= records[k - 1].index) throw new Error('ensembleStatistics: records are not in realisation order');
  }
  const phaseFraction = new Float64Array(total.phaseCounts.length);
  for (let i = 0; i < phaseFraction.length; i++) phaseFraction[i] = total.phaseCounts[i] / r;
  const spanning = records.filter((x) => x.superfluidSpans).length;
  const p = spanning / r;
  const sitesPerPhase = Object.fromEntries(
    phaseNames.map((name, code) => [name, scalarSummary(records.map((x) => x.phaseSites[code])).mean]),
  ) as Record<PhaseName, number>;
  return {
    realisations: r,
    densityMean: Float64Array.from(total.density.mean),
    densitySpread: sampleSpread(total.density.m2, r, 0),
    condensateMean: Float64Array.from(total.condensate.mean),
    condensateSpread: sampleSpread(total.condensate.m2, r, 0),
    phaseFraction,
    spanningRealisations: spanning,
    spanningFraction: p,
    spanningFractionError: Math.sqrt((p * (1 - p)) / r),
    convergedRealisations: records.filter((x) => x.converged).length,
    notConverged: records.filter((x) => !x.converged).map((x) => x.index),
    atoms: scalarSummary(records.map((x) => x.atoms)),
    condensedAtoms: scalarSummary(records.map((x) => x.condensedAtoms)),
    condensateFraction: scalarSummary(records.map((x) => (x.atoms > 0 ? x.condensedAtoms / x.atoms : 0))),
    mu: scalarSummary(records.map((x) => x.mu)),
    sweeps: scalarSummary(records.map((x) => x.sweeps)),
    sitesPerPhase,
    nmaxUsedMax: records.reduce((m, x) => Math.max(m, x.nmaxUsed), 0),
    finiteTemperature: records.some((x) => x.temperature > 0),
    superfluidFraction: superfluidFractionOf(records),
  };
}

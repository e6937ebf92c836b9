// From a resolved scenario to what the solver and the phase labelling take, in one place
// for `solve`, `compare` and ensembles: the lattice-run request (tolerances, truncation
// guard, compressibility) and the site classification of a finished run.

import type { RunOutcome, RunProgress, RunRequest } from '../solver/runLattice.js';
import type { SiteFields } from '../observables/siteFields.js';
import { classifySites, type SiteClassification } from '../observables/siteClassification.js';
import { localCoordinationHopping } from '../observables/localDensityPhase.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import { CLUSTER_MAX_STATES, clusterSites } from '../scenario/scenarioSchema.js';

/** Highest nmax the automatic truncation guard raises to (unless the scenario starts higher). */
export const NMAX_CEILING = 40;

/**
 * Highest nmax the truncation guard may raise to: NMAX_CEILING, and with clusters the
 * largest nmax whose cluster Fock space stays within CLUSTER_MAX_STATES (the guard then
 * reports the truncation it could not lift instead of exhausting memory).
 */
export function nmaxLimitOf(nmax: number, cluster: readonly number[] | undefined): number {
  const sites = clusterSites(cluster);
  let limit = NMAX_CEILING;
  while (limit > nmax && (limit + 1) ** sites > CLUSTER_MAX_STATES) limit--;
  return Math.max(nmax, limit);
}

export function runRequestOf(resolved: ResolvedScenario, observer?: (p: RunProgress) => void | 'stop'): RunRequest {
  const s = resolved.scenario;
  return {
    model: resolved.model,
    chemical: resolved.chemical,
    thermal: resolved.thermal,
    tolerance: s.solver.tolerance,
    maxSweeps: s.solver.maxSweeps,
    accelerate: s.solver.accelerate,
    truncation: {
      automatic: s.truncation.automatic,
      topWeightMax: s.truncation.topWeightMax,
      nmaxLimit: nmaxLimitOf(s.truncation.nmax, s.solver.cluster),
      ...(clusterSites(s.solver.cluster) > 1 ? { step: 1 } : {}),
    },
    compressibility: s.solver.compressibility,
    ...(observer ? { observer } : {}),
  };
}

/**
 * Phase labels of a finished run, with the scenario's thresholds; with `withLocalDensity`
 * (default: as `withEntropy`, i.e. for single solves, not inside ensembles) also the
 * local-density-approximation label of every site.
 */
export function classifyOutcome(
  resolved: ResolvedScenario,
  outcome: RunOutcome,
  fields: SiteFields,
  withEntropy = true,
  withLocalDensity = withEntropy,
): SiteClassification {
  const geometry = resolved.model.geometry;
  return classifySites({
    shape: geometry.shape,
    periodic: geometry.periodic,
    density: fields.density,
    condensateDensity: fields.condensateDensity,
    compressibility: fields.compressibility,
    compressibilityComputed: outcome.compressibility !== null,
    numberVariance: fields.numberVariance,
    parityOdd: fields.parityOdd,
    ...(withEntropy ? { entropy: fields.entropy } : {}),
    energyScale: resolved.units.interaction,
    temperature: outcome.temperature,
    disordered: resolved.disorder !== null,
    thresholds: resolved.scenario.phases,
    nmax: outcome.model.nmax,
    centre: resolved.trapCentre,
    ...(withLocalDensity
      ? {
          localDensity: {
            chemicalPotential: outcome.solve.mu,
            sitePotential: fields.sitePotential,
            interactionU: outcome.model.interactionU,
            coordinationHopping: localCoordinationHopping(geometry.shape, geometry.periodic, outcome.model.hopping),
            temperature: outcome.temperature,
            nmax: outcome.model.nmax,
          },
        }
      : {}),
  });
}

// summary.json of a `solve` run: inputs echoed, results, convergence, the phase labels with
// everything they were decided from, the warnings, the landscape terms, the camera block,
// and the index of every field and image with its unit and meaning (fieldIndex.ts).
// Writers compute no physics: every number comes from src/pipeline/solveScenario.ts.
//
// Units: every bare energy (fields, search histories, CSV columns) is in the run's one
// energy unit, `energyUnit` (the scenario's own); energy blocks give a value in every unit
// available ({J, U[, Hz, kHz, nK]}). Fractions of the atom number are null for an empty
// cloud (fractionOfAtoms, the `empty-cloud` warning).

import { inAllUnits, outputEnergyUnit } from '../scenario/resolveScenario.js';
import { phaseNames } from '../observables/phaseCodes.js';
import { radialFrame } from '../observables/radialFrame.js';
import { fractionOfAtoms } from '../observables/readingWarnings.js';
import { PARALLEL_MIN_SITES, type SolveArtifacts } from '../pipeline/solveScenario.js';
import type { RunWarning } from '../pipeline/runWarnings.js';
import { toolStamp } from './recordFields.js';
import { fieldAxes, fieldEntries, type ImageEntry } from './fieldIndex.js';

export interface SummaryExtras {
  /** the "imaging" block (cameraOutputs.ts) */
  imaging?: Record<string, unknown>;
  /** every warning of the run (runWarnings.ts) */
  warnings?: readonly RunWarning[];
  /** index of the image files (figures and camera pictures) */
  images?: readonly ImageEntry[];
}

/** The machine-readable summary (inputs echoed, results, convergence, timings). */
export function buildSummary(a: SolveArtifacts, files: string[], extras: SummaryExtras = {}): Record<string, unknown> {
  const { outcome, resolved, classification: c, shells } = a;
  const totals = outcome.solve.totals;
  const relax = outcome.solve.relax;
  const temperature = outcome.temperature;
  const atoms = totals.atoms;
  const spacing = resolved.latticeSpacingUm;
  const unit = outputEnergyUnit(a.scenario, resolved.units);
  const energyBlock = (value: number): Record<string, number> => inAllUnits(value, resolved.units);
  const inUnit = (value: number): number => value / unit.internalPerUnit;
  const lda = c.localDensity;
  const imaging = extras.imaging !== undefined ? withNullVisibility(extras.imaging, atoms) : undefined;
  return {
    tool: toolStamp(),
    scenario: a.scenario,
    mode: resolved.mode,
    energyUnit: unit.name,
    energyUnitNote:
      `Every bare energy in this folder (fields/site_potential.npy, fields/compressibility.npy per ${unit.name}, CSV columns, search histories) is in ${unit.name}, the scenario's energy unit. ` +
      'Energy blocks {J, U, ...} give the same value in every available unit: J (nearest-neighbour hopping), U (on-site interaction at the trap centre)' +
      (resolved.units.hertz !== null ? ', Hz and kHz (energy/h) and nK (energy/k_B)' : ''),
    warnings: (extras.warnings ?? a.readingWarnings).map((w) => ({ code: w.code, message: w.message })),
    lattice: {
      shape: resolved.geometry.shape,
      periodic: resolved.geometry.periodic,
      sites: resolved.geometry.siteCount,
      coordination: resolved.geometry.coordination,
      latticeSpacingUm: spacing,
      trapCentreSites: resolved.trapCentre,
      trapCoefficientPerSite2: resolved.trapCoefficient.map((k) => energyBlock(k)),
    },
    laboratory: resolved.laboratory,
    landscape: {
      terms: resolved.landscape.records,
      warnings: resolved.landscape.warnings,
      note: resolved.landscape.records.length > 0 ? `terms added to the site potential; minimum and maximum in each term's energyUnit` : 'no landscape terms',
    },
    method:
      a.cluster === null
        ? { kind: 'single-site', description: 'single-site Gutzwiller mean field: every bond decoupled (phi_i phi_j)' }
        : {
            kind: 'cluster',
            cluster: a.cluster.shape,
            description: `cluster mean field: ${a.cluster.clusterCount} clusters of ${a.cluster.shape.join(' x ')} sites solved exactly (Fock space of the cluster, truncated at nmax), bonds between clusters decoupled by mean fields`,
            clusterCount: a.cluster.clusterCount,
            colours: a.cluster.colourCount,
            matrixVectorProducts: a.cluster.matvecs,
            eigenSolvesConverged: a.cluster.clusterSolvesConverged,
            thermalTruncationWeight: a.cluster.maxTruncationWeight,
            bondsInsideClusters: Object.fromEntries(a.cluster.insideBonds.map((b, d) => ['xyz'[d], b])),
            bondsNote: 'per axis, over the bonds inside clusters: mean <b_i^+ b_j> and its connected part <b_i^+ b_j> - phi_i phi_j (the coherence single-site mean field leaves out); null along axes where the cluster has extent 1',
          },
    parameters: {
      hopping: energyBlock(resolved.units.hopping),
      interaction: energyBlock(resolved.units.interaction),
      interactionOverHopping: resolved.units.interaction / resolved.units.hopping,
      chemicalPotential: energyBlock(outcome.solve.mu),
      kT: energyBlock(temperature),
      nmaxUsed: outcome.truncation.nmaxUsed,
    },
    results: {
      atoms,
      condensedAtoms: totals.condensedAtoms,
      condensateFraction: fractionOfAtoms(totals.condensedAtoms, atoms),
      [temperature > 0 ? 'freeEnergy' : 'energy']: energyBlock(totals.freeEnergy),
      grandPotential: energyBlock(totals.grandPotential),
      entropy: totals.entropy,
      entropyPerAtom: fractionOfAtoms(totals.entropy, atoms),
      superfluidFraction: superfluidFractionBlock(a),
      temperatureSearch:
        outcome.temperatureSearch === null
          ? null
          : { ...outcome.temperatureSearch, energyUnit: unit.name, history: outcome.temperatureSearch.history.map((h) => ({ ...h, kT: inUnit(h.kT) })) },
    },
    convergence: {
      converged: outcome.converged,
      stopped: outcome.stopped,
      sweeps: relax.sweeps,
      totalSweeps: outcome.totalSweeps,
      residual: relax.residual,
      errorEstimate: relax.errorEstimate,
      contractionRate: relax.contractionRate,
      extrapolations: relax.extrapolations,
      tolerance: a.scenario.solver.tolerance,
      chemicalPotentialSearch: {
        ...outcome.solve.muSearch,
        energyUnit: unit.name,
        atomHistory: outcome.solve.muSearch.atomHistory.map((h) => ({ ...h, mu: inUnit(h.mu) })),
      },
      residualHistory: outcome.solve.residualHistory,
    },
    truncation: outcome.truncation,
    phases: {
      thresholds: c.thresholds,
      compressibleWithoutCondensate: c.compressibleWithoutCondensate,
      fluctuationMeasure: c.fluctuationMeasure,
      sitesPerPhase: c.counts,
      atomsPerPhase: Object.fromEntries(phaseNames.map((n) => [n, shells.byPhase[n].atoms])),
      atomFractionPerPhase: Object.fromEntries(phaseNames.map((n) => [n, fractionOfAtoms(shells.byPhase[n].atoms, atoms)])),
      mottSitesByFilling: c.mottSitesByFilling,
      shellStatistics: c.shellStatistics,
      superfluidBelowCondensateThreshold: c.superfluidBelowCondensateThreshold,
      meltedPlateauSites: c.meltedPlateauSites,
      bulk: c.bulk,
      superfluidClusters: c.clusters.count,
      largestSuperfluidCluster: c.clusters.largestSize,
      enclosingClusters: c.enclosingClusters,
      superfluidSpans: c.superfluidSpans,
      superfluidPuddleSites: c.superfluidPuddleSites,
      rimSuperfluidSites: c.rimSuperfluidSites,
      spanningRule:
        'decided on the bulk (density >= bulk.densityThreshold, eroded by bulk.erosionSites): a superfluid cluster spans when it touches opposite faces of the bulk, ' +
        'wraps a periodic axis, or encloses the trap centre; rim superfluid sites outside the bulk do not count',
      localDensity:
        lda === undefined
          ? null
          : {
              files: ['fields/lda_phase.npy', 'fields/lda_mott_filling.npy'],
              agree: lda.comparison.agree,
              disagree: lda.comparison.disagree,
              disagreements: lda.comparison.pairs,
              mottFillingDiffers: lda.comparison.mottFillingDiffers,
              mottSitesByFilling: lda.comparison.mottSitesByFilling,
              evaluations: lda.evaluations,
              rule: "the phase of the homogeneous lattice (same mean field, temperature and thresholds) at each site's local mu - eps_i, U_i and zJ_i",
            },
    },
    // What the shell radii measure (radialFrame.ts): 'trap' (trap-scaled radius), 'latticeCentre'
    // (no trap: distance from the lattice centre) or 'none' (untrapped and periodic: no centre,
    // the radii only say where the lattice was cut).
    shellRadiusFrame: radialFrame(resolved.trapCoefficient, resolved.geometry.periodic),
    shells: shells.shells.map((s) => ({
      ...s,
      innerRadiusUm: spacing !== null ? s.innerRadius * spacing : null,
      outerRadiusUm: spacing !== null ? s.outerRadius * spacing : null,
    })),
    fields: {
      ...fieldAxes(resolved.geometry.shape),
      energyUnit: unit.name,
      files: fieldEntries({
        shape: resolved.geometry.shape,
        energyUnit: unit.name,
        compressibilityComputed: outcome.compressibility !== null,
        finiteTemperature: temperature > 0,
        localDensity: lda !== undefined,
        ...(a.cluster !== null ? { clusterBondAxes: a.cluster.bondCorrelation.map((_, d) => d) } : {}),
        ...(a.stiffness !== null ? { stiffnessAxes: a.stiffness.axes.filter((x) => x.localFraction !== null).map((x) => x.axis) } : {}),
      }),
    },
    ...(extras.images !== undefined ? { images: extras.images } : {}),
    ...(imaging !== undefined ? { imaging } : {}),
    threads: a.threadsUsed,
    ...(a.threadsUsed < a.threadsRequested
      ? { threadsNote: a.cluster !== null ? clusterThreadsNote(a.threadsUsed, a.threadsRequested) : threadsNote(a.threadsUsed, a.threadsRequested, resolved.geometry.siteCount) }
      : {}),
    timings: a.timings,
    files,
  };
}

/** The cluster method's thread statement. */
export function clusterThreadsNote(used: number, requested: number): string {
  return `${used} thread${used > 1 ? 's' : ''} of ${requested} requested: the cluster method uses no more threads than one colour has clusters`;
}

/** Why fewer threads ran than were asked for (solve's line on stdout says the same). */
export function threadsNote(used: number, requested: number, sites: number, threshold = PARALLEL_MIN_SITES): string {
  return `${used} thread${used > 1 ? 's' : ''} of ${requested} requested: the lattice has ${sites} sites, below the parallel threshold of ${threshold} sites, where worker threads cost more than they save`;
}

/** The imaging block with the visibility values null when the cloud is empty (a ratio of nothing). */
function withNullVisibility(imaging: Record<string, unknown>, atoms: number): Record<string, unknown> {
  const visibility = imaging.visibility as Record<string, unknown> | undefined;
  if (visibility === undefined || fractionOfAtoms(1, atoms) !== null) return imaging;
  return {
    ...imaging,
    visibility: {
      ...visibility,
      value: null,
      ...('momentumDistributionValue' in visibility ? { momentumDistributionValue: null } : {}),
      emptyCloud: 'no atoms: the visibility is undefined (see warnings, empty-cloud)',
    },
  };
}

/** results.superfluidFraction: per axis the fraction and its error, or null with the reason; null when solver.stiffness is off. */
function superfluidFractionBlock(a: SolveArtifacts): Record<string, unknown> | null {
  const r = a.stiffness;
  if (r === null) return null;
  const unit = outputEnergyUnit(a.scenario, a.resolved.units);
  return {
    criterion: r.criterion,
    perAxis: r.axes.map((x) => ({
      axis: x.axis,
      value: x.value,
      error: x.error,
      reason: x.reason,
      converged: x.converged,
      twistPerBondRad: x.twistPerBond,
      curvature: x.curvature === null ? null : x.curvature / unit.internalPerUnit,
    })),
    curvatureUnit: `${unit.name} per rad^2 (d^2 Omega/dq^2, q the twist per bond)`,
    condensateFraction: r.condensateFraction,
    converged: r.converged,
    twistedSolves: r.solves,
    twistedSweeps: r.sweeps,
    tolerance: r.tolerance,
    method: r.method,
  };
}

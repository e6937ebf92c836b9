// The readings of one scan point, from a finished solve (solveScenario's artifacts): the
// totals, the chemical potential and temperature in the scan's output energy unit, the
// characteristic density, the density and phase at the trap centre, the sites per phase
// and the radii of every Mott shell (src/observables/shellSummary.ts: half-occupation
// crossings of the trap-scaled radial bins, in sites).

import type { SolveArtifacts } from '../solveScenario.js';
import type { ResolvedScenario } from '../../scenario/resolveScenario.js';
import { energyParser } from '../../scenario/resolveScenario.js';
import { phaseNames } from '../../observables/phaseCodes.js';
import { characteristicDensityOf, characteristicLengthOf } from './scanPoint.js';
import { STIFFNESS_PHASES, stiffnessPhase, type StiffnessPhase } from './stiffnessPhase.js';
import { meanSuperfluidFraction } from '../solveStiffness.js';

export interface ShellRadii {
  filling: number;
  /** trap-scaled radius, sites */
  innerRadius: number;
  outerRadius: number;
  sites: number;
  radiusFrom: 'annulus' | 'sites';
}

export interface ScanRow {
  point: number;
  /** axis values of the point */
  values: number[];
  converged: boolean;
  /** sweeps of the solve (all mu and T steps; the compressibility solves not included) */
  sweeps: number;
  /** chemical-potential evaluations of a fixed-N search (1 at fixed mu) */
  muEvaluations: number;
  /** started from the previous point's solution */
  warmStart: boolean;
  nmax: number;
  atoms: number;
  /** output energy unit (scanEnergyUnit) */
  chemicalPotential: number;
  condensedAtoms: number;
  condensateFraction: number;
  /** superfluid fraction from a phase twist, mean over the periodic axes (solver.stiffness); NaN when off or no axis is periodic */
  superfluidFraction: number;
  /** its numerical error, the largest over those axes; NaN with it */
  superfluidFractionError: number;
  /** k_B */
  entropy: number;
  entropyPerAtom: number;
  /** k_B T, output energy unit */
  temperature: number;
  characteristicDensity: number;
  /** sqrt(J/V) along the first trapped axis, sites */
  characteristicLength: number;
  /** mean density of the sites nearest the trap centre */
  centralDensity: number;
  /** PhaseCode held by most of those sites (the lowest code on a tie) */
  centralPhase: number;
  /** sites per PhaseCode */
  phaseSites: number[];
  shells: ShellRadii[];
  /** (1/N_sites) sum_i dn_i/dmu, in units of 1/U (U at the trap centre); NaN when solver.compressibility is off */
  compressibilityPerSite: number;
  /** the whole lattice's phase by the stiffness criterion (stiffnessPhase.ts), null without compressibility or superfluid fraction */
  stiffnessPhase: StiffnessPhase | null;
  /** disorder realisations behind the row (plan.realisations); the readings above are their means */
  realisations: number;
  /** sample standard deviation of the superfluid fraction over the realisations (NaN for one, or without f_s) */
  superfluidFractionSpread: number;
  /** fraction of the realisations with each label of STIFFNESS_PHASES (null when unlabelled) */
  phaseShares: number[] | null;
}

/** The energy unit of a scan's table: the scenario's unit in dimensionless mode, Hz (E/h) in laboratory mode. */
export function scanEnergyUnit(resolved: ResolvedScenario): { name: string; internal: number } {
  if (resolved.mode === 'laboratory') return { name: 'Hz', internal: resolved.units.hertz as number };
  const name = resolved.scenario.energyUnit ?? 'J';
  return { name, internal: energyParser(resolved.scenario, resolved.units)(1, 'energyUnit') };
}

/** Mean density and majority phase of the sites at the smallest trap-scaled radius. */
function centralReading(a: SolveArtifacts): { density: number; phase: number } {
  const r = a.radius;
  let rMin = Infinity;
  for (let i = 0; i < r.length; i++) if (r[i] < rMin) rMin = r[i];
  const limit = rMin + 1e-9 * Math.max(1, rMin);
  let sum = 0;
  let count = 0;
  const votes = new Array<number>(phaseNames.length).fill(0);
  for (let i = 0; i < r.length; i++) {
    if (r[i] > limit) continue;
    sum += a.fields.density[i];
    count++;
    votes[a.classification.codes[i]]++;
  }
  let phase = 0;
  for (let c = 1; c < votes.length; c++) if (votes[c] > votes[phase]) phase = c;
  return { density: sum / count, phase };
}

export function scanRowOf(point: number, values: readonly number[], a: SolveArtifacts, warmStart: boolean): ScanRow {
  const o = a.outcome;
  const t = o.solve.totals;
  const unit = scanEnergyUnit(a.resolved);
  const central = centralReading(a);
  return {
    point,
    values: [...values],
    converged: o.converged,
    sweeps: o.totalSweeps,
    muEvaluations: o.solve.muSearch.evaluations,
    warmStart,
    nmax: o.model.nmax,
    atoms: t.atoms,
    chemicalPotential: o.solve.mu / unit.internal,
    condensedAtoms: t.condensedAtoms,
    condensateFraction: t.atoms > 0 ? t.condensedAtoms / t.atoms : NaN,
    ...superfluidFractionOf(a),
    entropy: t.entropy,
    entropyPerAtom: t.atoms > 0 ? t.entropy / t.atoms : NaN,
    temperature: o.temperature / unit.internal,
    characteristicDensity: characteristicDensityOf(a.resolved, t.atoms),
    characteristicLength: characteristicLengthOf(a.resolved),
    centralDensity: central.density,
    centralPhase: central.phase,
    phaseSites: phaseNames.map((name) => a.classification.counts[name]),
    shells: a.shells.shells.map((s) => ({ filling: s.filling, innerRadius: s.innerRadius, outerRadius: s.outerRadius, sites: s.sites, radiusFrom: s.radiusFrom })),
    ...stiffnessReadingOf(a),
  };
}

/** Every site's density rounds to the same integer (and the lattice is not empty). */
function uniformFilling(density: ArrayLike<number>): boolean {
  if (density.length === 0) return false;
  const k = Math.round(density[0]);
  for (let i = 1; i < density.length; i++) if (Math.round(density[i]) !== k) return false;
  return k >= 1;
}

/** Mean compressibility per site (1/U), the stiffness label and its one-realisation shares. */
function stiffnessReadingOf(a: SolveArtifacts): Pick<ScanRow, 'compressibilityPerSite' | 'stiffnessPhase' | 'realisations' | 'superfluidFractionSpread' | 'phaseShares'> {
  const u = a.resolved.units.interaction;
  const k = a.outcome.compressibility;
  let sum = 0;
  if (k !== null) for (let i = 0; i < k.length; i++) sum += k[i];
  const compressibilityPerSite = k !== null && k.length > 0 ? (sum / k.length) * u : NaN;
  const { superfluidFraction } = superfluidFractionOf(a);
  const phase = stiffnessPhase({
    atoms: a.outcome.solve.totals.atoms,
    compressibilityPerSiteU: compressibilityPerSite,
    kTOverU: a.outcome.temperature / u,
    superfluidFraction,
    compressibilityMin: a.scenario.phases.compressibilityMin,
    uniformFilling: uniformFilling(a.fields.density),
  });
  return {
    compressibilityPerSite,
    stiffnessPhase: phase,
    realisations: 1,
    superfluidFractionSpread: NaN,
    phaseShares: phase === null ? null : STIFFNESS_PHASES.map((p) => (p === phase ? 1 : 0)),
  };
}

/** Mean superfluid fraction over the periodic axes and the largest error (meanSuperfluidFraction); NaN without a reading. */
function superfluidFractionOf(a: SolveArtifacts): { superfluidFraction: number; superfluidFractionError: number } {
  const m = meanSuperfluidFraction(a.stiffness);
  return { superfluidFraction: m.superfluidFraction ?? NaN, superfluidFractionError: m.superfluidFractionError ?? NaN };
}

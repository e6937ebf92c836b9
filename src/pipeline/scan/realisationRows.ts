// One scan row from the rows of R disorder realisations of a point (scan --realisations):
// readings are means over the realisations (two-pass, in realisation order, so the bits do
// not depend on how the scan was split), the superfluid fraction also with its sample
// standard deviation sqrt(sum (x - mean)^2 / (R - 1)), the numerical error the largest of
// any realisation, counts and sweeps summed, the stiffness label the one most realisations
// carry (the first in STIFFNESS_PHASES order on a tie) with the share of every label.
// Shells: a filling's radii are averaged over the realisations that have that shell, its
// sites over all (0 where absent).

import { scalarSummary } from '../../numerics/runningMoments.js';
import type { ScanRow, ShellRadii } from './scanRow.js';
import { STIFFNESS_PHASES } from './stiffnessPhase.js';

const mean = (xs: readonly number[]): number => scalarSummary(xs).mean;

/** The majority value (the lowest on a tie). */
function majority(codes: readonly number[]): number {
  const votes = new Map<number, number>();
  for (const c of codes) votes.set(c, (votes.get(c) ?? 0) + 1);
  let best = Infinity;
  let bestVotes = -1;
  for (const [c, v] of votes) if (v > bestVotes || (v === bestVotes && c < best)) [best, bestVotes] = [c, v];
  return best;
}

function combinedShells(rows: readonly ScanRow[]): ShellRadii[] {
  const fillings = [...new Set(rows.flatMap((r) => r.shells.map((s) => s.filling)))].sort((a, b) => a - b);
  return fillings.map((filling) => {
    const having = rows.map((r) => r.shells.find((s) => s.filling === filling)).filter((s): s is ShellRadii => s !== undefined);
    return {
      filling,
      innerRadius: mean(having.map((s) => s.innerRadius)),
      outerRadius: mean(having.map((s) => s.outerRadius)),
      sites: mean(rows.map((r) => r.shells.find((s) => s.filling === filling)?.sites ?? 0)),
      radiusFrom: having.every((s) => s.radiusFrom === 'annulus') ? 'annulus' : 'sites',
    };
  });
}

export function combineRealisationRows(rows: readonly ScanRow[]): ScanRow {
  const r = rows.length;
  if (r === 0) throw new Error('combineRealisationRows: no rows');
  if (r === 1) return rows[0];
  const first = rows[0];
  const fs = rows.map((x) => x.superfluidFraction);
  const labelled = rows.every((x) => x.stiffnessPhase !== null);
  const shares = labelled ? STIFFNESS_PHASES.map((p) => rows.filter((x) => x.stiffnessPhase === p).length / r) : null;
  const of = (f: (x: ScanRow) => number): number => mean(rows.map(f));
  return {
    point: first.point,
    values: [...first.values],
    converged: rows.every((x) => x.converged),
    sweeps: rows.reduce((n, x) => n + x.sweeps, 0),
    muEvaluations: rows.reduce((n, x) => n + x.muEvaluations, 0),
    warmStart: false,
    nmax: rows.reduce((n, x) => Math.max(n, x.nmax), 0),
    atoms: of((x) => x.atoms),
    chemicalPotential: of((x) => x.chemicalPotential),
    condensedAtoms: of((x) => x.condensedAtoms),
    condensateFraction: of((x) => x.condensateFraction),
    superfluidFraction: mean(fs),
    superfluidFractionError: rows.reduce((m, x) => Math.max(m, x.superfluidFractionError), -Infinity),
    entropy: of((x) => x.entropy),
    entropyPerAtom: of((x) => x.entropyPerAtom),
    temperature: of((x) => x.temperature),
    characteristicDensity: of((x) => x.characteristicDensity),
    characteristicLength: of((x) => x.characteristicLength),
    centralDensity: of((x) => x.centralDensity),
    centralPhase: majority(rows.map((x) => x.centralPhase)),
    phaseSites: first.phaseSites.map((_, k) => of((x) => x.phaseSites[k])),
    shells: combinedShells(rows),
    compressibilityPerSite: of((x) => x.compressibilityPerSite),
    stiffnessPhase: shares === null ? null : STIFFNESS_PHASES[majority(rows.map((x) => STIFFNESS_PHASES.indexOf(x.stiffnessPhase as (typeof STIFFNESS_PHASES)[number])))],
    realisations: r,
    superfluidFractionSpread: scalarSummary(fs).spread,
    phaseShares: shares,
  };
}

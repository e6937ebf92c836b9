// The lines `tiercake solve` prints on stdout when a solve has been written: convergence,
// sweeps, time and threads; atoms, condensate fraction and mu; the Mott shells; the
// superfluid fraction per axis when solver.stiffness is on; the output folder. Pure text.

import { fractionOfAtoms } from '../observables/readingWarnings.js';
import { clusterThreadsNote } from '../output/solveSummary.js';
import { PARALLEL_MIN_SITES, type SolveArtifacts } from '../pipeline/solveScenario.js';

/** How many threads ran, and why fewer than requested when that is so. */
export function solveThreadText(a: Pick<SolveArtifacts, 'threadsUsed' | 'threadsRequested' | 'cluster' | 'resolved'>): string {
  if (a.threadsUsed < a.threadsRequested && a.cluster !== null) return clusterThreadsNote(a.threadsUsed, a.threadsRequested);
  if (a.threadsUsed < a.threadsRequested) return `1 thread: ${a.resolved.geometry.siteCount} sites are below the parallel threshold of ${PARALLEL_MIN_SITES} sites`;
  return `${a.threadsUsed} thread${a.threadsUsed > 1 ? 's' : ''}`;
}

export function solveSummaryLines(artifacts: SolveArtifacts, outDir: string): string[] {
  const outcome = artifacts.outcome;
  const t = outcome.solve.totals;
  const fraction = fractionOfAtoms(t.condensedAtoms, t.atoms);
  return [
    `${artifacts.scenario.name}: ${outcome.converged ? 'converged' : 'NOT CONVERGED'} after ${outcome.totalSweeps} sweeps (${artifacts.timings.solveSeconds.toFixed(2)} s, ${solveThreadText(artifacts)})`,
    `  atoms ${t.atoms.toPrecision(8)}, condensate fraction ${fraction === null ? 'undefined (no atoms)' : fraction.toFixed(4)}, mu = ${(outcome.solve.mu / artifacts.resolved.units.interaction).toPrecision(6)} U`,
    `  shells: ${artifacts.shells.shells.map((s) => `n=${s.filling} (${s.sites} sites)`).join(', ') || 'none'}`,
    ...(artifacts.stiffness !== null
      ? [
          `  superfluid fraction (twist): ${artifacts.stiffness.axes
            .map((x) => `${'xyz'[x.axis]} ${x.value === null ? 'none (open axis)' : `${x.value.toFixed(4)} ± ${(x.error ?? NaN).toExponential(1)}${x.converged ? '' : ' NOT CONVERGED'}`}`)
            .join(', ')}`,
        ]
      : []),
    `  results in ${outDir}`,
  ];
}

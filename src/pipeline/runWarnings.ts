// Every warning of a run in one list of `{code, message}` (issue "say when a reading cannot
// be trusted"), for summary.json `warnings`, stderr (once each) and the top of the report.
// Codes (stable interface; README "Warnings"):
//   cloud-at-edge, empty-cloud, truncation, not-converged   readings of the solution
//                                                           (src/observables/readingWarnings.ts)
//   laboratory-validity   a laboratory parameter outside the validity of the lattice model
//                         (shallow lattice, pseudo-potential, ...; resolveLaboratory.ts)
//   landscape             a landscape term that may not do what was meant (resolveLandscape.ts)
//   tof-near-field        the far-field time-of-flight picture used before the far-field time
//                         (imaging/timeOfFlightScales.ts); its 'info' form, for the exact free
//                         expansion, stays a notice in the imaging block
//   fit-at-bound          a fitted parameter ended on a bound of its range (fitAtBound.ts)
//   stiffness-not-converged   the twist curvature of solver.stiffness did not converge
//   no-superflow              a condensate but (almost) no superfluid fraction: puddles, no superflow
//                         (solveStiffness.ts)
// A message says what is wrong and what to change; the list holds each (code, message) once.

import type { SolveArtifacts } from './solveScenario.js';

export interface RunWarning {
  code: string;
  message: string;
}

/** The same list without repeats, in first-seen order. */
export function uniqueWarnings(warnings: readonly RunWarning[]): RunWarning[] {
  const seen = new Set<string>();
  const out: RunWarning[] = [];
  for (const w of warnings) {
    const key = `${w.code}\u0000${w.message}`;
    if (seen.has(key)) continue;
    seen.add(key);
    out.push({ code: w.code, message: w.message });
  }
  return out;
}

/** A notice of the camera pictures (cameraPictures.ts); only 'warning' ones are warnings. */
export interface PictureNotice {
  code: string;
  severity: 'warning' | 'info';
  message: string;
}

/** The warnings of a solve: the readings, the laboratory model, the landscape and the pictures' notices. */
export function solveWarnings(a: Pick<SolveArtifacts, 'readingWarnings' | 'resolved'> & { stiffness?: SolveArtifacts['stiffness'] }, notices: readonly PictureNotice[] = []): RunWarning[] {
  return uniqueWarnings([
    ...a.readingWarnings,
    ...(a.stiffness?.warnings ?? []),
    ...(a.resolved.laboratory?.warnings ?? []).map((message) => ({ code: 'laboratory-validity', message })),
    ...a.resolved.landscape.warnings.map((message) => ({ code: 'landscape', message })),
    ...notices.filter((n) => n.severity === 'warning').map((n) => ({ code: n.code, message: n.message })),
  ]);
}

/** How a warning is printed on stderr. */
export function warningLine(w: RunWarning): string {
  return `tiercake: warning: ${w.code}: ${w.message}`;
}

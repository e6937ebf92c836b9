// The superfluid-fraction reading of a solve (scenario key solver.stiffness): twisted solves
// warm-started from the main solution at its mu and T (src/solver/twist), per periodic
// axis the fraction, its numerical error, or null with the reason, and the warning when the
// curvature did not converge. Pure: no files, no clock.

import type { LatticeModel } from '../lattice/latticeModel.js';
import { superfluidStiffness, type AxisStiffness } from '../solver/twist/superfluidStiffness.js';
import type { RunWarning } from './runWarnings.js';

/** The criterion, as summary.json and the report state it. */
export const STIFFNESS_CRITERION =
  'Superfluid fraction f_s = (d^2 Omega/dq^2) / (2 sum_bonds J (n_i + n_j)/2) from the curvature of the grand potential at fixed mu under a phase twist q per bond ' +
  '(twisted boundary conditions on a periodic axis). A Bose glass is compressible with zero superfluid stiffness, a superfluid has a finite one ' +
  '(Fisher, Weichman, Grinstein & Fisher, PRB 40, 546 (1989)); the condensate fraction alone cannot tell them apart, because isolated puddles carry a condensate but no superflow. ' +
  'In a clean uniform lattice Gutzwiller mean field gives f_s = |phi|^2/n exactly; in mean field the stiffness of a Bose glass is small (puddles couple through exponentially small tails of phi), not exactly zero.';

export interface StiffnessReading {
  criterion: string;
  axes: AxisStiffness[];
  /** condensate fraction of the untwisted solution, beside f_s */
  condensateFraction: number | null;
  solves: number;
  sweeps: number;
  tolerance: number;
  method: string;
  converged: boolean;
  warnings: RunWarning[];
}

/** Superfluid fraction below this fraction of the condensate fraction: no superflow to speak of (common practice for a threshold of this kind; a scenario key if it ever needs tuning). */
export const NO_SUPERFLOW_RATIO = 0.05;

/** Mean superfluid fraction over the periodic axes with a reading and the largest error; nulls without one. */
export function meanSuperfluidFraction(reading: StiffnessReading | null): { superfluidFraction: number | null; superfluidFractionError: number | null } {
  const axes = (reading?.axes ?? []).filter((x) => x.value !== null);
  if (axes.length === 0) return { superfluidFraction: null, superfluidFractionError: null };
  let sum = 0;
  let error = 0;
  for (const x of axes) {
    sum += x.value as number;
    error = Math.max(error, (x.error as number | null) ?? 0);
  }
  return { superfluidFraction: sum / axes.length, superfluidFractionError: error };
}

/** Condensate fraction below which the no-superflow rule says nothing (no condensate to speak of). */
export const NO_SUPERFLOW_CONDENSATE_FLOOR = 1e-3;

/** The no-superflow rule: a condensate (fraction above the floor) whose superfluid fraction is below NO_SUPERFLOW_RATIO of it. */
export function carriesNoSuperflow(condensateFraction: number, superfluidFraction: number): boolean {
  return condensateFraction > NO_SUPERFLOW_CONDENSATE_FLOOR && superfluidFraction < NO_SUPERFLOW_RATIO * condensateFraction;
}

/** Tolerance of the twisted solves: the curvature divides Omega differences of order q^2 ~ 1e-4 per bond. */
export function stiffnessTolerance(solveTolerance: number): number {
  return Math.min(solveTolerance, 1e-11);
}

/** The reading a solve asked for (solver.stiffness), from its outcome; null when off or stopped. */
export function stiffnessOfSolve(
  solver: { stiffness: boolean; tolerance: number; maxSweeps: number },
  outcome: { stopped: boolean; model: LatticeModel; solve: { mu: number }; temperature: number; state: { fields: { phi: Float64Array } } },
): StiffnessReading | null {
  if (!solver.stiffness || outcome.stopped) return null;
  return stiffnessReading(
    outcome.model,
    { mu: outcome.solve.mu, temperature: outcome.temperature, phi: outcome.state.fields.phi },
    { tolerance: solver.tolerance, maxSweeps: solver.maxSweeps },
  );
}

export function stiffnessReading(
  model: LatticeModel,
  solution: { mu: number; temperature: number; phi: Float64Array },
  settings: { tolerance: number; maxSweeps: number },
): StiffnessReading {
  const tolerance = stiffnessTolerance(settings.tolerance);
  const r = superfluidStiffness(model, {
    mu: solution.mu,
    temperature: solution.temperature,
    initialPhi: solution.phi,
    tolerance,
    maxSweeps: settings.maxSweeps,
  });
  const u = r.untwisted;
  const warnings: RunWarning[] = [];
  const notConverged = r.axes.filter((a) => !a.converged);
  if (notConverged.length > 0) {
    warnings.push({
      code: 'stiffness-not-converged',
      message:
        `the twist curvature did not converge on axis ${notConverged.map((a) => a.axis).join(', ')} ` +
        `(a twisted solve reached solver.maxSweeps = ${settings.maxSweeps}, or the two twist sizes disagree by more than 1e-3 of the value); ` +
        'the superfluid fraction there is not reliable: raise solver.maxSweeps or move away from a phase boundary',
    });
  }
  // The site labels call a site superfluid by its own condensate; puddles that carry no
  // superflow look the same there. Say so when the twist finds (almost) none.
  const condensateFraction = u.atoms > 0 ? u.condensedAtoms / u.atoms : null;
  const measured = r.axes.filter((a) => a.value !== null && a.converged).map((a) => a.value as number);
  if (condensateFraction !== null && measured.length > 0 && carriesNoSuperflow(condensateFraction, Math.max(...measured))) {
    warnings.push({
      code: 'no-superflow',
      message:
        `the condensate fraction is ${condensateFraction.toPrecision(3)} but the superfluid fraction is at most ${Math.max(...measured).toExponential(2)} (below ${NO_SUPERFLOW_RATIO} of it) on every periodic axis: ` +
        'the sites labelled superfluid are puddles that carry no superflow across the lattice; where they are compressible this is a Bose glass by the stiffness criterion',
    });
  }
  return {
    criterion: STIFFNESS_CRITERION,
    axes: r.axes,
    condensateFraction,
    solves: r.solves,
    sweeps: r.sweeps,
    tolerance,
    method: 'twisted Gutzwiller solves (complex phi), red-black Gauss-Seidel in plain JavaScript on one thread with an Aitken step on the slowest mode, warm-started from the solution; central differences at q and q/2 per bond, Richardson-extrapolated; error = |D(q/2) - D(q)|/3',
    converged: notConverged.length === 0,
    warnings,
  };
}

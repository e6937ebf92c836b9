// What a "radius" means for this lattice, so that shell radii and radial profiles are labelled
// by what they measure. With a harmonic trap the radius is the trap-scaled distance from the
// trap centre (each axis scaled by sqrt(k_d / k_ref), so the trap is round): the shells of the
// local-density picture are rings at fixed radius. Without a trap the same number is the plain
// distance from the lattice centre (the scale factors are all 1): still a radius for a box or a
// ring-shaped potential, but not the radius of a trap. On a lattice periodic along every axis
// with no trap there is no centre at all (every site is equivalent up to the disorder), so a
// shell "radius" is an artefact of where the lattice was cut and is not shown as one.

export type RadialFrame = 'trap' | 'latticeCentre' | 'none';

/** trapCoefficient: k_d per axis (0 where untrapped); periodic: per axis. */
export function radialFrame(trapCoefficient: readonly number[], periodic: readonly boolean[]): RadialFrame {
  return frameOf(trapCoefficient.some((k) => k > 0), periodic);
}

function frameOf(trapped: boolean, periodic: readonly boolean[]): RadialFrame {
  if (trapped) return 'trap';
  if (periodic.length > 0 && periodic.every((p) => p)) return 'none';
  return 'latticeCentre';
}

/** Axis label of a radial coordinate in this frame (without the unit). */
export function radiusLabel(frame: RadialFrame): string {
  if (frame === 'trap') return 'trap-scaled radius';
  if (frame === 'latticeCentre') return 'distance from the lattice centre (no trap)';
  return 'distance from the lattice centre (periodic, no trap: no preferred centre)';
}

/** One sentence for captions: how shell radii are read in this frame. */
export function shellRadiusNote(frame: RadialFrame): string {
  if (frame === 'trap') return 'Radii are where the shell fills half of an annulus of the trap-scaled radius (a central shell starts at 0).';
  if (frame === 'latticeCentre') {
    return 'There is no trap: radii are distances from the lattice centre, where the shell fills half of an annulus (a central shell starts at 0); they are not trap radii.';
  }
  return 'There is no trap and every axis is periodic, so the lattice has no centre: shells are regions, not rings, and no radii are given (see the site-phase map).';
}

/**
 * The frame of a scenario as written (for readers that have no resolved model, such as a
 * merged scan): trapped when a trap coefficient or frequency is positive on some axis or a
 * beam waist gives the envelope's harmonic confinement; periodic per axis from the boundary.
 */
export function scenarioRadialFrame(scenario: {
  lattice: { shape: readonly number[]; boundary?: 'open' | 'periodic' | readonly ('open' | 'periodic')[] };
  trap?: { coefficient?: number | readonly number[]; frequencyHz?: number | readonly number[] };
  laboratory?: { beamWaistUm?: number | readonly number[] };
}): RadialFrame {
  const positive = (v: number | readonly number[] | undefined): boolean => (v === undefined ? false : typeof v === 'number' ? v > 0 : v.some((x) => x > 0));
  const trapped = positive(scenario.trap?.coefficient) || positive(scenario.trap?.frequencyHz) || scenario.laboratory?.beamWaistUm !== undefined;
  const b = scenario.lattice.boundary ?? 'open';
  const periodic = scenario.lattice.shape.map((_, d) => (typeof b === 'string' ? b : (b[d] ?? b[0])) === 'periodic');
  return frameOf(trapped, periodic);
}

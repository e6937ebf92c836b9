// A scalar parameter as a function of time (a ramp, a modulation), as the drive of the
// time-dependent Gutzwiller equations sees it. `breakpoints` lists the times where the
// function or its slope jumps: the integrators never take a step across one, so a kink in a
// piecewise ramp costs no accuracy (a Runge-Kutta step assumes a smooth right-hand side).
// At a jump the function is right-continuous; `leftLimit` asks for the value just before,
// which a step that ends exactly on the jump needs for its last stages.

export interface TimeFunction {
  valueAt(time: number, leftLimit?: boolean): number;
  /** ascending times of kinks and jumps */
  readonly breakpoints: readonly number[];
}

/** A constant (no breakpoints). */
export function constantFunction(value: number): TimeFunction {
  return { valueAt: () => value, breakpoints: [] };
}

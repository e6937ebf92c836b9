// The common shape of the time integrators: advance the state from t0 to t1 exactly,
// never across t1 (callers put output times and the drive's breakpoints there).

export interface StepStatistics {
  /** accepted steps (splitting: steps) */
  steps: number;
  /** rejected steps (adaptive only) */
  rejectedSteps: number;
  /** right-hand-side evaluations (adaptive) or one-colour propagations (splitting) */
  evaluations: number;
  smallestStep: number;
  largestStep: number;
  /** last accepted step size */
  lastStep: number;
}

export type AdvanceStatus = { ok: true } | { ok: false; reason: 'step-limit' | 'step-underflow' | 'not-finite'; message: string };

export interface Stepper {
  readonly statistics: StepStatistics;
  /** t0 -> t1 exactly; endIsBreakpoint: t1 is a kink or jump of the drive */
  advance(t0: number, t1: number, endIsBreakpoint: boolean): Promise<AdvanceStatus>;
  /** the state was changed from outside: forget cached derivatives */
  invalidate(): void;
}

export function emptyStatistics(): StepStatistics {
  return { steps: 0, rejectedSteps: 0, evaluations: 0, smallestStep: Infinity, largestStep: 0, lastStep: NaN };
}

export function recordStep(s: StepStatistics, h: number): void {
  s.steps++;
  if (h < s.smallestStep) s.smallestStep = h;
  if (h > s.largestStep) s.largestStep = h;
  s.lastStep = h;
}

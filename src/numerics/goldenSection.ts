// Golden-section search for the maximum of a function that is unimodal on [lo, hi] (Kiefer,
// Proc. Amer. Math. Soc. 4, 502 (1953); Press et al., Numerical Recipes, 3rd ed., sec.
// 10.2): each step keeps the sub-interval that holds the larger of two interior values and
// reuses one of them, so every step costs one evaluation and shrinks the interval by
// (sqrt 5 - 1) / 2. Used where each evaluation is expensive and no derivative is at hand:
// the lobe tip of the cluster phase boundary (one critical-hopping solve per point) and the
// global phase that best aligns an evolved state with the ground state.

/** Where the search ended: the better interior point and its value. */
export interface GoldenSectionMaximum {
  x: number;
  value: number;
}

export interface GoldenSectionStop {
  /** Stop once hi - lo is at most this (default -Infinity: never on width). */
  width?: number;
  /** Stop after this many steps (default Infinity). */
  steps?: number;
}

/**
 * Maximum of f on [lo, hi] by golden-section search; stops on `stop.width` or `stop.steps`,
 * whichever comes first. f is called 2 + (steps taken) times, in a fixed order.
 */
export function goldenSectionMaximum(f: (x: number) => number, lo: number, hi: number, stop: GoldenSectionStop): GoldenSectionMaximum {
  const width = stop.width ?? -Infinity;
  const steps = stop.steps ?? Infinity;
  const golden = (Math.sqrt(5) - 1) / 2;
  let a = lo;
  let b = hi;
  let c = b - golden * (b - a);
  let d = a + golden * (b - a);
  let fc = f(c);
  let fd = f(d);
  for (let step = 0; step < steps && b - a > width; step++) {
    if (fc > fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - golden * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + golden * (b - a);
      fd = f(d);
    }
  }
  return { x: fc > fd ? c : d, value: Math.max(fc, fd) };
}

// Levenberg-Marquardt with an asynchronous model. The project's Levenberg-Marquardt fit (leastSquaresFit.ts,
// Bevington & Robinson ch. 8) takes a synchronous model, but every model evaluation
// here is a whole lattice solve, which is asynchronous. Rather than keep a second copy
// of the algorithm, we replay it: the fit is deterministic, so we run it with a model
// that answers from a cache and aborts at the first parameter vector it has not seen;
// that vector is then evaluated asynchronously, cached, and the fit is run again from
// the start. Each replay retraces exactly the same steps up to the new point, so the
// final run is the plain fit with every model value computed once. The replays cost
// O(evaluations^2) cheap chi-square sums. Points the model can answer at once (`modelSync`:
// a solution already found, or the fit's linear model between solves) are answered
// inside the run, so only the real solves cost a replay.

import { leastSquaresFit, type LeastSquaresFit, type LeastSquaresOptions, type LeastSquaresProblem } from '../numerics/leastSquaresFit.js';

export interface AsyncLeastSquaresProblem extends Omit<LeastSquaresProblem, 'model'> {
  model: (params: Float64Array) => Promise<Float64Array>;
  /**
   * The model where it can answer at once (e.g. from solutions already found), else
   * undefined. A replay is only needed for the points it cannot answer.
   */
  modelSync?: (params: Float64Array) => Float64Array | undefined;
}

export interface ReplayedFit extends LeastSquaresFit {
  /** Distinct parameter vectors evaluated. */
  distinctEvaluations: number;
  /** Times the fit was run again from the start (one per asynchronous evaluation). */
  replays: number;
  /** The model values the fit took at `params`, if it evaluated them (e.g. its last Jacobian). */
  valueAt(params: Float64Array): Float64Array | undefined;
}

/** Signal thrown through leastSquaresFit when the cache has no value yet. */
class NeedsEvaluation {
  constructor(readonly params: Float64Array) {}
}

/** Exact key of a parameter vector (String(x) reads back as the same double). */
function keyOf(params: Float64Array): string {
  return Array.from(params, (v) => String(v)).join(',');
}

/** leastSquaresFit with an asynchronous model, by deterministic replay (see the file header). */
export async function replayLeastSquaresFit(problem: AsyncLeastSquaresProblem, options: LeastSquaresOptions = {}): Promise<ReplayedFit> {
  const cache = new Map<string, Float64Array>();
  const cachedModel = (params: Float64Array): Float64Array => {
    const key = keyOf(params);
    const hit = cache.get(key);
    if (hit !== undefined) return hit;
    const now = problem.modelSync?.(params);
    if (now === undefined) throw new NeedsEvaluation(Float64Array.from(params));
    cache.set(key, now);
    return now;
  };
  const { model, modelSync, ...plain } = problem;
  void modelSync;
  for (let replays = 0; ; replays++) {
    try {
      const fit = leastSquaresFit({ ...plain, model: cachedModel }, options);
      return { ...fit, distinctEvaluations: cache.size, replays, valueAt: (params) => cache.get(keyOf(params)) };
    } catch (err) {
      if (!(err instanceof NeedsEvaluation)) throw err;
      cache.set(keyOf(err.params), await model(err.params));
    }
  }
}

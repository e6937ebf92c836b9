// Mean and spread in one pass, element by element over arrays of running moments:
// Welford's update for one new value (B. P. Welford, Technometrics 4, 419 (1962)) and the
// pairwise combination of two partial results by Chan, Golub & LeVeque ("Algorithms for
// computing the sample variance: analysis and recommendations", The American
// Statistician 37, 242 (1983)):
//   add x (count c after adding):  d = x - mean; mean += d / c; M2 += d (x - mean)
//   merge B into A:                n = nA + nB; d = meanB - meanA;
//                                  mean = meanA + d (nB / n); M2 = M2A + M2B + d^2 (nA nB / n)
// with M2 = sum (x - mean)^2. Unlike sums of x and x^2, neither subtracts two nearly equal
// large numbers, and a slot that always receives the same value keeps that mean and M2 = 0
// exactly. The operation order above is part of the contract: callers (disorder ensembles,
// radial profiles) rely on the same inputs giving the same bits, whatever the grouping
// that a fixed block plan prescribes.
//
// Also here: the two-pass summary of a short list of numbers (mean, then the sum of squared
// deviations from it), for per-realisation scalars.

/** Running mean and sum of squared deviations M2, one slot per element. */
export interface RunningMoments {
  mean: Float64Array;
  m2: Float64Array;
}

/** Zeroed moments for `size` slots. */
export function createRunningMoments(size: number): RunningMoments {
  if (!Number.isInteger(size) || size < 0) {
    throw new RangeError(`createRunningMoments size: expected a non-negative integer, got ${size}`);
  }
  return { mean: new Float64Array(size), m2: new Float64Array(size) };
}

/**
 * Welford update of every slot with the matching entry of `values`.
 * @param countAfter number of values per slot including this one (1 for the first)
 */
export function welfordAdd(moments: RunningMoments, values: Float64Array, countAfter: number): void {
  const { mean, m2 } = moments;
  if (values.length !== mean.length) {
    throw new RangeError(`welfordAdd values: expected ${mean.length} entries (one per slot), got ${values.length}`);
  }
  for (let i = 0; i < values.length; i++) {
    const d = values[i] - mean[i];
    mean[i] += d / countAfter;
    m2[i] += d * (values[i] - mean[i]);
  }
}

/**
 * Welford update of one slot, for accumulators whose slots fill at different rates (e.g.
 * radial bins). No checks: it sits in per-point loops.
 */
export function welfordAddAt(mean: Float64Array, m2: Float64Array, slot: number, value: number, countAfter: number): void {
  const d = value - mean[slot];
  mean[slot] += d / countAfter;
  m2[slot] += d * (value - mean[slot]);
}

/**
 * Chan-Golub-LeVeque merge of `from` (fromCount values per slot) into `into` (intoCount
 * values per slot). With intoCount = 0 it copies.
 */
export function chanMerge(into: RunningMoments, intoCount: number, from: RunningMoments, fromCount: number): void {
  if (from.mean.length !== into.mean.length) {
    throw new RangeError(`chanMerge from: expected ${into.mean.length} slots, got ${from.mean.length}`);
  }
  if (!(intoCount >= 0) || !(fromCount >= 0)) {
    throw new RangeError(`chanMerge counts: expected counts >= 0, got ${intoCount} and ${fromCount}`);
  }
  if (fromCount === 0) return;
  if (intoCount === 0) {
    into.mean.set(from.mean);
    into.m2.set(from.m2);
    return;
  }
  const n = intoCount + fromCount;
  const wFrom = fromCount / n;
  const wCross = (intoCount * fromCount) / n;
  const mean = into.mean;
  const m2 = into.m2;
  for (let i = 0; i < mean.length; i++) {
    const d = from.mean[i] - mean[i];
    mean[i] += d * wFrom;
    m2[i] += from.m2[i] + d * d * wCross;
  }
}

/**
 * Sample standard deviation sqrt(M2 / (count - 1)) per slot (Bessel's correction), or
 * `fewer` where count < 2 (0 or NaN, as the caller documents). A negative M2 from rounding
 * counts as 0.
 */
export function sampleSpread(m2: Float64Array, count: number | Float64Array, fewer: number): Float64Array {
  const out = new Float64Array(m2.length);
  for (let i = 0; i < m2.length; i++) {
    const c = typeof count === 'number' ? count : count[i];
    out[i] = c < 2 ? fewer : Math.sqrt(m2[i] > 0 ? m2[i] / (c - 1) : 0);
  }
  return out;
}

export interface ScalarSummary {
  mean: number;
  /** sample standard deviation (0 for one value) */
  spread: number;
  min: number;
  max: number;
}

/** Two-pass mean and sample standard deviation of a list, with its range; NaNs when empty. */
export function scalarSummary(values: readonly number[]): ScalarSummary {
  const n = values.length;
  if (n === 0) return { mean: NaN, spread: NaN, min: NaN, max: NaN };
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    sum += v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const mean = sum / n;
  let ss = 0;
  for (const v of values) ss += (v - mean) * (v - mean);
  return { mean, spread: n > 1 ? Math.sqrt(ss / (n - 1)) : 0, min, max };
}

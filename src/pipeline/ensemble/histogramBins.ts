// Fixed bins for the ensemble histograms of local density n_i and condensate density
// |phi_i|^2 (atoms per site). The edges are chosen before any realisation is solved,
// from the scenario's Fock-space truncation nmax alone: both quantities lie in
// [0, nmax] (n_i <= nmax; |phi_i|^2 = |<b>|^2 <= <b^+ b> = n_i by the Cauchy-Schwarz
// inequality), so every shard of an ensemble uses the same bins and histogram counts
// simply add. Bin k is [k/b, (k+1)/b) with b bins per atom; the top edge nmax belongs
// to the last bin. Values above nmax can only occur when the solver raised nmax on its
// own (truncation.automatic); they are counted as overflow, not dropped silently.

export interface HistogramBins {
  /** bins per atom per site (bin width 1/binsPerAtom) */
  binsPerAtom: number;
  /** upper end of the range: the scenario's nmax */
  maxAtoms: number;
  binCount: number;
}

export const DEFAULT_BINS_PER_ATOM = 20;

export function histogramBins(nmax: number, binsPerAtom: number = DEFAULT_BINS_PER_ATOM): HistogramBins {
  if (!Number.isInteger(nmax) || nmax < 1) throw new RangeError(`histogram nmax: expected a whole number >= 1, got ${nmax}`);
  if (!Number.isInteger(binsPerAtom) || binsPerAtom < 1 || binsPerAtom > 10_000) {
    throw new RangeError(`bins per atom: expected a whole number from 1 to 10000, got ${binsPerAtom}`);
  }
  return { binsPerAtom, maxAtoms: nmax, binCount: nmax * binsPerAtom };
}

/** The binCount + 1 edges k / binsPerAtom. */
export function binEdges(bins: HistogramBins): Float64Array {
  const edges = new Float64Array(bins.binCount + 1);
  for (let k = 0; k <= bins.binCount; k++) edges[k] = k / bins.binsPerAtom;
  return edges;
}

/**
 * Bin of value x: floor(x * binsPerAtom), the top edge in the last bin; -1 for values
 * above the range (overflow). Negative values (rounding of a zero) go to bin 0.
 */
export function binOf(bins: HistogramBins, x: number): number {
  if (!(x > 0)) return 0;
  if (x > bins.maxAtoms) return -1;
  const k = Math.floor(x * bins.binsPerAtom);
  return k >= bins.binCount ? bins.binCount - 1 : k;
}

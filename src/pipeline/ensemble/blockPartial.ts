// Accumulation of an ensemble in canonical blocks (blockPlan.ts), and the combination of
// block partials into the ensemble totals.
//
// Per-site mean and spread: Welford's one-pass update inside a block (B. P. Welford,
// Technometrics 4, 419 (1962)) and the pairwise combination of Chan, Golub & LeVeque
// for the blocks ("Algorithms for computing the sample variance: analysis and
// recommendations", The American Statistician 37, 242 (1983)):
//   add x:        c += 1; d = x - mean; mean += d / c; M2 += d (x - mean)
//   merge A, B:   n = nA + nB; d = meanB - meanA; mean = meanA + d nB / n;
//                 M2 = M2A + M2B + d^2 nA nB / n
// with M2 = sum (x - mean)^2. Unlike sums of x and x^2, this never subtracts two
// nearly equal large numbers, and a site that takes the same value in every
// realisation (a Mott site, n = 1 exactly) gets mean = that value and M2 = 0 exactly.
//
// Everything else is a count (histograms, phase labels, spanning), held in Float64Array
// as whole numbers (exact below 2^53), so its sums do not depend on order at all.
//
// Determinism: `addRealisation` must be called in realisation order within a block, and
// `absorbBlock` takes the partials in block order. Both are checked. Memory: a run holds
// the block being filled and the total, never all blocks at once.

import { PhaseCode, phaseNames } from '../../observables/phaseCodes.js';
import { chanMerge, welfordAdd, type RunningMoments } from '../../numerics/runningMoments.js';
import type { BlockRange } from './blockPlan.js';
import { binOf, type HistogramBins } from './histogramBins.js';
import type { RealisationRecord, RealisationResult } from './solveRealisation.js';

/** Running mean and sum of squared deviations per site (src/numerics/runningMoments.ts). */
export type SiteMoments = RunningMoments;

/** Histogram counts over the fixed bins, and values above the range. */
export interface HistogramCounts {
  counts: Float64Array;
  overflow: number;
}

export interface EnsembleAccumulation {
  /** realisations accumulated */
  count: number;
  siteCount: number;
  density: SiteMoments;
  condensate: SiteMoments;
  /** realisations in which site i has phase p, at [p * siteCount + i] (p = PhaseCode) */
  phaseCounts: Float64Array;
  /** local density n_i of non-empty sites (one entry per site and realisation) */
  densityHistogram: HistogramCounts;
  /** condensate density |phi_i|^2 of non-empty sites */
  condensateHistogram: HistogramCounts;
  /** per-realisation scalars, in realisation order */
  records: RealisationRecord[];
}

export interface BlockPartial extends EnsembleAccumulation {
  range: BlockRange;
}

/** The running ensemble total: block partials absorbed one at a time, in block order. */
export interface EnsembleTotal extends EnsembleAccumulation {
  /** last block absorbed (-1 before the first) */
  lastBlock: number;
}

export const phaseCount = phaseNames.length;

/** An empty total, ready for `absorbBlock`. */
export function createEnsembleTotal(siteCount: number, bins: HistogramBins): EnsembleTotal {
  return { lastBlock: -1, ...emptyAccumulation(siteCount, bins) };
}

function emptyAccumulation(siteCount: number, bins: HistogramBins): EnsembleAccumulation {
  return {
    count: 0,
    siteCount,
    density: { mean: new Float64Array(siteCount), m2: new Float64Array(siteCount) },
    condensate: { mean: new Float64Array(siteCount), m2: new Float64Array(siteCount) },
    phaseCounts: new Float64Array(phaseCount * siteCount),
    densityHistogram: { counts: new Float64Array(bins.binCount), overflow: 0 },
    condensateHistogram: { counts: new Float64Array(bins.binCount), overflow: 0 },
    records: [],
  };
}

export function createBlockPartial(range: BlockRange, siteCount: number, bins: HistogramBins): BlockPartial {
  return { range, ...emptyAccumulation(siteCount, bins) };
}

/** True once every realisation of the block has been added. */
export function blockComplete(partial: BlockPartial): boolean {
  return partial.count === partial.range.count;
}

/** Adds the next realisation of the block (realisation order is enforced). */
export function addRealisation(partial: BlockPartial, result: RealisationResult, bins: HistogramBins): void {
  const expected = partial.range.first + partial.count;
  if (result.record.index !== expected) {
    throw new Error(`addRealisation: block ${partial.range.block} expects realisation ${expected} next, got ${result.record.index}`);
  }
  if (partial.count >= partial.range.count) throw new Error(`addRealisation: block ${partial.range.block} is already complete`);
  const n = partial.siteCount;
  if (result.density.length !== n || result.condensateDensity.length !== n || result.phaseCodes.length !== n) {
    throw new Error(`addRealisation: realisation ${result.record.index} has ${result.density.length} sites, the ensemble ${n}`);
  }
  partial.count++;
  welfordAdd(partial.density, result.density, partial.count);
  welfordAdd(partial.condensate, result.condensateDensity, partial.count);
  const codes = result.phaseCodes;
  const dh = partial.densityHistogram;
  const ch = partial.condensateHistogram;
  for (let i = 0; i < n; i++) {
    const code = codes[i];
    partial.phaseCounts[code * n + i] += 1;
    if (code === PhaseCode.empty) continue; // histograms describe the cloud, not the lattice's empty margin
    const kd = binOf(bins, result.density[i]);
    if (kd < 0) dh.overflow++;
    else dh.counts[kd] += 1;
    const kc = binOf(bins, result.condensateDensity[i]);
    if (kc < 0) ch.overflow++;
    else ch.counts[kc] += 1;
  }
  partial.records.push(result.record);
}

function addCounts(into: Float64Array, from: Float64Array): void {
  for (let i = 0; i < into.length; i++) into[i] += from[i];
}

/**
 * Adds a complete block partial to the running total. Blocks must come in increasing
 * block order; the first one is copied, later ones merged, so the same partials always
 * give the same bits, whether they were computed in this process or read from shards.
 * The partial can be dropped afterwards (only the total keeps memory).
 */
export function absorbBlock(total: EnsembleTotal, p: BlockPartial): void {
  if (p.range.block <= total.lastBlock) throw new Error(`absorbBlock: block ${p.range.block} after block ${total.lastBlock}; give blocks in increasing order`);
  if (!blockComplete(p)) throw new Error(`absorbBlock: block ${p.range.block} holds ${p.count} of its ${p.range.count} realisations`);
  if (p.siteCount !== total.siteCount) throw new Error(`absorbBlock: block ${p.range.block} has ${p.siteCount} sites, the ensemble ${total.siteCount}`);
  total.lastBlock = p.range.block;
  if (total.count === 0) {
    total.density.mean.set(p.density.mean);
    total.density.m2.set(p.density.m2);
    total.condensate.mean.set(p.condensate.mean);
    total.condensate.m2.set(p.condensate.m2);
  } else {
    chanMerge(total.density, total.count, p.density, p.count);
    chanMerge(total.condensate, total.count, p.condensate, p.count);
  }
  total.count += p.count;
  addCounts(total.phaseCounts, p.phaseCounts);
  addCounts(total.densityHistogram.counts, p.densityHistogram.counts);
  addCounts(total.condensateHistogram.counts, p.condensateHistogram.counts);
  total.densityHistogram.overflow += p.densityHistogram.overflow;
  total.condensateHistogram.overflow += p.condensateHistogram.overflow;
  for (const r of p.records) total.records.push(r);
}

/** The total of block partials given in block order (absorbBlock on each in turn). */
export function combineBlocks(partials: readonly BlockPartial[], bins: HistogramBins): EnsembleTotal {
  if (partials.length === 0) throw new Error('combineBlocks: no block partials');
  const total = createEnsembleTotal(partials[0].siteCount, bins);
  for (const p of partials) absorbBlock(total, p);
  return total;
}

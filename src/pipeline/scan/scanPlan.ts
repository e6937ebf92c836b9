// The points of a parameter scan, the order they are solved in, and which of them a
// shard owns.
//
// Points. One or two axes, each a dotted scenario path with its values; point p of a
// two-axis scan sits at (i, j) with p = i * n2 + j (the first axis slowest, as in the CSV).
//
// Solve order: a snake (boustrophedon) path through the grid, the second axis forwards
// on even rows of the first and backwards on odd rows, so that each point is solved right
// after a grid neighbour and can start from its solution (warm start).
//
// Chains. Warm starts make a point's result depend, within the solver tolerance, on the
// point solved before it. So that a scan split over shards gives exactly the bits of a
// single run, the dependency is fixed by the scan alone (as the blocks of an ensemble,
// src/pipeline/ensemble/blockPlan.ts): the snake path is cut into chains of
// `chainLength` consecutive points; the first point of a chain starts cold (the solver's
// own atomic-limit guess), each later one from its predecessor. A shard owns whole
// chains, the contiguous range that shardBlocks gives for K shards, so a point is solved
// from the same start in every split.

import { planBlocks, shardBlocks } from '../ensemble/blockPlan.js';

export type AxisSpacing = 'linear' | 'log' | 'list';

export interface ScanAxis {
  /** dotted scenario path (or the pseudo-path characteristicDensity) */
  path: string;
  values: number[];
  spacing: AxisSpacing;
}

export interface ScanPlan {
  axes: ScanAxis[];
  /** points per axis */
  counts: number[];
  pointCount: number;
  chainLength: number;
  chainCount: number;
  /** point indices in solve order (the snake path) */
  order: number[];
  /**
   * disorder realisations per point (seeds "<disorder.seed>/r", realisationSeed.ts); 1: the
   * scenario's own field. With more than one every realisation is solved cold, so the
   * point's statistics do not depend on the solve order, chains or shards.
   */
  realisations: number;
}

/** Most disorder realisations per scan point. */
export const MAX_REALISATIONS_PER_POINT = 10_000;

/** Largest number of points of one scan (each is a full lattice solve). */
export const MAX_SCAN_POINTS = 100_000;
/** Points per chain unless the scan says otherwise. */
export const DEFAULT_CHAIN_LENGTH = 8;

export function planScan(axes: readonly ScanAxis[], chainLength: number, realisations = 1): ScanPlan {
  if (!Number.isInteger(realisations) || realisations < 1 || realisations > MAX_REALISATIONS_PER_POINT) {
    throw new RangeError(`realisations per point: expected a whole number from 1 to ${MAX_REALISATIONS_PER_POINT}, got ${realisations}`);
  }
  if (axes.length < 1 || axes.length > 2) throw new RangeError(`scan axes: expected one or two, got ${axes.length}`);
  for (const a of axes) {
    if (a.values.length < 1) throw new RangeError(`scan axis ${a.path}: no values`);
    if (a.values.some((v) => !Number.isFinite(v))) throw new RangeError(`scan axis ${a.path}: values must be finite`);
  }
  if (new Set(axes.map((a) => a.path)).size !== axes.length) throw new RangeError(`scan axes: the path ${axes[0].path} is given twice`);
  if (!Number.isInteger(chainLength) || chainLength < 1) throw new RangeError(`chain length: expected a whole number >= 1, got ${chainLength}`);
  const counts = axes.map((a) => a.values.length);
  const pointCount = counts.reduce((a, b) => a * b, 1);
  if (pointCount > MAX_SCAN_POINTS) throw new RangeError(`scan: ${pointCount} points, more than ${MAX_SCAN_POINTS}`);
  const order: number[] = [];
  if (counts.length === 1) {
    for (let p = 0; p < pointCount; p++) order.push(p);
  } else {
    const [n1, n2] = counts;
    for (let i = 0; i < n1; i++) {
      for (let k = 0; k < n2; k++) order.push(i * n2 + (i % 2 === 0 ? k : n2 - 1 - k));
    }
  }
  return { axes: axes.map((a) => ({ ...a, values: [...a.values] })), counts, pointCount, chainLength, chainCount: Math.ceil(pointCount / chainLength), order, realisations };
}

/** Grid indices of a point (one per axis). */
export function pointCoordinates(plan: ScanPlan, point: number): number[] {
  if (plan.counts.length === 1) return [point];
  const n2 = plan.counts[1];
  return [Math.floor(point / n2), point % n2];
}

/** Axis values of a point. */
export function pointValues(plan: ScanPlan, point: number): number[] {
  return pointCoordinates(plan, point).map((c, a) => plan.axes[a].values[c]);
}

/** Points of chain c in solve order. */
export function chainPoints(plan: ScanPlan, chain: number): number[] {
  if (!Number.isInteger(chain) || chain < 0 || chain >= plan.chainCount) {
    throw new RangeError(`chain: expected a whole number from 0 to ${plan.chainCount - 1}, got ${chain}`);
  }
  return plan.order.slice(chain * plan.chainLength, (chain + 1) * plan.chainLength);
}

/** Chain of a point. */
export function chainOf(plan: ScanPlan, point: number): number {
  return Math.floor(plan.order.indexOf(point) / plan.chainLength);
}

/** Chains owned by shard k of K: the same contiguous split as the blocks of an ensemble. */
export function shardChains(plan: ScanPlan, shardIndex: number, shardCount: number): number[] {
  return shardBlocks(planBlocks(plan.chainCount, 1), shardIndex, shardCount);
}

/**
 * Inner grid values are rounded to 15 significant digits, so that 0.01:0.03:6 gives 0.014,
 * not 0.013999999999999999 (a change below 1e-15 relative, far below any physical scale),
 * and the value in the table is the one the scenario was given.
 */
const tidy = (x: number): number => Number(x.toPrecision(15));

/** `count` values from `from` to `to`, equally spaced (endpoints exact). */
export function linearValues(from: number, to: number, count: number): number[] {
  if (count === 1) return [from];
  return Array.from({ length: count }, (_, k) => (k === 0 ? from : k === count - 1 ? to : tidy(from + ((to - from) * k) / (count - 1))));
}

/** `count` values from `from` to `to` in a constant ratio (both > 0; endpoints exact). */
export function logValues(from: number, to: number, count: number): number[] {
  if (!(from > 0) || !(to > 0)) throw new RangeError(`log spacing: both ends must be positive, got ${from} and ${to}`);
  if (count === 1) return [from];
  const ratio = Math.log(to / from);
  return Array.from({ length: count }, (_, k) => (k === 0 ? from : k === count - 1 ? to : tidy(from * Math.exp((ratio * k) / (count - 1)))));
}

// The named seed of each realisation of a disorder ensemble (DESIGN.md section 3: every
// random field comes from a named seed).
//
// Rule (part of the output interface; keep it stable): realisation r (r = 0, 1, ..., N-1)
// of an ensemble whose scenario has `disorder.seed` = S uses the seed "S/r", e.g.
// "layer/0", "layer/1", ... . Without a `disorder.seed` in the file the schema default
// applies ("disorder", so "disorder/0", ...). Hence:
// - realisation r is the same field whether it runs alone, in a shard, on a cluster node
//   or on a laptop, and whatever the realisation count or block size is;
// - `tiercake solve` with `--set disorder.seed=S/r` reproduces realisation r alone;
// - two ensembles with different S share no realisation (the seed text is hashed as a
//   whole into the generator state, see src/lattice/seededRandom.ts).

import { streamName } from '../../numerics/seededRandom.js';

/** The seed of realisation `index` for the scenario seed `baseSeed` (the stream "baseSeed/index"). */
export function realisationSeed(baseSeed: string, index: number): string {
  if (!Number.isInteger(index) || index < 0) {
    throw new RangeError(`realisationSeed index: expected a whole number >= 0, got ${index}`);
  }
  return streamName(baseSeed, index);
}

/**
 * A copy of the scenario JSON with the seed of realisation `index` in `disorder.seed`.
 * The input is not changed. The scenario must contain a `disorder` object.
 */
export function withRealisationSeed(raw: Readonly<Record<string, unknown>>, baseSeed: string, index: number): Record<string, unknown> {
  const disorder = raw.disorder;
  if (disorder === null || typeof disorder !== 'object' || Array.isArray(disorder)) {
    throw new RangeError('withRealisationSeed: the scenario has no disorder object');
  }
  return { ...raw, disorder: { ...(disorder as Record<string, unknown>), seed: realisationSeed(baseSeed, index) } };
}

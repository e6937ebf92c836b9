// The self-describing partial result of one ensemble shard, written block by block while
// the shard runs (EnsembleShardWriter), and reading it back.
//
// A shard folder holds
//   shard.json                      header: format tag and version, tool version,
//                                   scenario (as run) and its SHA-256 hash, realisation
//                                   count, block size, block count, histogram bins,
//                                   shard index/count, the blocks held, and per block
//                                   the histogram overflow and the per-realisation records
//   blocks/block-NNNNNN/*.npy       the block partials (float64, C order):
//     density_mean, density_m2, condensate_mean, condensate_m2   shape = lattice shape
//     phase_counts                  shape = [5, lattice shape...], axis 0 = phase code
//     density_histogram, condensate_histogram                    shape = [bins]
// Every number survives the round trip exactly: .npy holds the float64 bits, and JSON
// numbers are written by ECMAScript Number::toString, the shortest decimal that reads
// back as the same double. That is what lets `tiercake merge` reproduce a single run bit
// for bit (src/ensemble/blockPlan.ts).
//
// Scenario hash: scenarioHash() of src/scenario/scenarioHash.ts (the whole scenario).

import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import * as z from 'zod';
import { decodeNpy, encodeNpy, NpyFormatError } from '../formats/npy.js';
import { OutputFolder, type CommitReport } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { toolVersion } from './toolVersion.js';
import { Sha256HexSchema, ToolStampSchema, toolStamp } from './recordFields.js';
import type { BlockPlan } from '../pipeline/ensemble/blockPlan.js';
import { phaseCount, type BlockPartial } from '../pipeline/ensemble/blockPartial.js';
import type { HistogramBins } from '../pipeline/ensemble/histogramBins.js';
import type { EnsembleContext, RealisationRecord } from '../pipeline/ensemble/solveRealisation.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { InputError } from '../scenario/inputError.js';

export const SHARD_FORMAT = 'tiercake-ensemble-shard';
export const SHARD_FORMAT_VERSION = 1;
export const SHARD_HEADER_FILE = 'shard.json';

const RecordSchema = z.strictObject({
  index: z.int().min(0),
  converged: z.boolean(),
  sweeps: z.number(),
  nmaxUsed: z.int(),
  mu: z.number(),
  temperature: z.number(),
  atoms: z.number(),
  condensedAtoms: z.number(),
  superfluidSpans: z.boolean(),
  superfluidClusters: z.int(),
  largestClusterSites: z.int(),
  phaseSites: z.array(z.int()).length(phaseCount),
  // absent in shards written before solver.stiffness reached ensembles
  superfluidFraction: z.number().nullable().default(null),
  superfluidFractionError: z.number().nullable().default(null),
  stiffnessConverged: z.boolean().default(true),
});

const BlockEntrySchema = z.strictObject({
  block: z.int().min(0),
  first: z.int().min(0),
  count: z.int().min(1),
  folder: z.string().regex(/^blocks\/block-\d{6,}$/),
  densityOverflow: z.number().min(0),
  condensateOverflow: z.number().min(0),
  records: z.array(RecordSchema),
});

const UnitsSchema = z.strictObject({
  internal: z.enum(['J', 'U', 'Hz']),
  hopping: z.number(),
  interaction: z.number(),
  hertz: z.number().nullable(),
  nanokelvin: z.number().nullable(),
});

export const ShardHeaderSchema = z.strictObject({
  format: z.literal(SHARD_FORMAT),
  formatVersion: z.literal(SHARD_FORMAT_VERSION),
  tool: ToolStampSchema,
  scenarioName: z.string(),
  scenarioHash: Sha256HexSchema,
  scenario: z.record(z.string(), z.unknown()),
  baseSeed: z.string(),
  seedRule: z.string(),
  realisations: z.int().min(1),
  blockSize: z.int().min(1),
  blockCount: z.int().min(1),
  bins: z.strictObject({ binsPerAtom: z.int().min(1), maxAtoms: z.int().min(1), binCount: z.int().min(1) }),
  context: z.strictObject({
    shape: z.array(z.int().min(1)).min(1).max(3),
    periodic: z.array(z.boolean()),
    trapCentre: z.array(z.number()),
    latticeSpacingUm: z.number().nullable(),
    units: UnitsSchema,
    mode: z.enum(['hubbard', 'laboratory']),
    thresholds: z.strictObject({
      emptyDensityMax: z.number(),
      condensateFractionMax: z.number(),
      condensateMin: z.number(),
      integerTolerance: z.number(),
      compressibilityMin: z.number(),
      bulkDensityFraction: z.number(),
      bulkErosionSites: z.number(),
    }),
  }),
  shard: z.strictObject({ index: z.int().min(0), count: z.int().min(1) }),
  blocks: z.array(BlockEntrySchema),
  run: z.strictObject({ threads: z.int().min(1), parallelOver: z.enum(['realisations', 'lattice']), seconds: z.number() }),
});

export type ShardHeader = z.infer<typeof ShardHeaderSchema>;

/** Identity of the ensemble a shard belongs to (everything that fixes the bits). */
export interface EnsembleIdentity {
  scenario: Scenario;
  scenarioHash: string;
  baseSeed: string;
  plan: BlockPlan;
  bins: HistogramBins;
  context: EnsembleContext;
}

export const seedRuleText = (baseSeed: string): string =>
  `realisation r (from 0) uses disorder.seed = ${JSON.stringify(baseSeed)} + "/" + r, e.g. ${JSON.stringify(`${baseSeed}/0`)}`;

const blockFolder = (block: number): string => `blocks/block-${String(block).padStart(6, '0')}`;

const arrayFiles = ['density_mean', 'density_m2', 'condensate_mean', 'condensate_m2', 'phase_counts', 'density_histogram', 'condensate_histogram'] as const;

export type ShardBlockEntry = ShardHeader['blocks'][number];

/** Stage one finished block's partial sums in `folder`; returns its header entry. */
export function writeShardBlock(folder: OutputFolder, p: BlockPartial, shape: readonly number[]): ShardBlockEntry {
  const dir = blockFolder(p.range.block);
  const arrays: Record<(typeof arrayFiles)[number], { data: Float64Array; shape: readonly number[] }> = {
    density_mean: { data: p.density.mean, shape },
    density_m2: { data: p.density.m2, shape },
    condensate_mean: { data: p.condensate.mean, shape },
    condensate_m2: { data: p.condensate.m2, shape },
    phase_counts: { data: p.phaseCounts, shape: [phaseCount, ...shape] },
    density_histogram: { data: p.densityHistogram.counts, shape: [p.densityHistogram.counts.length] },
    condensate_histogram: { data: p.condensateHistogram.counts, shape: [p.condensateHistogram.counts.length] },
  };
  for (const name of arrayFiles) folder.write(`${dir}/${name}.npy`, encodeNpy(arrays[name].data, arrays[name].shape));
  return {
    block: p.range.block,
    first: p.range.first,
    count: p.range.count,
    folder: dir,
    densityOverflow: p.densityHistogram.overflow,
    condensateOverflow: p.condensateHistogram.overflow,
    records: p.records,
  };
}

/** Stage the shard header (after all its blocks); the caller commits the folder. */
export function writeShardHeader(
  folder: OutputFolder,
  identity: EnsembleIdentity,
  shard: { index: number; count: number },
  blocks: ShardBlockEntry[],
  run: ShardHeader['run'],
  toolVersion: string,
): void {
  const header: ShardHeader = {
    format: SHARD_FORMAT,
    formatVersion: SHARD_FORMAT_VERSION,
    tool: toolStamp(toolVersion),
    scenarioName: identity.scenario.name,
    scenarioHash: identity.scenarioHash,
    scenario: identity.scenario as unknown as Record<string, unknown>,
    baseSeed: identity.baseSeed,
    seedRule: seedRuleText(identity.baseSeed),
    realisations: identity.plan.realisations,
    blockSize: identity.plan.blockSize,
    blockCount: identity.plan.blockCount,
    bins: identity.bins,
    context: identity.context,
    shard,
    blocks,
    run,
  };
  folder.write(SHARD_HEADER_FILE, `${JSON.stringify(header, null, 1)}\n`);
}

/**
 * The staging folder of a running ensemble shard at `target`: each finished block goes
 * straight into it (so only one block is held in memory); `commit` adds the header and
 * moves the folder into place, `discard` removes it (an error or an interruption).
 */
export class EnsembleShardWriter {
  private readonly folder: OutputFolder;
  private readonly entries: ShardBlockEntry[] = [];

  constructor(
    target: OutputTarget,
    private readonly identity: EnsembleIdentity,
  ) {
    this.folder = new OutputFolder(target, { command: 'ensemble shard', scenarioHash: identity.scenarioHash });
  }

  get finalPath(): string {
    return this.folder.finalPath;
  }

  add(partial: BlockPartial): void {
    this.entries.push(writeShardBlock(this.folder, partial, this.identity.context.shape));
  }

  /** The records of the blocks written so far, in order. */
  records(): RealisationRecord[] {
    return this.entries.flatMap((e) => e.records as RealisationRecord[]);
  }

  commit(shard: { index: number; count: number }, run: ShardHeader['run']): CommitReport {
    try {
      writeShardHeader(this.folder, this.identity, shard, this.entries, run, toolVersion());
      return this.folder.commit();
    } catch (err) {
      this.folder.discard();
      throw err;
    }
  }

  discard(): void {
    this.folder.discard();
  }
}

export interface LoadedShard {
  /** folder as given (for messages) */
  path: string;
  header: ShardHeader;
}

/**
 * The shard folders named by the arguments: a folder with a shard.json is a shard; a
 * folder without one contributes its immediate subfolders that have one (so the
 * collecting folder of a job array can be given whole).
 */
export function findShardFolders(paths: readonly string[]): string[] {
  const found: string[] = [];
  for (const p of paths) {
    let st;
    try {
      st = statSync(p);
    } catch {
      throw new InputError(`merge ${JSON.stringify(p)}: no such folder; give shard folders written by \`tiercake ensemble --shard\``);
    }
    if (!st.isDirectory()) throw new InputError(`merge ${JSON.stringify(p)}: not a folder; give shard folders (each holds ${SHARD_HEADER_FILE})`);
    if (existsSync(join(p, SHARD_HEADER_FILE))) {
      found.push(p);
      continue;
    }
    const inner = readdirSync(p, { withFileTypes: true })
      .filter((d) => d.isDirectory() && !d.name.startsWith('.') && existsSync(join(p, d.name, SHARD_HEADER_FILE)))
      .map((d) => join(p, d.name))
      .sort();
    if (inner.length === 0) {
      throw new InputError(`merge ${JSON.stringify(p)}: holds no ${SHARD_HEADER_FILE}, and none of its subfolders does; is this a shard folder?`);
    }
    found.push(...inner);
  }
  return found;
}

export function readShardHeader(path: string): LoadedShard {
  const file = join(path, SHARD_HEADER_FILE);
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(file, 'utf8'));
  } catch (err) {
    throw new InputError(`merge ${JSON.stringify(file)}: cannot be read as JSON (${(err as Error).message}); the shard may be incomplete, run it again`);
  }
  if (parsed !== null && typeof parsed === 'object' && (parsed as Record<string, unknown>).format === SHARD_FORMAT) {
    const version = (parsed as Record<string, unknown>).formatVersion;
    if (version !== SHARD_FORMAT_VERSION) {
      throw new InputError(`merge ${JSON.stringify(file)}: shard format version ${String(version)}, this tiercake reads version ${SHARD_FORMAT_VERSION}; merge with the tiercake that wrote it`);
    }
  }
  const result = ShardHeaderSchema.safeParse(parsed);
  if (!result.success) {
    const first = result.error.issues[0];
    throw new InputError(`merge ${JSON.stringify(file)}: not a tiercake ensemble shard header (${first.path.join('.') || 'top level'}: ${first.message})`);
  }
  return { path, header: result.data };
}

function readArray(path: string, file: string, expectedShape: readonly number[]): Float64Array {
  const full = join(path, file);
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(readFileSync(full));
  } catch (err) {
    throw new InputError(`merge ${JSON.stringify(full)}: cannot be read (${(err as NodeJS.ErrnoException).code ?? 'unknown error'}); the shard is incomplete, run it again`);
  }
  let decoded;
  try {
    decoded = decodeNpy(bytes, JSON.stringify(full));
  } catch (err) {
    if (err instanceof NpyFormatError) throw new InputError(`merge ${err.message}; the shard is damaged, run it again`);
    throw err;
  }
  if (decoded.shape.length !== expectedShape.length || decoded.shape.some((n, k) => n !== expectedShape[k])) {
    throw new InputError(`merge ${JSON.stringify(full)}: shape (${decoded.shape.join(', ')}), expected (${expectedShape.join(', ')}); the shard does not match its header`);
  }
  return decoded.data;
}

/** One block partial of a shard, read back bit for bit. */
export function readShardBlock(shard: LoadedShard, b: ShardBlockEntry): BlockPartial {
  const h = shard.header;
  const shape = h.context.shape;
  const siteCount = shape.reduce((a, c) => a * c, 1);
  const read = (name: string, s: readonly number[]): Float64Array => readArray(shard.path, `${b.folder}/${name}.npy`, s);
  const records = b.records as RealisationRecord[];
  return {
    range: { block: b.block, first: b.first, count: b.count },
    count: records.length,
    siteCount,
    density: { mean: read('density_mean', shape), m2: read('density_m2', shape) },
    condensate: { mean: read('condensate_mean', shape), m2: read('condensate_m2', shape) },
    phaseCounts: read('phase_counts', [phaseCount, ...shape]),
    densityHistogram: { counts: read('density_histogram', [h.bins.binCount]), overflow: b.densityOverflow },
    condensateHistogram: { counts: read('condensate_histogram', [h.bins.binCount]), overflow: b.condensateOverflow },
    records,
  };
}

// Scan rows (src/pipeline/scan/scanRow.ts) as JSON, for the partial results a scan keeps
// while it runs (scanWork.ts) and the shards it writes for `tiercake merge` (scanShard.ts).
// JSON numbers are written by ECMAScript Number::toString, the shortest decimal that reads
// back as the same double, so every row survives the round trip bit for bit, with one
// exception: -0 is written as 0 (JSON.stringify drops the sign of a zero). A merged scan still
// equals a single run, which goes through the same records, and no reading tells -0 from 0. JSON has no
// NaN: readings that are undefined at a point (a characteristic density without a trap,
// the condensate fraction of an empty lattice) are written as null and read back as NaN.

import * as z from 'zod';
import type { ScanRow } from '../pipeline/scan/scanRow.js';
import { phaseNames } from '../observables/phaseCodes.js';
import { STIFFNESS_PHASES } from '../pipeline/scan/stiffnessPhase.js';

/** A number that may be undefined at a point: NaN <-> null. */
const maybe = z.number().nullable();

export const ScanRowSchema = z.strictObject({
  point: z.int().min(0),
  values: z.array(z.number()).min(1).max(2),
  converged: z.boolean(),
  sweeps: z.int().min(0),
  muEvaluations: z.int().min(0),
  warmStart: z.boolean(),
  nmax: z.int().min(1),
  atoms: z.number(),
  chemicalPotential: z.number(),
  condensedAtoms: z.number(),
  condensateFraction: maybe,
  // optional: rows written before solver.stiffness existed read back as NaN
  superfluidFraction: maybe.optional(),
  superfluidFractionError: maybe.optional(),
  entropy: z.number(),
  entropyPerAtom: maybe,
  temperature: z.number(),
  characteristicDensity: maybe,
  characteristicLength: maybe,
  centralDensity: z.number(),
  centralPhase: z.int().min(0).max(phaseNames.length - 1),
  // means over the realisations with scan --realisations, so not always whole
  phaseSites: z.array(z.number().min(0)).length(phaseNames.length),
  shells: z.array(
    z.strictObject({
      filling: z.int().min(1),
      innerRadius: z.number(),
      outerRadius: z.number(),
      sites: z.number().positive(),
      radiusFrom: z.enum(['annulus', 'sites']),
    }),
  ),
  // optional: rows written before the stiffness phase map existed
  compressibilityPerSite: maybe.optional(),
  stiffnessPhase: z.enum(STIFFNESS_PHASES).nullable().optional(),
  realisations: z.int().min(1).optional(),
  superfluidFractionSpread: maybe.optional(),
  phaseShares: z.array(z.number().min(0).max(1)).length(STIFFNESS_PHASES.length).nullable().optional(),
});

export type ScanRowJson = z.infer<typeof ScanRowSchema>;

const nullIfNaN = (x: number): number | null => (Number.isNaN(x) ? null : x);
const nanIfNull = (x: number | null): number => (x === null ? NaN : x);

export function scanRowToJson(row: ScanRow): ScanRowJson {
  return {
    ...row,
    values: [...row.values],
    condensateFraction: nullIfNaN(row.condensateFraction),
    superfluidFraction: nullIfNaN(row.superfluidFraction),
    superfluidFractionError: nullIfNaN(row.superfluidFractionError),
    compressibilityPerSite: nullIfNaN(row.compressibilityPerSite),
    superfluidFractionSpread: nullIfNaN(row.superfluidFractionSpread),
    phaseShares: row.phaseShares === null ? null : [...row.phaseShares],
    entropyPerAtom: nullIfNaN(row.entropyPerAtom),
    characteristicDensity: nullIfNaN(row.characteristicDensity),
    characteristicLength: nullIfNaN(row.characteristicLength),
    phaseSites: [...row.phaseSites],
    shells: row.shells.map((s) => ({ ...s })),
  };
}

export function scanRowFromJson(json: ScanRowJson): ScanRow {
  return {
    ...json,
    condensateFraction: nanIfNull(json.condensateFraction),
    superfluidFraction: nanIfNull(json.superfluidFraction ?? null),
    superfluidFractionError: nanIfNull(json.superfluidFractionError ?? null),
    compressibilityPerSite: nanIfNull(json.compressibilityPerSite ?? null),
    stiffnessPhase: json.stiffnessPhase ?? null,
    realisations: json.realisations ?? 1,
    superfluidFractionSpread: nanIfNull(json.superfluidFractionSpread ?? null),
    phaseShares: json.phaseShares ?? null,
    entropyPerAtom: nanIfNull(json.entropyPerAtom),
    characteristicDensity: nanIfNull(json.characteristicDensity),
    characteristicLength: nanIfNull(json.characteristicLength),
  };
}

/** The scan axes as stored (plan.axes). */
export const ScanAxisSchema = z.strictObject({
  path: z.string().min(1),
  values: z.array(z.number()).min(1),
  spacing: z.enum(['linear', 'log', 'list']),
});

// The one hash of a scenario: SHA-256 (FIPS 180-4) of the validated scenario (defaults
// filled in, overrides applied) written as JSON with object keys sorted, so key order in
// the file does not matter but any change of a value does. Used by the output-folder
// marker, ensemble shards (merge refuses shards of different scenarios) and checkpoints.
//
// `part: 'physics'` leaves out what does not change the answer: the name, the description
// and the solver budgets (tolerance, sweep limit, ...). A checkpoint is keyed on it, so an
// interrupted run can be resumed with, say, a larger solver.maxSweeps.
//
// Files the scenario reads (landscape pictures and arrays) are part of the input too: their
// SHA-256 digests, in the order of the landscape terms, join the hashed value, so a changed
// potential file changes the hash (shards of different files are not merged). A scenario
// without such files hashes exactly as before.

import { createHash } from 'node:crypto';
import type { Scenario } from './scenarioSchema.js';

function canonical(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(canonical);
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const key of Object.keys(value as Record<string, unknown>).sort()) out[key] = canonical((value as Record<string, unknown>)[key]);
    return out;
  }
  return value;
}

/** The SHA-256 of every file the resolved landscape read, in term order (for scenarioHash). */
export function landscapeFileHashes(resolved: { landscape: { records: ReadonlyArray<{ file: { sha256: string } | null }> } }): string[] {
  return resolved.landscape.records.flatMap((r) => (r.file !== null ? [r.file.sha256] : []));
}

/** SHA-256 (hex, 64 digits) of the scenario as canonical JSON (and of the files it reads); see the file header. */
export function scenarioHash(scenario: Scenario, part: 'whole' | 'physics' = 'whole', fileHashes: readonly string[] = []): string {
  let value: unknown = scenario;
  if (part === 'physics') {
    const { name, description, solver, ...physics } = scenario;
    void name;
    void description;
    void solver;
    value = physics;
  }
  if (fileHashes.length > 0) value = { scenario: value, inputFileSha256: [...fileHashes] };
  return createHash('sha256').update(JSON.stringify(canonical(value))).digest('hex');
}

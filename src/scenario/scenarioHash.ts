// The one hash of a scenario: SHA-256 (FIPS 180-4) of the validated scenario (defaults
// filled in, overrides applied) written as JSON with object keys sorted, so key order in
// the file does not matter but any change of a value does. Used by the output-folder
// marker, ensemble shards (merge refuses shards of different scenarios) and checkpoints.
//
// `part: 'physics'` leaves out what does not change the answer: the name, the description
// and the solver budgets (tolerance, sweep limit, ...). A checkpoint is keyed on it, so an
// interrupted run can be resumed with, say, a larger solver.maxSweeps.

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

/** SHA-256 (hex, 64 digits) of the scenario as canonical JSON; see the file header. */
export function scenarioHash(scenario: Scenario, part: 'whole' | 'physics' = 'whole'): string {
  let value: unknown = scenario;
  if (part === 'physics') {
    const { name, description, solver, ...physics } = scenario;
    void name;
    void description;
    void solver;
    value = physics;
  }
  return createHash('sha256').update(JSON.stringify(canonical(value))).digest('hex');
}

// Reading a scenario file, applying --set overrides by dotted path, and validating it.
// Every failure is an InputError whose message names the file or field and what to change.

import { readFileSync, statSync } from 'node:fs';
import { InputError } from '../cli/inputError.js';
import { formatScenarioIssues } from './formatScenarioError.js';
import { nearestKey, validKeysAt } from './scenarioKeys.js';
import { ScenarioSchema, type Scenario } from './scenarioSchema.js';

const MAX_SCENARIO_BYTES = 1 << 20;

/** Parse JSON text into a plain object, with line and column on a syntax error. */
export function parseScenarioJson(text: string, source: string): Record<string, unknown> {
  if (text.trim().length === 0) throw new InputError(`${source}: the file is empty; expected a JSON object describing a scenario`);
  if (/[\u0000-\u0008\u000e-\u001f]/.test(text)) {
    throw new InputError(`${source}: the file contains binary data; expected a JSON text file describing a scenario`);
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    const pos = /position (\d+)/.exec(message);
    let where = '';
    if (pos) {
      const offset = Number(pos[1]);
      const before = text.slice(0, offset);
      const line = before.split('\n').length;
      const column = offset - before.lastIndexOf('\n');
      where = ` at line ${line}, column ${column}`;
    }
    throw new InputError(`${source}: not valid JSON${where} (${message.replace(/ in JSON at position \d+.*$/, '')}); check commas, quotes and brackets`);
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new InputError(`${source}: expected a JSON object ({...}) describing a scenario, got ${Array.isArray(value) ? 'a list' : typeof value}`);
  }
  return value as Record<string, unknown>;
}

export function readScenarioFile(path: string): Record<string, unknown> {
  let size: number;
  try {
    const st = statSync(path);
    if (!st.isFile()) throw new InputError(`scenario ${path}: not a regular file; give the path of a .json scenario file`);
    size = st.size;
  } catch (err) {
    if (err instanceof InputError) throw err;
    throw new InputError(`scenario ${path}: file not found; check the path (examples are in configs/)`);
  }
  if (size > MAX_SCENARIO_BYTES) {
    throw new InputError(`scenario ${path}: ${size} bytes is too large for a scenario file (limit ${MAX_SCENARIO_BYTES}); is this the right file?`);
  }
  return parseScenarioJson(readFileSync(path, 'utf8'), `scenario ${path}`);
}

/** Value of an override: JSON if it parses (numbers, booleans, lists), else the plain string. */
function parseOverrideValue(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return text;
  }
}

/**
 * Apply "a.b.c=value" overrides to a copy of `raw`. Numeric segments index lists
 * (lattice.shape.0=32). A misspelt key is refused with the nearest valid one.
 */
export function applyOverrides(raw: Record<string, unknown>, overrides: readonly string[]): Record<string, unknown> {
  const root = structuredClone(raw);
  for (const item of overrides) {
    const eq = item.indexOf('=');
    if (eq <= 0) throw new InputError(`--set ${item}: expected path=value, e.g. --set particles.atoms=5000`);
    const path = item.slice(0, eq).trim().split('.');
    if (path.some((p) => p.length === 0)) throw new InputError(`--set ${item}: empty segment in the path`);
    const value = parseOverrideValue(item.slice(eq + 1));
    let node: Record<string, unknown> | unknown[] = root;
    const schemaPath: Array<string | number> = [];
    for (let k = 0; k < path.length; k++) {
      const seg = path[k];
      const isIndex = /^\d+$/.test(seg);
      if (!isIndex) {
        const valid = validKeysAt(schemaPath);
        if (valid.length > 0 && !valid.includes(seg)) {
          const near = nearestKey(seg, valid);
          throw new InputError(
            `--set ${item}: "${[...path.slice(0, k), seg].join('.')}" is not a scenario key${near ? `; did you mean "${near}"?` : `; valid keys: ${valid.join(', ')}`}`,
          );
        }
      }
      const key: string | number = isIndex ? Number(seg) : seg;
      schemaPath.push(key);
      const last = k === path.length - 1;
      const container = node as Record<string | number, unknown>;
      if (last) {
        container[key] = value;
      } else {
        let next = container[key];
        if (next === undefined || next === null || typeof next !== 'object') {
          next = /^\d+$/.test(path[k + 1]) ? [] : {};
          container[key] = next;
        }
        node = next as Record<string, unknown>;
      }
    }
  }
  return root;
}

export function validateScenario(raw: unknown, source: string): Scenario {
  const result = ScenarioSchema.safeParse(raw);
  if (result.success) return result.data;
  const lines = formatScenarioIssues(result.error.issues, raw);
  throw new InputError(`${source} is not a valid scenario:\n  ${lines.join('\n  ')}`);
}

/** File -> overrides -> validated scenario. */
export function loadScenario(path: string, overrides: readonly string[] = []): { scenario: Scenario; raw: Record<string, unknown> } {
  const raw = applyOverrides(readScenarioFile(path), overrides);
  return { scenario: validateScenario(raw, `scenario ${path}`), raw };
}

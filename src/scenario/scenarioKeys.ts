// Walks the JSON Schema generated from the zod scenario schema (zod 4's z.toJSONSchema) to
// list valid keys at a path (for "did you mean" suggestions) and to generate the
// configuration reference in the README. The zod schema stays the single source.

import * as z from 'zod';
import { ScenarioSchema } from './scenarioSchema.js';

export interface JsonSchemaNode {
  type?: string | string[];
  description?: string;
  default?: unknown;
  properties?: Record<string, JsonSchemaNode>;
  items?: JsonSchemaNode;
  anyOf?: JsonSchemaNode[];
  enum?: unknown[];
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  minItems?: number;
  maxItems?: number;
  pattern?: string;
  required?: string[];
}

let cached: JsonSchemaNode | null = null;

export function scenarioJsonSchema(): JsonSchemaNode {
  cached ??= z.toJSONSchema(ScenarioSchema, { io: 'input', unrepresentable: 'any' }) as JsonSchemaNode;
  return cached;
}

/** Object properties reachable at a node (through anyOf alternatives). */
function propertiesOf(node: JsonSchemaNode | undefined): Record<string, JsonSchemaNode> {
  if (!node) return {};
  const out: Record<string, JsonSchemaNode> = { ...(node.properties ?? {}) };
  for (const alt of node.anyOf ?? []) Object.assign(out, propertiesOf(alt));
  return out;
}

/** Valid keys of the object at `path` (numeric segments step into arrays). */
export function validKeysAt(path: ReadonlyArray<PropertyKey>): string[] {
  let node: JsonSchemaNode | undefined = scenarioJsonSchema();
  for (const seg of path) {
    if (!node) return [];
    if (typeof seg === 'number') node = node.items ?? node.anyOf?.find((a) => a.items)?.items;
    else node = propertiesOf(node)[String(seg)];
  }
  return Object.keys(propertiesOf(node));
}

/** Levenshtein distance (Wagner & Fischer, JACM 21, 168 (1974)), case-insensitive. */
export function editDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  let prev = Array.from({ length: t.length + 1 }, (_, j) => j);
  for (let i = 1; i <= s.length; i++) {
    const cur = [i];
    for (let j = 1; j <= t.length; j++) {
      cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (s[i - 1] === t[j - 1] ? 0 : 1));
    }
    prev = cur;
  }
  return prev[t.length];
}

/** The closest valid key, if it is close enough to be a plausible typo. */
export function nearestKey(key: string, candidates: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const c of candidates) {
    const d = editDistance(key, c);
    if (d < bestDistance) {
      bestDistance = d;
      best = c;
    }
  }
  if (best === undefined) return undefined;
  const allowed = Math.max(2, Math.floor(best.length / 3));
  const prefix = best.toLowerCase().startsWith(key.toLowerCase()) || key.toLowerCase().startsWith(best.toLowerCase());
  return bestDistance <= allowed || prefix ? best : undefined;
}

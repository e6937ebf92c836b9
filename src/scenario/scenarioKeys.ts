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
  /** zod emits oneOf for discriminated unions (disorder: box or speckle) */
  oneOf?: JsonSchemaNode[];
  allOf?: JsonSchemaNode[];
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

/** The alternatives of a union node (anyOf, oneOf) and the parts of an intersection (allOf). */
function alternativesOf(node: JsonSchemaNode): JsonSchemaNode[] {
  return [...(node.anyOf ?? []), ...(node.oneOf ?? []), ...(node.allOf ?? [])];
}

/** Object properties reachable at a node (through union alternatives). */
function propertiesOf(node: JsonSchemaNode | undefined): Record<string, JsonSchemaNode> {
  if (!node) return {};
  const out: Record<string, JsonSchemaNode> = { ...(node.properties ?? {}) };
  for (const alt of alternativesOf(node)) Object.assign(out, propertiesOf(alt));
  return out;
}

/** The schema node at `path` (numeric segments step into arrays, anyOf alternatives are searched). */
export function schemaNodeAt(path: ReadonlyArray<PropertyKey>): JsonSchemaNode | undefined {
  let node: JsonSchemaNode | undefined = scenarioJsonSchema();
  for (const seg of path) {
    if (!node) return undefined;
    if (typeof seg === 'number') node = node.items ?? alternativesOf(node).find((a) => a.items)?.items;
    else {
      const props = propertiesOf(node);
      node = Object.hasOwn(props, String(seg)) ? props[String(seg)] : undefined;
    }
  }
  return node;
}

/** Valid keys of the object at `path` (numeric segments step into arrays). */
export function validKeysAt(path: ReadonlyArray<PropertyKey>): string[] {
  return Object.keys(propertiesOf(schemaNodeAt(path)));
}

/** Deepest nesting of groups and lists a valid scenario can have (the file's top level is 1). */
export function schemaDepth(node: JsonSchemaNode | undefined = scenarioJsonSchema(), depth = 0): number {
  if (!node || depth > 32) return depth;
  let deepest = depth;
  const container = node.type === 'object' || node.type === 'array' || node.properties !== undefined || node.items !== undefined;
  const below = container ? depth + 1 : depth;
  if (container) deepest = below;
  for (const child of Object.values(node.properties ?? {})) deepest = Math.max(deepest, schemaDepth(child, below));
  if (node.items) deepest = Math.max(deepest, schemaDepth(node.items, below));
  for (const alt of alternativesOf(node)) deepest = Math.max(deepest, schemaDepth(alt, depth));
  return deepest;
}

/**
 * Where else in the scenario a key of this name (case-insensitive) is valid, as dotted
 * paths: "atoms" written at the top level belongs in "particles.atoms".
 */
export function pathsOfKey(key: string): string[] {
  const wanted = key.toLowerCase();
  const found: string[] = [];
  const visit = (node: JsonSchemaNode | undefined, prefix: string, depth: number): void => {
    if (!node || depth > 6) return;
    for (const [name, child] of Object.entries(propertiesOf(node))) {
      const here = prefix ? `${prefix}.${name}` : name;
      if (name.toLowerCase() === wanted) found.push(here);
      visit(child, here, depth + 1);
    }
  };
  visit(scenarioJsonSchema(), '', 0);
  return found;
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
  // A key far longer than any candidate cannot be a typo of one (and would cost a large
  // distance table): no suggestion.
  const longest = candidates.reduce((m, c) => Math.max(m, c.length), 0);
  if (key.length === 0 || key.length > 2 * longest + 8) return undefined;
  // A truncated or extended key ("temp", "latticeShape") is a prefix match and wins over
  // edit distance ("temp" is as close to "trap" as a typo); one or two letters are too
  // little to go on ("t" would match "trap" and "temperature").
  const k = key.toLowerCase();
  const prefixHits = candidates.filter((c) => {
    const b = c.toLowerCase();
    return Math.min(k.length, b.length) >= 3 && (b.startsWith(k) || k.startsWith(b));
  });
  if (prefixHits.length === 1) return prefixHits[0];
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
  return bestDistance <= Math.max(2, Math.floor(best.length / 3)) ? best : undefined;
}

// Turns zod issues into messages a physicist can act on: the field path as written in the
// file (lattice.shape[0]), what was given, what is allowed, and for an unknown key the
// nearest valid one.

import type * as z from 'zod';
import { nearestKey, validKeysAt } from './scenarioKeys.js';

export function formatPath(path: ReadonlyArray<PropertyKey>): string {
  let out = '';
  for (const seg of path) {
    if (typeof seg === 'number') out += `[${seg}]`;
    else out += out ? `.${String(seg)}` : String(seg);
  }
  return out || '(top level)';
}

function valueAt(root: unknown, path: ReadonlyArray<PropertyKey>): unknown {
  let v: unknown = root;
  for (const seg of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[seg as string];
  }
  return v;
}

function describeValue(v: unknown): string {
  if (v === undefined) return 'nothing';
  const text = JSON.stringify(v);
  if (text === undefined) return String(v);
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

/** One line per issue. */
export function formatScenarioIssues(issues: ReadonlyArray<z.core.$ZodIssue>, input: unknown): string[] {
  const lines: string[] = [];
  for (const issue of issues) {
    const where = formatPath(issue.path);
    if (issue.code === 'unrecognized_keys') {
      const valid = validKeysAt(issue.path);
      for (const key of issue.keys) {
        const suggestion = nearestKey(key, valid);
        const full = formatPath([...issue.path, key]);
        lines.push(
          suggestion
            ? `${full}: unknown key; did you mean "${suggestion}"?`
            : `${full}: unknown key; valid keys here: ${valid.join(', ') || '(none)'}`,
        );
      }
      continue;
    }
    const given = describeValue(valueAt(input, issue.path));
    if (issue.code === 'invalid_union') {
      lines.push(`${where}: ${given} is not allowed here; ${unionHint(issue)}`);
      continue;
    }
    if (issue.code === 'invalid_type' && valueAt(input, issue.path) === undefined) {
      lines.push(`${where}: missing; expected ${issue.expected}`);
      continue;
    }
    lines.push(`${where}: ${issue.message.replace(/^Invalid input: /, '')} (got ${given})`);
  }
  return lines;
}

function unionHint(issue: z.core.$ZodIssueInvalidUnion): string {
  const expected = new Set<string>();
  for (const branch of issue.errors) {
    for (const sub of branch) {
      if (sub.code === 'invalid_type') expected.add(sub.expected === 'array' ? 'a list' : `a ${sub.expected}`);
      else expected.add(sub.message.replace(/^Invalid input: /, ''));
    }
  }
  return `expected ${[...expected].join(' or ')}`;
}

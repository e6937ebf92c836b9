// Turns zod issues into messages a physicist can act on: the field path as written in the
// file (lattice.shape[0]), what is allowed and what was given, and for an unknown key the
// nearest valid one (or where that key belongs). The wording is in terms of the scenario
// file (an integer, a list, a group of keys), not JavaScript types, and everything that
// came from the file is quoted and shortened, so a hostile file cannot flood the terminal
// or inject control characters into it.

import type * as z from 'zod';
import { nearestKey, pathsOfKey, schemaNodeAt, validKeysAt, type JsonSchemaNode } from './scenarioKeys.js';

/** Longest key shown in full; longer keys are shortened (a 5000-character key is junk). */
const MAX_KEY_CHARS = 40;
/** Longest path shown in full (segments); deeper paths keep their first segments. */
const MAX_PATH_SEGMENTS = 8;
/** Longest description of a given value. */
const MAX_VALUE_CHARS = 60;
/** Longest line of a message; the schema's hint is only added when it fits. */
export const MAX_LINE_CHARS = 150;
/** Issues shown by summarizeScenarioIssues; the rest are counted. */
export const MAX_ISSUE_LINES = 4;

function shorten(text: string, max: number): string {
  return text.length > max ? `${text.slice(0, max - 3)}...` : text;
}

/**
 * Text safe to print on a terminal: C0 and C1 control characters (which include the
 * escape sequences that recolour or rewrite a terminal) and line separators become \uXXXX.
 */
export function printable(text: string): string {
  return text.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/** A key as it can be shown: plain identifiers as they are, anything else JSON-quoted. */
function showKey(key: string): string {
  if (/^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key)) return shorten(key, MAX_KEY_CHARS);
  return `[${shorten(printable(JSON.stringify(key)), MAX_KEY_CHARS)}]`;
}

export function formatPath(path: ReadonlyArray<PropertyKey>): string {
  let out = '';
  const shown = path.length > MAX_PATH_SEGMENTS ? path.slice(0, MAX_PATH_SEGMENTS) : path;
  for (const seg of shown) {
    if (typeof seg === 'number') out += `[${seg}]`;
    else {
      const key = showKey(String(seg));
      out += key.startsWith('[') || !out ? key : `.${key}`;
    }
  }
  if (shown.length < path.length) out += `... (${path.length} levels deep)`;
  return out || '(top level)';
}

function valueAt(root: unknown, path: ReadonlyArray<PropertyKey>): unknown {
  let v: unknown = root;
  for (const seg of path) {
    if (v === null || typeof v !== 'object' || !Object.hasOwn(v, seg as string)) return undefined;
    v = (v as Record<PropertyKey, unknown>)[seg as string];
  }
  return v;
}

/** A short, printable description of a value from the file. */
export function describeValue(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (typeof v === 'number' && !Number.isFinite(v)) {
    return Number.isNaN(v) ? 'NaN' : `${v > 0 ? '' : '-'}Infinity (a number too large to represent)`;
  }
  let text: string | undefined;
  try {
    text = JSON.stringify(v, (_k, x: unknown) => (typeof x === 'number' && !Number.isFinite(x) ? String(x) : x));
  } catch {
    text = undefined; // too deep or cyclic: not from a JSON file, but never fail while reporting
  }
  if (text === undefined) return typeof v;
  const kind = Array.isArray(v) ? 'the list ' : typeof v === 'string' ? 'the text ' : '';
  return kind + shorten(printable(text), MAX_VALUE_CHARS);
}

function article(word: string): string {
  return /^[aeiou]/.test(word) ? `an ${word}` : `a ${word}`;
}

/** "a number", "an integer", "a list", ... from a zod type name or a JSON Schema type. */
function typeWord(type: string | undefined): string {
  switch (type) {
    case 'number':
      return 'a number';
    case 'int':
    case 'integer':
      return 'an integer';
    case 'string':
      return 'a text in double quotes';
    case 'boolean':
      return 'true or false';
    case 'array':
      return 'a list [...]';
    case 'object':
      return 'a group of keys {...}';
    default:
      return type ? article(type) : 'a value';
  }
}

function isIntegerNode(node: JsonSchemaNode | undefined): boolean {
  if (!node) return false;
  if (node.type === 'integer') return true;
  return [...(node.anyOf ?? []), ...(node.oneOf ?? [])].some((a) => a.type === 'integer');
}

function bound(issue: z.core.$ZodIssueTooSmall | z.core.$ZodIssueTooBig, path: ReadonlyArray<PropertyKey>): string {
  const small = issue.code === 'too_small';
  const limit = Number(small ? (issue as z.core.$ZodIssueTooSmall).minimum : (issue as z.core.$ZodIssueTooBig).maximum);
  const inclusive = issue.inclusive !== false;
  if (issue.origin === 'array' || issue.origin === 'set') {
    const entries = `${limit} ${limit === 1 ? 'entry' : 'entries'}`;
    return small ? `at least ${entries}` : `at most ${entries}`;
  }
  if (issue.origin === 'string') {
    const chars = `${limit} character${limit === 1 ? '' : 's'}`;
    return small ? `at least ${chars}` : `at most ${chars}`;
  }
  const what = isIntegerNode(schemaNodeAt(path)) ? 'an integer' : 'a number';
  const op = small ? (inclusive ? '>=' : '>') : inclusive ? '<=' : '<';
  return `${what} ${op} ${limit}`;
}

/** The schema's description of the field, for a hint after the message. */
function fieldHint(path: ReadonlyArray<PropertyKey>): string | undefined {
  return schemaNodeAt(path)?.description;
}

function withHint(line: string, hint: string | undefined): string {
  if (hint && line.length + hint.length + 3 <= MAX_LINE_CHARS) return `${line} (${hint})`;
  return shorten(line, MAX_LINE_CHARS);
}

interface IssueLine {
  text: string;
  /** unknown keys first: a misspelt key is the cause of the "missing" issue next to it */
  rank: number;
}

function unknownKeyLine(path: ReadonlyArray<PropertyKey>, key: string): { text: string; replaces?: string } {
  const full = formatPath([...path, key]);
  const valid = validKeysAt(path);
  const suggestion = nearestKey(key, valid);
  if (suggestion) return { text: `${full}: unknown key; did you mean "${suggestion}"?`, replaces: suggestion };
  const elsewhere = key.length <= MAX_KEY_CHARS ? pathsOfKey(key) : [];
  if (elsewhere.length > 0) {
    return { text: `${full}: unknown key here; "${key}" belongs in ${elsewhere.map((p) => `"${p}"`).join(' or ')}` };
  }
  return { text: shorten(`${full}: unknown key; valid keys here: ${valid.join(', ') || '(none)'}`, 2 * MAX_LINE_CHARS) };
}

function issueLines(issues: ReadonlyArray<z.core.$ZodIssue>, input: unknown): IssueLine[] {
  const lines: IssueLine[] = [];
  // "missing" issues caused by a misspelt key are dropped: the typo line says it all.
  const explained = new Set<string>();
  for (const issue of issues) {
    if (issue.code !== 'unrecognized_keys') continue;
    for (const key of issue.keys) {
      const { text, replaces } = unknownKeyLine(issue.path, key);
      lines.push({ text, rank: 0 });
      if (replaces) explained.add(formatPath([...issue.path, replaces]));
    }
  }
  for (const issue of issues) {
    if (issue.code === 'unrecognized_keys') continue;
    const where = formatPath(issue.path);
    const value = valueAt(input, issue.path);
    const given = describeValue(value);
    if (value === undefined && explained.has(where)) continue;
    let text: string;
    switch (issue.code) {
      case 'invalid_type':
        if (value === undefined) text = withHint(`${where}: missing; expected ${typeWord(issue.expected)}`, fieldHint(issue.path));
        else if (typeof value === 'number' && !Number.isFinite(value)) text = `${where}: expected a finite number, got ${given}`;
        else {
          // zod reports "number" for a non-number given to an integer field; the schema knows better
          const expected = issue.expected === 'number' && isIntegerNode(schemaNodeAt(issue.path)) ? 'int' : issue.expected;
          text = withHint(`${where}: expected ${typeWord(expected)}, got ${given}`, fieldHint(issue.path));
        }
        break;
      case 'too_small':
      case 'too_big':
        text = `${where}: expected ${bound(issue, issue.path)}, got ${given}`;
        break;
      case 'invalid_value':
        text = `${where}: expected one of ${issue.values.map((v) => JSON.stringify(v)).join(', ')}, got ${given}`;
        break;
      case 'invalid_union':
        if (issue.errors.length === 0 && Array.isArray((issue as { options?: unknown[] }).options)) {
          // a discriminated union whose tag ("kind") matched no alternative
          const options = ((issue as { options?: unknown[] }).options ?? []).map((v) => JSON.stringify(v)).join(', ');
          text = value === undefined ? `${where}: missing; expected one of ${options}` : `${where}: expected one of ${options}, got ${given}`;
          break;
        }
        text = withHint(`${where}: expected ${unionHint(issue)}, got ${given}`, fieldHint(issue.path));
        break;
      case 'custom':
        text = `${where}: ${issue.message}`;
        break;
      default:
        text = `${where}: ${issue.message.replace(/^Invalid input: /, '')}, got ${given}`;
    }
    lines.push({ text: shorten(text, MAX_LINE_CHARS), rank: 1 });
  }
  return lines.sort((a, b) => a.rank - b.rank);
}

/** One line per issue, unknown keys first. */
export function formatScenarioIssues(issues: ReadonlyArray<z.core.$ZodIssue>, input: unknown): string[] {
  return issueLines(issues, input).map((l) => l.text);
}

/**
 * At most MAX_ISSUE_LINES lines, plus a count of the rest: a file with twenty mistakes
 * gets a message that fits on a screen, and the first fixes often clear the others.
 */
export function summarizeScenarioIssues(issues: ReadonlyArray<z.core.$ZodIssue>, input: unknown): string[] {
  const lines = formatScenarioIssues(issues, input);
  if (lines.length <= MAX_ISSUE_LINES) return lines;
  const rest = lines.length - (MAX_ISSUE_LINES - 1);
  return [...lines.slice(0, MAX_ISSUE_LINES - 1), `... and ${rest} more problems; fix these first`];
}

/** What the alternatives of a union accept ("a number or a list [...]"). */
function unionHint(issue: z.core.$ZodIssueInvalidUnion): string {
  const expected = new Set<string>();
  for (const branch of issue.errors) {
    // A branch that failed on the type says what it accepts; its other issues (zod 4 also
    // runs the length checks of a list branch on a string) would only confuse.
    const typeIssue = branch.find((sub) => sub.code === 'invalid_type' && sub.path.length === 0);
    if (typeIssue && typeIssue.code === 'invalid_type') {
      expected.add(typeWord(typeIssue.expected));
      continue;
    }
    const sub = branch[0];
    if (!sub) continue;
    if (sub.code === 'invalid_value') expected.add(`one of ${sub.values.map((v) => JSON.stringify(v)).join(', ')}`);
    else if (sub.code === 'too_small' || sub.code === 'too_big') {
      const inner = [...issue.path, ...sub.path];
      expected.add(`${bound(sub, inner)}${sub.path.length ? ` at ${formatPath(sub.path)}` : ''}`);
    } else expected.add(sub.message.replace(/^Invalid input: /, ''));
  }
  return [...expected].join(' or ');
}

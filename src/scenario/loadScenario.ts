// Reading a scenario file, applying --set overrides by dotted path, and validating it.
// Every failure is an InputError whose message names the file or field and what to change,
// in one short paragraph: the file may have been written by someone else, by another
// program, or be the wrong file altogether (a camera image, a folder, a UTF-16 export).
//
// JSON as in RFC 8259 (IETF, 2017): UTF-8 text (section 8.1, which also lets a parser
// ignore a leading byte order mark), one value per file, no comments, no NaN or Infinity
// (section 6). Where JSON.parse refuses a file, a small scanner of that grammar finds the
// line and column and says what is wrong there, because V8's messages do not always carry
// a position and quote raw text that may span lines.

import { readFileSync, statSync } from 'node:fs';
import { InputError } from './inputError.js';
import { formatPath, printable, summarizeScenarioIssues } from './formatScenarioError.js';
import { nearestKey, schemaDepth, validKeysAt } from './scenarioKeys.js';
import { ScenarioSchema, type Scenario } from './scenarioSchema.js';

const MAX_SCENARIO_BYTES = 1 << 20;
/**
 * Deepest nesting of lists and groups a scenario may have. The schema needs 3 (the file,
 * lattice, lattice.shape; see schemaDepth); anything far deeper is junk, and copying or
 * printing it could exhaust the call stack.
 */
export const MAX_SCENARIO_DEPTH = 12;
/** Longest file path or --set item quoted in a message. */
const MAX_QUOTED_CHARS = 100;
/** Keys that would reach into JavaScript's object machinery instead of the scenario. */
const FORBIDDEN_KEYS = new Set(['__proto__', 'prototype', 'constructor']);

function shorten(text: string, max = MAX_QUOTED_CHARS): string {
  return text.length > max ? `${text.slice(0, 45)}...${text.slice(text.length - (max - 48))}` : text;
}

/** Text from the user shown in a message: control characters escaped, length bounded. */
function quoted(text: string): string {
  return shorten(printable(text));
}

/** Line and column (both from 1) of a character offset. */
function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let k = 0; k < offset && k < text.length; k++) {
    if (text.charCodeAt(k) === 10) {
      line++;
      lineStart = k + 1;
    }
  }
  return { line, column: offset - lineStart + 1 };
}

export interface JsonProblem {
  /** character offset of the problem */
  offset: number;
  /** what is wrong there, and what to write instead */
  problem: string;
}

const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
const WORD = /[A-Za-z_$][A-Za-z0-9_$.+-]*/y;

function wordAt(text: string, offset: number): string {
  WORD.lastIndex = offset;
  const m = WORD.exec(text);
  return m ? m[0] : (text[offset] ?? '');
}

export interface JsonScanOptions {
  /**
   * Also report a key that appears twice in the same group. RFC 8259 (section 4) only says
   * names SHOULD be unique, and JSON.parse keeps the last value silently; in a scenario a
   * second "particles" group would quietly replace the first, so the loader refuses it.
   */
  refuseDuplicateKeys?: boolean;
}

/**
 * Scans `text` against the JSON grammar (RFC 8259) and returns the first problem, or null
 * when the text is valid JSON. Iterative, so any nesting depth is safe.
 */
export function locateJsonProblem(text: string, options: JsonScanOptions = {}): JsonProblem | null {
  const n = text.length;
  const stack: Array<'{' | '['> = [];
  /** keys seen so far in each open group (with their offsets), innermost last */
  const keysSeen: Array<Map<string, number>> = [];
  type Want = 'value' | 'firstValue' | 'key' | 'firstKey' | 'colon' | 'next';
  let want: Want = 'value';
  let lastComma = -1;
  let i = 0;
  const problem = (offset: number, message: string): JsonProblem => ({ offset, problem: message });
  const closer = (open: '{' | '['): string => (open === '{' ? '}' : ']');

  const scanString = (): JsonProblem | null => {
    const start = i;
    i++;
    while (i < n) {
      const c = text.charCodeAt(i);
      if (c === 34) {
        i++;
        return null;
      }
      if (c === 92) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) return problem(i, 'a \\u escape needs four hexadecimal digits');
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else return problem(i, `invalid escape "\\${e ?? ''}" in a text; write "\\\\" for a backslash`);
        continue;
      }
      if (c === 10 || c === 13) return problem(start, 'a text in double quotes is not closed before the end of the line');
      if (c < 32) return problem(i, 'a control character inside a text; remove it or write it as an escape like \\t');
      i++;
    }
    return problem(start, 'a text in double quotes is never closed');
  };

  for (;;) {
    while (i < n && (text[i] === ' ' || text[i] === '\t' || text[i] === '\n' || text[i] === '\r')) i++;
    if (i >= n) {
      if (stack.length === 0 && want === 'next') return null;
      if (stack.length > 0) return problem(n, `the file ends before the closing '${closer(stack[stack.length - 1])}'; is it cut short?`);
      return problem(n, 'the file ends where a value was expected');
    }
    const c = text[i];
    if ((c === '/' && (text[i + 1] === '/' || text[i + 1] === '*')) || c === '#') {
      return problem(i, 'comments are not allowed in JSON; remove them (the "description" field can hold notes)');
    }
    if (c === "'") return problem(i, 'single quotes; JSON keys and texts need double quotes (")');
    switch (want) {
      case 'firstValue':
      case 'value': {
        if (c === ']' && want === 'firstValue') {
          stack.pop();
          i++;
          want = 'next';
          break;
        }
        if (c === '}' || c === ']') {
          if (lastComma >= 0) return problem(lastComma, `a comma before '${c}' with nothing after it; remove that comma`);
          return problem(i, `a value is missing before '${c}'`);
        }
        if (c === ',') return problem(i, "a value is missing before ','");
        if (c === '{') {
          stack.push('{');
          keysSeen.push(new Map());
          i++;
          want = 'firstKey';
          break;
        }
        if (c === '[') {
          stack.push('[');
          i++;
          want = 'firstValue';
          break;
        }
        if (c === '"') {
          const p = scanString();
          if (p) return p;
          want = 'next';
          break;
        }
        const word = wordAt(text, c === '-' || c === '+' ? i + 1 : i);
        if (/^(NaN|Infinity|inf|nan)$/i.test(word)) {
          return problem(i, `${c === '-' ? '-' : ''}${word} is not a number in JSON; give a finite number`);
        }
        if (c === '+') return problem(i, 'JSON numbers have no leading "+"; remove it');
        if (c === '.') return problem(i, 'JSON numbers need a digit before the decimal point (0.5, not .5)');
        NUMBER.lastIndex = i;
        const num = NUMBER.exec(text);
        if (num) {
          i += num[0].length;
          if (i < n && /[.eE0-9A-Za-z_]/.test(text[i])) {
            return problem(num.index, `malformed number "${shorten(num[0] + wordAt(text, i), 30)}"; write it like 12, -0.5 or 1.5e3`);
          }
          want = 'next';
          break;
        }
        if (/^(true|false|null)$/.test(word)) {
          i += word.length;
          want = 'next';
          break;
        }
        if (/^[A-Za-z_$]/.test(word) && stack.length === 0) {
          return problem(i, 'the file does not start with "{"; a scenario is a JSON object (not YAML or INI), see configs/ for examples');
        }
        if (/^[A-Za-z_$]/.test(word)) return problem(i, `unquoted text "${shorten(word, 30)}"; texts need double quotes, true/false/null are lower case`);
        return problem(i, `unexpected character ${JSON.stringify(c)} where a value was expected`);
      }
      case 'firstKey':
      case 'key': {
        if (c === '}') {
          if (want === 'key') return problem(lastComma, "a comma before '}' with nothing after it; remove that comma");
          stack.pop();
          keysSeen.pop();
          i++;
          want = 'next';
          break;
        }
        if (c === '"') {
          const keyStart = i;
          const p = scanString();
          if (p) return p;
          if (options.refuseDuplicateKeys) {
            const key = JSON.parse(text.slice(keyStart, i)) as string;
            const seen = keysSeen[keysSeen.length - 1];
            const first = seen.get(key);
            if (first !== undefined) {
              const at = lineAndColumn(text, first);
              return problem(
                keyStart,
                `the key "${shorten(printable(key), 30)}" appears a second time in the same group (first at line ${at.line}); ` +
                  'JSON keeps only the last one, so remove or merge the duplicate',
              );
            }
            seen.set(key, keyStart);
          }
          want = 'colon';
          break;
        }
        if (/[A-Za-z_$]/.test(c)) return problem(i, `the key ${shorten(wordAt(text, i), 30)} needs double quotes: "${shorten(wordAt(text, i), 30)}"`);
        return problem(i, `unexpected character ${JSON.stringify(c)} where a key in double quotes was expected`);
      }
      case 'colon':
        if (c !== ':') return problem(i, "a ':' is missing between a key and its value");
        i++;
        want = 'value';
        lastComma = -1;
        break;
      case 'next': {
        if (stack.length === 0) return problem(i, 'more text after the end of the JSON value; a scenario file holds one {...} object');
        const open = stack[stack.length - 1];
        if (c === ',') {
          lastComma = i;
          i++;
          want = open === '{' ? 'key' : 'value';
          break;
        }
        if (c === closer(open)) {
          stack.pop();
          if (open === '{') keysSeen.pop();
          i++;
          want = 'next';
          break;
        }
        if (c === '}' || c === ']') return problem(i, `'${c}' does not match the open '${open}'; close it with '${closer(open)}'`);
        return problem(i, `a comma is missing before this ${open === '{' ? 'key' : 'value'} (or a '${closer(open)}' is missing)`);
      }
    }
    // A comma is "trailing" only while nothing has followed it.
    if (want !== 'value' && want !== 'key') lastComma = -1;
  }
}

/** Nesting depth of a parsed JSON value, and the path at which it first exceeds `limit`. */
function tooDeep(value: unknown, limit: number): Array<string | number> | null {
  const stack: Array<{ node: unknown; path: Array<string | number> }> = [{ node: value, path: [] }];
  while (stack.length > 0) {
    const { node, path } = stack.pop() as { node: unknown; path: Array<string | number> };
    if (node === null || typeof node !== 'object') continue;
    if (path.length >= limit) return path;
    if (Array.isArray(node)) node.forEach((child, k) => stack.push({ node: child, path: [...path, k] }));
    else for (const [k, child] of Object.entries(node)) stack.push({ node: child, path: [...path, k] });
  }
  return null;
}

function refuseDeepNesting(value: unknown, source: string): void {
  const path = tooDeep(value, MAX_SCENARIO_DEPTH);
  if (path) {
    throw new InputError(
      `${source}: lists and groups nested more than ${MAX_SCENARIO_DEPTH} levels deep at ${formatPath(path)}; ` +
        `a valid scenario has at most ${schemaDepth()} (see configs/ for examples)`,
    );
  }
}

/** Parse JSON text into a plain object, with line and column on a syntax error. */
export function parseScenarioJson(text: string, source: string): Record<string, unknown> {
  if (text.length === 0) throw new InputError(`${source}: the file is empty; expected a JSON object {...} describing a scenario`);
  if (text.trim().length === 0) {
    throw new InputError(`${source}: the file holds only blank space; expected a JSON object {...} describing a scenario`);
  }
  if (/[\u0000-\u0008\u000e-\u001f]/.test(text)) {
    throw new InputError(`${source}: the file contains binary data; expected a JSON text file describing a scenario`);
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (err) {
    const found = locateJsonProblem(text);
    if (found) {
      const { line, column } = lineAndColumn(text, found.offset);
      throw new InputError(`${source}: not valid JSON at line ${line}, column ${column}: ${found.problem}`);
    }
    // The scanner and JSON.parse disagree (should not happen): V8's words, on one line.
    const message = (err instanceof Error ? err.message : String(err)).replace(/\s+/g, ' ');
    throw new InputError(`${source}: not valid JSON (${shorten(message, 120)}); check commas, quotes and brackets`);
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    const got = value === null ? 'null' : Array.isArray(value) ? 'a list [...]' : `the ${typeof value} ${shorten(JSON.stringify(value), 40)}`;
    throw new InputError(`${source}: expected a JSON object {...} describing a scenario, got ${got}`);
  }
  refuseDeepNesting(value, source);
  const duplicate = locateJsonProblem(text, { refuseDuplicateKeys: true });
  if (duplicate) {
    const { line, column } = lineAndColumn(text, duplicate.offset);
    throw new InputError(`${source}: line ${line}, column ${column}: ${duplicate.problem}`);
  }
  return value as Record<string, unknown>;
}

/** Magic numbers of files often given by mistake: camera images, archives, our own .npy output. */
function sniffBinary(bytes: Uint8Array): string | undefined {
  const starts = (...magic: number[]): boolean => magic.every((m, k) => bytes[k] === m);
  if (starts(0x89, 0x50, 0x4e, 0x47)) return 'a PNG image';
  if (starts(0xff, 0xd8, 0xff)) return 'a JPEG image';
  if (starts(0x49, 0x49, 0x2a, 0x00) || starts(0x4d, 0x4d, 0x00, 0x2a)) return 'a TIFF image';
  if (starts(0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59)) return 'a NumPy .npy array (an output of a run, not a scenario)';
  if (starts(0x1f, 0x8b)) return 'a gzip archive';
  if (starts(0x50, 0x4b, 0x03, 0x04)) return 'a zip archive';
  if (starts(0x25, 0x50, 0x44, 0x46)) return 'a PDF document';
  return undefined;
}

/** Bytes of a scenario file -> text: UTF-8 only, with a named reason for anything else. */
export function decodeScenarioBytes(bytes: Uint8Array, source: string): string {
  if ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff)) {
    throw new InputError(`${source}: the file is saved as UTF-16 text; save it as UTF-8 (plain JSON)`);
  }
  let start = 0;
  if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) start = 3; // UTF-8 byte order mark: ignored (RFC 8259, 8.1)
  const body = bytes.subarray(start);
  for (let k = 0; k < body.length; k++) {
    const b = body[k];
    if (b < 9 || (b > 13 && b < 32) || b === 127) {
      const kind = sniffBinary(bytes);
      throw new InputError(
        `${source}: the file contains binary data${kind ? ` and looks like ${kind}` : ` (byte ${b} at offset ${k + start})`}; ` +
          'expected a JSON text file describing a scenario',
      );
    }
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(body);
  } catch {
    const lossy = new TextDecoder('utf-8').decode(body);
    const { line, column } = lineAndColumn(lossy, lossy.indexOf('\ufffd'));
    throw new InputError(`${source}: not UTF-8 text (invalid byte at line ${line}, column ${column}); save the file as UTF-8`);
  }
}

function fileProblem(code: string | undefined): string {
  switch (code) {
    case 'ENOENT':
    case 'ENOTDIR':
      return 'file not found; check the path (examples are in configs/)';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied; check that you may read this file';
    case 'ELOOP':
      return 'the path is a loop of symbolic links';
    case 'ENAMETOOLONG':
      return 'the path is too long';
    case 'EISDIR':
      return 'is a folder, not a file; give the path of a .json scenario file';
    default:
      return `cannot be read (${code ?? 'unknown error'})`;
  }
}

export function readScenarioFile(path: string): Record<string, unknown> {
  const source = `scenario ${quoted(path)}`;
  if (path.length === 0) throw new InputError('scenario: the path is empty; give the path of a .json scenario file');
  let bytes: Buffer;
  try {
    const st = statSync(path);
    if (st.isDirectory()) throw new InputError(`${source}: ${fileProblem('EISDIR')}`);
    if (!st.isFile()) throw new InputError(`${source}: not a regular file (a device, socket or pipe); give the path of a .json scenario file`);
    if (st.size > MAX_SCENARIO_BYTES) {
      throw new InputError(`${source}: ${st.size} bytes is too large for a scenario file (limit ${MAX_SCENARIO_BYTES}); is this the right file?`);
    }
    bytes = readFileSync(path);
  } catch (err) {
    if (err instanceof InputError) throw err;
    throw new InputError(`${source}: ${fileProblem((err as NodeJS.ErrnoException).code)}`);
  }
  return parseScenarioJson(decodeScenarioBytes(bytes, source), source);
}

/**
 * Value of an override: JSON if it parses (numbers, booleans, lists), else the plain
 * string. NaN and infinities are refused here with their own message: JSON has no
 * spelling for them, and a value like 1e999 parses to Infinity.
 */
function parseOverrideValue(text: string, item: string): unknown {
  const trimmed = text.trim();
  if (/^[+-]?(nan|inf|infinity)$/i.test(trimmed)) {
    throw new InputError(`--set ${quoted(item)}: ${trimmed} is not allowed; give a finite number`);
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    // A value that starts like a list, a group or a quoted text was meant as JSON: say
    // where it breaks instead of passing it on as a plain text the schema then refuses.
    if (/^[[{"]/.test(trimmed)) {
      const found = locateJsonProblem(trimmed);
      const problem = found ? found.problem.replace(/^the file ends/, 'the value ends').replace(/; is it cut short\?$/, '') : '';
      const where = found ? ` at character ${found.offset + 1} (${problem})` : '';
      throw new InputError(
        `--set ${quoted(item)}: the value is not valid JSON${where}; write a list like [4, 4], a group like {"atoms": 5000} or a text in double quotes`,
      );
    }
    return text;
  }
  const duplicate = locateJsonProblem(text, { refuseDuplicateKeys: true });
  if (duplicate) throw new InputError(`--set ${quoted(item)}: ${duplicate.problem}`);
  if (typeof value === 'number' && !Number.isFinite(value)) {
    throw new InputError(`--set ${quoted(item)}: ${shorten(trimmed, 40)} is too large to represent; give a finite number`);
  }
  refuseDeepNesting(value, `--set ${quoted(item)}`);
  return value;
}

function kindOf(v: unknown): string {
  if (Array.isArray(v)) return 'a list';
  if (v === null) return 'null';
  return typeof v === 'string' ? 'a text' : `a ${typeof v}`;
}

/**
 * Keys that are alternatives to each other: a scenario gives one of each set (the schema
 * refuses two). Setting one by --set switches the mode: the alternatives already in the
 * file are dropped, so `--set particles.atoms=N` on a fixed-mu scenario solves at fixed N.
 * `parent` is the path of the group; each entry of `sets` is one alternative (a set of
 * keys that go together, e.g. a PSF from wavelength and aperture).
 */
export const ALTERNATIVE_KEYS: ReadonlyArray<{ parent: readonly string[]; sets: ReadonlyArray<readonly string[]> }> = [
  { parent: ['particles'], sets: [['atoms'], ['chemicalPotential']] },
  { parent: ['temperature'], sets: [['kT'], ['nanokelvin'], ['entropyPerAtom']] },
  { parent: ['camera'], sets: [['cameraPixelUm'], ['cameraPixelSites']] },
  { parent: ['camera', 'psf'], sets: [['sigmaUm'], ['sigmaSites'], ['wavelengthNm', 'numericalAperture']] },
  { parent: ['disorder'], sets: [['grainSites'], ['grainUm'], ['numericalAperture', 'wavelengthNm']] },
  { parent: ['laboratory', 'transverse'], sets: [['trapFrequencyHz'], ['depthEr', 'wavelengthNm']] },
  { parent: ['laboratory', 'species'], sets: [['scatteringLengthBohr'], ['scatteringLengthNm']] },
];

export interface OverrideResult {
  raw: Record<string, unknown>;
  /** what the overrides switched, one sentence each, e.g. that particles.atoms replaced particles.chemicalPotential */
  notes: string[];
}

/** The alternatives dropped by setting `path` (key path of a leaf); [] when it has none. */
function alternativesOf(path: readonly (string | number)[]): { parent: readonly string[]; drop: string[] } | null {
  if (path.length < 2) return null;
  const parent = path.slice(0, -1);
  const key = path[path.length - 1];
  for (const group of ALTERNATIVE_KEYS) {
    if (group.parent.length !== parent.length || !group.parent.every((p, i) => p === parent[i])) continue;
    const own = group.sets.find((set) => set.includes(String(key)));
    if (!own) return null;
    return { parent: group.parent, drop: group.sets.filter((set) => set !== own).flat().filter((k) => !own.includes(k)) };
  }
  return null;
}

/**
 * Apply "a.b.c=value" overrides to a copy of `raw`. Numeric segments index lists
 * (lattice.shape.0=32), up to one past the end (which appends). A misspelt key is refused
 * with the nearest valid one; a path that runs into a number or a text, or names a key
 * inside a list, is refused rather than silently replacing what is there. Setting one of
 * a set of alternatives (ALTERNATIVE_KEYS) drops the others from the file and says so in
 * the notes; giving two alternatives in the same command is refused.
 */
export function applyOverrides(raw: Record<string, unknown>, overrides: readonly string[]): Record<string, unknown> {
  return applyOverridesWithNotes(raw, overrides).raw;
}

export function applyOverridesWithNotes(raw: Record<string, unknown>, overrides: readonly string[]): OverrideResult {
  const root = structuredClone(raw);
  const notes: string[] = [];
  /** leaf paths set so far (dotted) -> the --set item that set them */
  const setBy = new Map<string, string>();
  for (const item of overrides) {
    const eq = item.indexOf('=');
    const shown = quoted(item);
    if (eq <= 0) throw new InputError(`--set ${shown}: expected path=value, e.g. --set particles.atoms=5000`);
    const path = item.slice(0, eq).trim().split('.');
    if (path.some((p) => p.length === 0)) throw new InputError(`--set ${shown}: empty segment in the path; write keys separated by single dots`);
    const value = parseOverrideValue(item.slice(eq + 1), item);
    let node: Record<string, unknown> | unknown[] = root;
    const schemaPath: Array<string | number> = [];
    for (let k = 0; k < path.length; k++) {
      const seg = path[k];
      const here = quoted(path.slice(0, k + 1).join('.'));
      const parent = k === 0 ? 'the scenario' : `"${quoted(path.slice(0, k).join('.'))}"`;
      let key: string | number;
      if (Array.isArray(node)) {
        if (!/^\d+$/.test(seg) || Number(seg) > node.length) {
          const entries = `${node.length} ${node.length === 1 ? 'entry' : 'entries'}`;
          throw new InputError(
            `--set ${shown}: ${parent} is a list with ${entries}; after it give an index from 0 to ${node.length} ` +
              `(${node.length} adds an entry), or set the whole list, e.g. --set ${quoted(path.slice(0, k).join('.'))}=[...]`,
          );
        }
        key = Number(seg);
      } else {
        const valid = validKeysAt(schemaPath);
        if (FORBIDDEN_KEYS.has(seg) || (valid.length > 0 && !valid.includes(seg)) || (valid.length === 0 && k > 0)) {
          const near = nearestKey(seg, valid);
          throw new InputError(
            `--set ${shown}: "${here}" is not a scenario key` +
              (near ? `; did you mean "${quoted([...path.slice(0, k), near].join('.'))}"?` : valid.length > 0 ? `; valid keys in ${parent}: ${valid.join(', ')}` : ''),
          );
        }
        key = seg;
      }
      schemaPath.push(key);
      const container = node as Record<string | number, unknown>;
      if (k === path.length - 1) {
        container[key] = value;
        const alternatives = alternativesOf(schemaPath);
        if (alternatives !== null && !Array.isArray(container)) {
          const dotted = alternatives.parent.join('.');
          for (const other of alternatives.drop) {
            const earlier = setBy.get(`${dotted}.${other}`);
            if (earlier !== undefined) {
              throw new InputError(
                `--set ${shown}: ${dotted}.${String(key)} and ${dotted}.${other} (set by --set ${quoted(earlier)}) are alternatives; give only one of them`,
              );
            }
            if (Object.hasOwn(container, other)) {
              delete container[other];
              notes.push(`--set ${dotted}.${String(key)} replaces ${dotted}.${other} of the scenario file (the two are alternatives)`);
            }
          }
        }
        setBy.set(schemaPath.join('.'), item);
        break;
      }
      const next = Object.hasOwn(container, key) ? container[key] : undefined;
      if (next === undefined || next === null) {
        const created: Record<string, unknown> | unknown[] = /^\d+$/.test(path[k + 1]) ? [] : {};
        container[key] = created;
        node = created;
      } else if (typeof next === 'object') {
        node = next as Record<string, unknown> | unknown[];
      } else {
        throw new InputError(
          `--set ${shown}: "${here}" holds ${kindOf(next)} (${shorten(printable(String(JSON.stringify(next))), 40)}), not keys or a list; ` +
            `set it directly, e.g. --set ${here}=VALUE`,
        );
      }
    }
  }
  return { raw: root, notes };
}

export function validateScenario(raw: unknown, source: string): Scenario {
  const result = ScenarioSchema.safeParse(raw);
  if (result.success) return result.data;
  const lines = summarizeScenarioIssues(result.error.issues, raw);
  throw new InputError(`${source} is not a valid scenario:\n  ${lines.join('\n  ')}`);
}

/** File -> overrides -> validated scenario (with the notes of the overrides that switched a mode). */
export function loadScenario(path: string, overrides: readonly string[] = []): { scenario: Scenario; raw: Record<string, unknown>; notes: string[] } {
  const { raw, notes } = applyOverridesWithNotes(readScenarioFile(path), overrides);
  return { scenario: validateScenario(raw, `scenario ${quoted(path)}`), raw, notes };
}

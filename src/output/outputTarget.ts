// Where an output folder may go, checked before anything is computed and again just before
// the results are moved into place. The rule: tiercake replaces only what it wrote itself.
//
// Always refused (exit 2, whatever --force says):
//   - a symbolic link (to a folder or anything else): never followed, never replaced;
//   - an existing file, device, pipe or socket (e.g. /dev/null): a file is never replaced;
//   - a path under a file (`results.txt/out`, `/dev/null/out`);
//   - the filesystem root, the current folder or the home folder, or any folder holding them;
//   - a folder that holds an input of the run (the scenario file, the measured image, the
//     shards being merged);
//   - "~" that the shell did not expand.
// An existing folder is then
//   - empty: replaced (nothing is lost);
//   - marked as ours (outputMarker.ts) and holding only the files its marker lists (and the
//     folders they sit in): replaced atomically; the old files are deleted one by one;
//   - anything else: refused, unless --force is given, in which case the existing folder is
//     moved aside to `<name>.replaced-<time>` next to it. Nothing is ever deleted that the
//     marker does not list.

import { lstatSync, readdirSync, realpathSync, statSync, type Stats } from 'node:fs';
import { homedir } from 'node:os';
import { dirname, isAbsolute, join, parse, relative, resolve, sep } from 'node:path';
import { InputError } from '../scenario/inputError.js';
import { OUTPUT_MARKER, readMarker } from './outputMarker.js';

export interface OutputTargetOptions {
  /** the option that named the folder, for messages (e.g. '--out') */
  option: string;
  /** inputs of the run: the folder must not hold any of them */
  inputs?: readonly string[];
  /** move an existing folder that is not ours aside instead of refusing */
  force?: boolean;
  /** current and home folder (default: the process's); tests pass their own */
  cwd?: string;
  home?: string;
}

export type ExistingFolder =
  | { kind: 'none' }
  | { kind: 'empty' }
  /** ours: `files` are the marker's list (relative paths), all present or absent, nothing else */
  | { kind: 'owned'; files: string[] }
  | { kind: 'foreign'; reason: string };

export interface OutputTarget {
  /** absolute path of the folder */
  path: string;
  /** as given, for messages */
  given: string;
  existing: ExistingFolder;
  options: OutputTargetOptions;
}

function refuse(options: OutputTargetOptions, given: string, what: string): never {
  throw new InputError(`${options.option} ${given}: ${what}`);
}

function lstatOrNull(path: string): Stats | null | NodeJS.ErrnoException {
  try {
    return lstatSync(path);
  } catch (err) {
    const e = err as NodeJS.ErrnoException;
    return e.code === 'ENOENT' ? null : e;
  }
}

function kindOf(st: Stats): string {
  if (st.isFile()) return 'a file';
  if (st.isCharacterDevice() || st.isBlockDevice()) return 'a device';
  if (st.isFIFO()) return 'a pipe';
  if (st.isSocket()) return 'a socket';
  return 'not a folder';
}

/** The path with its longest existing prefix resolved through symbolic links. */
function canonical(path: string): string {
  const abs = resolve(path);
  let head = abs;
  const tail: string[] = [];
  for (;;) {
    try {
      const real = realpathSync(head);
      return tail.length > 0 ? join(real, ...tail.reverse()) : real;
    } catch {
      const parent = dirname(head);
      if (parent === head) return abs;
      tail.push(head.slice(parent.length).replace(/^[/\\]+/, ''));
      head = parent;
    }
  }
}

/** True when `folder` is `other` or one of the folders above it. */
function holds(folder: string, other: string): boolean {
  const rel = relative(folder, other);
  return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel));
}

/**
 * Classify an existing folder: empty, ours (marker valid, only listed files), or not ours.
 * Walks with lstat, so a symbolic link inside makes the folder "not ours" and is never followed.
 */
export function classifyFolder(path: string): ExistingFolder {
  const top = readdirSync(path);
  if (top.length === 0) return { kind: 'empty' };
  const marker = readMarker(path);
  if (marker === null) return { kind: 'foreign', reason: `was not written by tiercake (it has no ${OUTPUT_MARKER})` };
  if ('error' in marker) return { kind: 'foreign', reason: marker.error };
  const listed = new Set(marker.files);
  const stack: string[] = [''];
  while (stack.length > 0) {
    const rel = stack.pop() as string;
    for (const name of readdirSync(join(path, rel))) {
      const child = rel === '' ? name : `${rel}/${name}`;
      if (child === OUTPUT_MARKER) continue;
      const st = lstatSync(join(path, child));
      if (st.isDirectory()) stack.push(child);
      else if (!st.isFile()) return { kind: 'foreign', reason: `holds ${child}, ${st.isSymbolicLink() ? 'a symbolic link' : kindOf(st)} tiercake did not write` };
      else if (!listed.has(child)) return { kind: 'foreign', reason: `holds ${child}, which tiercake did not write` };
    }
  }
  return { kind: 'owned', files: marker.files };
}

/** Check where an output folder may go (see the file header); throws an InputError naming the option. */
export function checkOutputTarget(given: string, options: OutputTargetOptions): OutputTarget {
  if (given.trim() === '') refuse(options, '""', 'the folder name is empty; give a folder for the results');
  if (given === '~' || given.startsWith(`~${sep}`) || given.startsWith('~/')) {
    refuse(options, given, 'the shell did not expand "~"; write the folder out in full, e.g. $HOME/results');
  }
  const path = resolve(given);
  if (parse(path).root === path) refuse(options, given, 'is the root of the filesystem; give a folder of its own for the results');

  // The folder itself: never a link, never a file.
  let st = lstatOrNull(path);
  if (st instanceof Error) {
    // ENOTDIR: something above is not a folder; the walk below names it.
    if (st.code !== 'ENOTDIR') refuse(options, given, `cannot be examined (${st.code ?? 'unknown error'}); choose another folder`);
    st = null;
  }
  if (st !== null && st.isSymbolicLink()) {
    refuse(options, given, 'is a symbolic link; tiercake neither writes through links nor replaces them, so give the folder it points to or a new name');
  }
  if (st !== null && !st.isDirectory()) {
    const kind = kindOf(st);
    refuse(options, given, `is ${kind}, not a folder; tiercake never replaces ${kind === 'a file' ? 'a file' : 'it'}, so choose a new folder name`);
  }
  // The nearest existing folder above must be a folder (a path under /dev/null is not).
  for (let up = dirname(path); ; up = dirname(up)) {
    const a = lstatOrNull(up);
    if (a instanceof Error) {
      if (a.code === 'ENOTDIR') continue;
      refuse(options, given, `its parent ${up} cannot be examined (${a.code ?? 'unknown error'}); choose another folder`);
    }
    if (a !== null) {
      let isFolder = a.isDirectory();
      if (a.isSymbolicLink()) {
        try {
          isFolder = statSync(up).isDirectory();
        } catch {
          isFolder = false;
        }
      }
      if (!isFolder) refuse(options, given, `lies under ${up}, which is ${kindOf(a)}, not a folder; choose a folder path`);
      break;
    }
    if (dirname(up) === up) break;
  }

  // Folders that must never be replaced.
  const real = canonical(path);
  const cwd = canonical(options.cwd ?? process.cwd());
  const home = canonical(options.home ?? homedir());
  if (holds(real, cwd)) refuse(options, given, `is the current folder${real === cwd ? '' : ' or holds it'}; give a folder of its own for the results, e.g. out/run1`);
  if (holds(real, home)) refuse(options, given, `is your home folder${real === home ? '' : ' or holds it'}; give a folder of its own for the results`);
  for (const input of options.inputs ?? []) {
    if (holds(real, canonical(input))) {
      refuse(options, given, `holds ${input}, an input of this run, which replacing the folder would lose; choose another folder for the results`);
    }
  }

  const existing: ExistingFolder = st === null ? { kind: 'none' } : classifyFolder(path);
  if (existing.kind === 'foreign' && !options.force) {
    refuse(
      options,
      given,
      `the folder exists and ${existing.reason}; tiercake replaces only folders it wrote itself, so choose a new folder name, ` +
        'or add --force to move the existing folder aside (nothing is deleted)',
    );
  }
  return { path, given, existing, options };
}

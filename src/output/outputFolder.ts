// The one output-folder writer of every command. Files are staged in a hidden sibling
// folder (`.<name>.tmp-<pid>-<time>`), the ownership marker (outputMarker.ts) is written
// last, and `commit()` moves the staged folder into place, so a folder appears complete or
// not at all. Before the move the target is checked again (outputTarget.ts: the rule of
// what may be replaced); an earlier folder of ours is moved out of the way and its listed
// files deleted one by one, and with --force a folder that is not ours is moved aside to
// `<name>.replaced-<time>`, never deleted. A run that fails or is interrupted calls
// `discard()`, which removes only the staging folder.
//
// writeOutputFolder() is the whole sequence (stage, fill, commit, or discard on error);
// commands call it instead of writing the try/commit/discard steps themselves.

import { existsSync, lstatSync, mkdirSync, renameSync, rmdirSync, rmSync, unlinkSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../scenario/inputError.js';
import { markerText, OUTPUT_MARKER, type OutputIdentity } from './outputMarker.js';
import { checkOutputTarget, classifyFolder, type OutputTarget } from './outputTarget.js';

export interface CommitReport {
  /** the folder now holding the results */
  path: string;
  /** with --force: where the earlier folder (not ours) was moved */
  movedAsideTo: string | null;
  /** an earlier folder of ours that could not be removed completely (files appeared in it meanwhile) */
  leftover: string | null;
}

const stamp = (): string => new Date().toISOString().replace(/[-:]/g, '').replace(/\..*$/, '');

/** A relative path inside the folder; refuses absolute paths and '..' (a writer bug, not user input). */
function checkedRelative(relativePath: string): string {
  const parts = relativePath.split('/');
  if (relativePath.startsWith('/') || parts.some((p) => p === '' || p === '.' || p === '..') || relativePath === OUTPUT_MARKER) {
    throw new Error(`OutputFolder.write: ${JSON.stringify(relativePath)} is not a plain relative file name`);
  }
  return relativePath;
}

export class OutputFolder {
  readonly finalPath: string;
  readonly stagingPath: string;
  private readonly target: OutputTarget;
  private readonly identity: OutputIdentity;
  private readonly files = new Set<string>();
  private state: 'open' | 'committed' | 'discarded' = 'open';

  constructor(target: OutputTarget, identity: OutputIdentity) {
    this.target = target;
    this.identity = identity;
    this.finalPath = target.path;
    this.stagingPath = join(dirname(this.finalPath), `.${basename(this.finalPath)}.tmp-${process.pid}-${Date.now().toString(36)}`);
    try {
      mkdirSync(dirname(this.finalPath), { recursive: true });
      mkdirSync(this.stagingPath);
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code;
      if (code === 'EACCES' || code === 'EPERM' || code === 'EROFS' || code === 'ENOTDIR' || code === 'ENOSPC') {
        throw new InputError(`${target.options.option} ${target.given}: cannot create the folder there (${code}); choose a folder you may write to`);
      }
      throw err;
    }
  }

  /** Write one file (relative path inside the folder); parent folders are created. */
  write(relativePath: string, data: string | Uint8Array): void {
    if (this.state !== 'open') throw new Error(`OutputFolder.write: the folder is already ${this.state}`);
    const rel = checkedRelative(relativePath);
    const target = join(this.stagingPath, rel);
    mkdirSync(dirname(target), { recursive: true });
    writeFileSync(target, data);
    this.files.add(rel);
  }

  /** Files written so far (relative paths). */
  written(): string[] {
    return [...this.files];
  }

  /** Write the marker and move the staged folder into place (see the file header). */
  commit(): CommitReport {
    if (this.state === 'committed') throw new Error('OutputFolder.commit: already committed');
    if (this.state === 'discarded') throw new Error('OutputFolder.commit: the folder was discarded');
    // The target may have changed during a long run: check it again.
    const now = checkOutputTarget(this.target.given, this.target.options);
    writeFileSync(join(this.stagingPath, OUTPUT_MARKER), markerText(this.identity, this.written(), new Date().toISOString()));
    const report: CommitReport = { path: this.finalPath, movedAsideTo: null, leftover: null };
    const existing = now.existing;
    if (existing.kind === 'none') {
      renameSync(this.stagingPath, this.finalPath);
    } else if (existing.kind === 'empty') {
      rmdirSync(this.finalPath);
      renameSync(this.stagingPath, this.finalPath);
    } else {
      const aside = existing.kind === 'owned' ? `${this.stagingPath}-old` : asideName(this.finalPath);
      renameSync(this.finalPath, aside);
      try {
        renameSync(this.stagingPath, this.finalPath);
      } catch (err) {
        renameSync(aside, this.finalPath);
        throw err;
      }
      if (existing.kind === 'owned') {
        if (!removeListedFiles(aside, existing.files)) report.leftover = aside;
      } else {
        report.movedAsideTo = aside;
      }
    }
    this.state = 'committed';
    return report;
  }

  /** Remove the staging folder (after an error or an interruption); the target is left as it was. */
  discard(): void {
    if (this.state !== 'open') return;
    this.state = 'discarded';
    rmSync(this.stagingPath, { recursive: true, force: true });
  }
}

/** A free sibling name `<name>.replaced-<time>[-k]` for a folder moved aside with --force. */
function asideName(path: string): string {
  const base = `${path}.replaced-${stamp()}`;
  let candidate = base;
  for (let k = 2; existsSync(candidate); k++) candidate = `${base}-${k}`;
  return candidate;
}

/**
 * Delete the listed files (regular files only), the marker, then the folders that are left
 * empty, deepest first, and finally `folder` itself. Returns false when something that was
 * not listed remained (it is kept).
 */
function removeListedFiles(folder: string, files: readonly string[]): boolean {
  const dirs = new Set<string>();
  for (const rel of [...files, OUTPUT_MARKER]) {
    const full = join(folder, rel);
    let st;
    try {
      st = lstatSync(full);
    } catch {
      continue;
    }
    if (!st.isFile()) continue;
    unlinkSync(full);
    for (let d = dirname(rel); d !== '.' && d !== ''; d = dirname(d)) dirs.add(d);
  }
  const ordered = [...dirs].sort((a, b) => b.split('/').length - a.split('/').length);
  for (const d of ordered) {
    try {
      rmdirSync(join(folder, d));
    } catch {
      // not empty: something not listed is in it; keep it
    }
  }
  try {
    rmdirSync(folder);
    return true;
  } catch {
    return false;
  }
}

/**
 * Remove a folder that tiercake wrote (e.g. a checkpoint after a successful resume): only
 * when it is ours and holds only its listed files. Returns whether it was removed.
 */
export function removeOwnedFolder(path: string): boolean {
  let st;
  try {
    st = lstatSync(path);
  } catch {
    return false;
  }
  if (!st.isDirectory()) return false;
  const existing = classifyFolder(path);
  if (existing.kind === 'empty') {
    rmdirSync(path);
    return true;
  }
  if (existing.kind !== 'owned') return false;
  return removeListedFiles(path, existing.files);
}

/**
 * The whole write of a command's results: stage a folder at `target`, let `fill` write
 * into it, commit. On an error (or when `fill` returns `{ discard: true }`) the staging
 * folder is removed and the target is left as it was.
 */
export async function writeOutputFolder<T>(
  target: OutputTarget,
  identity: OutputIdentity,
  fill: (folder: OutputFolder) => T | Promise<T>,
): Promise<{ value: T; commit: CommitReport | null }> {
  const folder = new OutputFolder(target, identity);
  try {
    const value = await fill(folder);
    if (isDiscard(value)) {
      folder.discard();
      return { value, commit: null };
    }
    return { value, commit: folder.commit() };
  } catch (err) {
    folder.discard();
    throw err;
  }
}

/** Returned by a `fill` that decides not to keep what it staged (e.g. an interrupted run). */
export interface DiscardRequest {
  discard: true;
}

function isDiscard(value: unknown): value is DiscardRequest {
  return value !== null && typeof value === 'object' && (value as { discard?: unknown }).discard === true;
}

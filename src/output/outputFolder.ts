// An output folder that appears complete or not at all: every file is written into a
// hidden sibling staging folder, and `commit()` renames the staging folder into place.
// A run that fails or is interrupted before commit leaves the previous results untouched
// (the staging folder is removed by `discard()`).

import { mkdirSync, renameSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

export class OutputFolder {
  readonly finalPath: string;
  readonly stagingPath: string;
  private committed = false;

  constructor(finalPath: string) {
    this.finalPath = resolve(finalPath);
    const tag = `${process.pid}-${Date.now().toString(36)}`;
    this.stagingPath = join(dirname(this.finalPath), `.${basename(this.finalPath)}.tmp-${tag}`);
    mkdirSync(this.stagingPath, { recursive: true });
  }

  /** Write one file (relative path inside the folder); parent folders are created. */
  write(relativePath: string, data: string | Uint8Array): void {
    const target = join(this.stagingPath, relativePath);
    mkdirSync(dirname(target), { recursive: true });
    writeFileSync(target, data);
  }

  /** Move the staged folder into place, replacing an earlier result of the same name. */
  commit(): void {
    if (this.committed) return;
    mkdirSync(dirname(this.finalPath), { recursive: true });
    let old: string | undefined;
    if (existsSync(this.finalPath)) {
      old = `${this.stagingPath}-old`;
      renameSync(this.finalPath, old);
    }
    renameSync(this.stagingPath, this.finalPath);
    if (old) rmSync(old, { recursive: true, force: true });
    this.committed = true;
  }

  /** Remove the staging folder (after an error); the final folder is left as it was. */
  discard(): void {
    if (!this.committed) rmSync(this.stagingPath, { recursive: true, force: true });
  }
}

/** Write one file atomically: to a temporary name in the same folder, then rename. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  const target = resolve(path);
  mkdirSync(dirname(target), { recursive: true });
  const tmp = `${target}.tmp-${process.pid}-${Date.now().toString(36)}`;
  writeFileSync(tmp, data);
  renameSync(tmp, target);
}

// The --out and --force options of every command that writes: where the folder may go
// (src/output/outputTarget.ts, checked before any work is done) and what the command says
// after the folder is in place.

import { checkOutputTarget, type OutputTarget } from '../output/outputTarget.js';
import type { CommitReport } from '../output/outputFolder.js';

/** The output folder named by --out (or the command's default), checked now. */
export function outputTarget(dir: string, options: { force?: boolean; inputs?: readonly string[]; option?: string }): OutputTarget {
  return checkOutputTarget(dir, { option: options.option ?? '--out', force: options.force ?? false, inputs: options.inputs ?? [] });
}

/** Tell the user where an earlier folder went (--force) or what could not be cleaned up. */
export function reportCommit(commit: CommitReport | null): void {
  if (commit?.movedAsideTo) process.stderr.write(`tiercake: the earlier folder at ${commit.path} (with files tiercake did not write) was moved to ${commit.movedAsideTo}; nothing was deleted\n`);
  if (commit?.leftover) process.stderr.write(`tiercake: warning: the earlier results were moved to ${commit.leftover}, which still holds files tiercake did not write; look at it and remove it yourself\n`);
}

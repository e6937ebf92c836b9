// `tiercake progress DIR`: which shards of a sharded run are done, started or missing,
// read from the folder alone (src/output/batchProgress.ts; no scheduler accounting),
// whether the merged result is there, and the exact command that submits only the missing
// shards again (src/report/progressLines.ts). DIR is a `tiercake submit` folder, or a
// folder that collects shards (the --out of `ensemble --shard` / `scan --shard`). Always
// exits 0 when DIR can be read.

import type { Command } from 'commander';
import { readBatchProgress } from '../../output/batchProgress.js';
import { toolInvocation } from '../../output/toolInvocation.js';
import { progressLines } from '../../report/progressLines.js';
import { ExitCode } from '../../scenario/inputError.js';
import type { CommandContext } from '../main.js';

export function registerProgress(program: Command, context: CommandContext): void {
  program
    .command('progress')
    .description('which shards of a sharded run are done, started or missing (from the folder alone), and how to resubmit the missing ones')
    .argument('<dir>', 'a `tiercake submit` folder, or a folder that collects shards')
    .action(async (dir: string) => {
      context.exitCode = await runProgressCommand(dir, {});
    });
}

export async function runProgressCommand(dirGiven: string, _raw: Record<string, unknown>, nowMs = Date.now()): Promise<number> {
  process.stdout.write(`${progressLines(readBatchProgress(dirGiven), nowMs, toolInvocation).join('\n')}\n`);
  return ExitCode.done;
}

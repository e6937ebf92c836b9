// `tiercake keys`: every scenario key with its type, default and meaning (Markdown),
// generated from the schema; the README's reference is this output.
import type { Command } from 'commander';
import { configReferenceMarkdown } from '../../scenario/configReference.js';
import type { CommandContext } from '../main.js';
import { ExitCode } from '../../scenario/inputError.js';

export function registerKeys(program: Command, context: CommandContext): void {
  program
    .command('keys')
    .description('list every scenario key with its type, default and meaning (Markdown table)')
    .action(() => {
      process.stdout.write(configReferenceMarkdown());
      context.exitCode = ExitCode.done;
    });
}

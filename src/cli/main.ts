// The command-line entry point: builds the commander program from one module per command,
// and maps every outcome to an exit code (DESIGN.md section 6): 0 done, 2 bad input,
// 3 not converged (results written and flagged), 130 interrupted, 1 anything else.

import { Command, CommanderError } from 'commander';
import { ExitCode, InputError } from '../scenario/inputError.js';
import { printable } from '../scenario/formatScenarioError.js';
import { registerSolve } from './solveCommand.js';
import { registerCheck } from './checkCommand.js';
import { registerDiagram } from './diagramCommand.js';
import { registerHubbard } from './hubbardCommand.js';
import { registerCompare } from './compareCommand.js';
import { registerKeys } from './keysCommand.js';
import { registerEnsemble } from './ensembleCommand.js';
import { registerMerge } from './mergeCommand.js';
import { toolVersion } from '../output/toolVersion.js';
import { parseKernelChoice, setDefaultKernelChoice } from '../solver/kernel/sweepKernels.js';

/** Commands set this when they finish with a non-zero status without throwing. */
export interface CommandContext {
  exitCode: number;
}

export function buildProgram(context: CommandContext): Command {
  const program = new Command();
  program
    .name('tiercake')
    .description('Site-resolved Gutzwiller predictions for bosons in trapped, disordered optical lattices')
    .version(toolVersion(), '-V, --version')
    .showHelpAfterError('(run with --help for usage)')
    .exitOverride();
  registerSolve(program, context);
  registerCheck(program, context);
  registerDiagram(program, context);
  registerHubbard(program, context);
  registerCompare(program, context);
  registerKeys(program, context);
  registerEnsemble(program, context);
  registerMerge(program, context);
  return program;
}

export async function runCli(argv: string[]): Promise<number> {
  const context: CommandContext = { exitCode: ExitCode.done };
  const program = buildProgram(context);
  try {
    await program.parseAsync(argv, { from: 'user' });
    return context.exitCode;
  } catch (err) {
    if (err instanceof CommanderError) {
      if (err.code === 'commander.helpDisplayed' || err.code === 'commander.version' || err.code === 'commander.help') return 0;
      return ExitCode.badInput; // commander already printed the message
    }
    if (err instanceof InputError) {
      // Control characters are escaped (a message must not rewrite the terminal) and each
      // line is capped, whatever a scenario or a file name contained.
      const lines = err.message.split('\n').map((line) => {
        const safe = printable(line);
        return safe.length > 400 ? `${safe.slice(0, 397)}...` : safe;
      });
      process.stderr.write(`tiercake: ${lines.join('\n')}\n`);
      return ExitCode.badInput;
    }
    const message = err instanceof Error ? err.message : String(err);
    process.stderr.write(`tiercake: failed: ${message}\n`);
    if (process.env.TIERCAKE_DEBUG && err instanceof Error && err.stack) process.stderr.write(`${err.stack}\n`);
    return ExitCode.failure;
  }
}

export function main(): void {
  // TIERCAKE_KERNEL=js forces the JavaScript reference kernel (CI runs both paths).
  const kernel = process.env.TIERCAKE_KERNEL;
  if (kernel !== undefined && kernel !== '') {
    try {
      setDefaultKernelChoice(parseKernelChoice(kernel, 'TIERCAKE_KERNEL'));
    } catch (err) {
      process.stderr.write(`tiercake: ${err instanceof Error ? err.message : String(err)}\n`);
      process.exitCode = ExitCode.badInput;
      return;
    }
  }
  runCli(process.argv.slice(2)).then(
    (code) => {
      process.exitCode = code;
    },
    (err) => {
      process.stderr.write(`tiercake: failed: ${err instanceof Error ? err.message : String(err)}\n`);
      process.exitCode = ExitCode.failure;
    },
  );
}
